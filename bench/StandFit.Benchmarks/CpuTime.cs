using System.Diagnostics;
using System.Globalization;

namespace StandFit.Benchmarks;

/// <summary>
/// A cross-check of the BenchmarkDotNet figures on a shared, loaded machine: the process's CPU time
/// (not wall time) per operation over many operations, after a warm-up. Single-threaded work only.
/// </summary>
internal static class CpuTime
{
    public static string Run(int operations)
    {
        var text = new System.Text.StringBuilder();
        foreach (var degree in new[] { 1, 2 })
        {
            var bench = new ResamplingBenchmarks { Degree = degree };
            bench.Setup();
            foreach (var (name, op) in new (string, Func<double>)[] { ("Kernel", () => bench.Kernel()), ("Analysis", bench.Analysis) })
            {
                for (var i = 0; i < operations / 10; i++)
                {
                    op();
                }

                var process = Process.GetCurrentProcess();
                var before = process.TotalProcessorTime;
                for (var i = 0; i < operations; i++)
                {
                    op();
                }

                process.Refresh();
                var perOp = (process.TotalProcessorTime - before).TotalMicroseconds / operations;
                text.Append(CultureInfo.InvariantCulture, $"degree {degree} {name}: {perOp:F1} us CPU per operation\n");
            }
        }

        var nonlinear = new NonlinearResamplingBenchmarks();
        nonlinear.Setup();
        text.Append(CultureInfo.InvariantCulture, $"nonlinear: {nonlinear.HandedOverPerKernel()} of 1021 refits handed to the full search\n");
        foreach (var (name, op) in new (string, Func<double>)[] { ("Kernel", () => nonlinear.Kernel()), ("Analysis", nonlinear.Analysis) })
        {
            // A nonlinear operation is about 100 times a linear one: a tenth of the operations.
            var count = Math.Max(operations / 10, 20);
            for (var i = 0; i < count / 10; i++)
            {
                op();
            }

            var process = Process.GetCurrentProcess();
            var before = process.TotalProcessorTime;
            for (var i = 0; i < count; i++)
            {
                op();
            }

            process.Refresh();
            var perOp = (process.TotalProcessorTime - before).TotalMicroseconds / count;
            text.Append(CultureInfo.InvariantCulture, $"nonlinear (3 parameters, 21 points) {name}: {perOp:F1} us CPU per operation\n");
        }

        return text.ToString();
    }
}
