using System.Diagnostics;
using System.Globalization;
using System.Text;
using StandFit.Core.Curve;
using StandFit.Core.Diagnostics;
using StandFit.Core.Evaluation;
using StandFit.Core.Fitting;
using StandFit.Core.Ingest;
using StandFit.Core.Recipes;
using StandFit.Core.Uncertainty;
using StandFit.Edges.Readers;
using StandFit.Edges.RecipeFiles;

namespace StandFit.Benchmarks;

/// <summary>
/// The pipeline's diagnostics stage (<c>run --stats</c>'s "diagnostics": intervals, derived
/// figures, the runs test, the residual diagnostics, the curve figures and the figure table) on a
/// folder of sweep files and a recipe folder, single-threaded: first each unit once through
/// <see cref="UnitEvaluator"/> in a fresh process (what the pipeline sees, JIT tiers included; wall
/// time per stage by a probe, and the process CPU time of the pass), then each part of the stage
/// alone over all the units, warm (process CPU time per unit, the least of three rounds).
/// </summary>
internal static class DiagnosticsStage
{
    public static string Run(string inbox, string recipes)
    {
        var catalog = RecipeCatalog.Load(recipes);
        var files = Directory.EnumerateFiles(inbox).Order(StringComparer.Ordinal).Select(f => SweepFileReader.Parse(Path.GetFileName(f), File.ReadAllBytes(f))).ToArray();
        var text = new StringBuilder();
        var probe = new Probe(files.Length);
        var process = Process.GetCurrentProcess();
        var cpu0 = process.TotalProcessorTime;
        var wall = Stopwatch.StartNew();
        var units = new List<(Sweep Sweep, IFitResult Fit, Recipe Recipe)>();
        foreach (var file in files)
        {
            var table = file.Table.Value;
            var recipe = catalog.Match(table).Value;
            probe.Start();
            var evaluation = UnitEvaluator.Evaluate(table, recipe, null, file.Sha256, probe);
            probe.Next();
            units.Add((evaluation.Sweep!, evaluation.Fit!, recipe));
        }

        process.Refresh();
        var cpu = (process.TotalProcessorTime - cpu0).TotalMicroseconds / files.Length;
        text.Append(CultureInfo.InvariantCulture, $"cold pass, {files.Length} units, one thread: {wall.Elapsed.TotalMicroseconds / files.Length:F1} us wall, {cpu:F1} us process CPU per unit (all stages)\n");
        text.Append(probe.Report());

        var parts = new (string Name, Func<(Sweep Sweep, IFitResult Fit, Recipe Recipe), object> Op)[]
        {
            ("t intervals", u => TIntervals.Compute(u.Fit, u.Recipe.Confidence)),
            ("derived estimates", u => DerivedEstimates.Compute((FitResult)u.Fit, u.Recipe.Confidence)),
            ("runs test (stimulus)", u => RunsTest.Compute(u.Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(u.Sweep.Stimulus.AsSpan()))),
            ("ResidualDiagnostics.Compute", u => ResidualDiagnostics.Compute(u.Fit, u.Sweep.Legs.AsSpan(), u.Recipe.DiagnosticsOptions)),
            ("curve figures", u => CurveFigures.Compute(u.Fit, u.Recipe)),
            ("figure table", u => FigureTable.Compute(u.Fit, TIntervals.Compute(u.Fit, u.Recipe.Confidence), [], [], RunsTest.Compute(u.Fit.Residuals.AsSpan(), ResidualOrders.ByStimulus(u.Sweep.Stimulus.AsSpan())), u.Recipe, ResidualDiagnostics.Compute(u.Fit, u.Sweep.Legs.AsSpan(), u.Recipe.DiagnosticsOptions))),
        };
        text.Append("warm, each part over all units (least of 3 rounds), process CPU per unit; allocated bytes per unit:\n");
        foreach (var (name, op) in parts)
        {
            var best = double.PositiveInfinity;
            long bytes = 0;
            for (var round = 0; round < 3; round++)
            {
                process.Refresh();
                var before = process.TotalProcessorTime;
                var allocated = GC.GetAllocatedBytesForCurrentThread();
                foreach (var u in units)
                {
                    _ = op(u);
                }

                bytes = (GC.GetAllocatedBytesForCurrentThread() - allocated) / units.Count;
                process.Refresh();
                best = Math.Min(best, (process.TotalProcessorTime - before).TotalMicroseconds / units.Count);
            }

            text.Append(CultureInfo.InvariantCulture, $"  {name,-30} {best,8:F2} us CPU {bytes,8} B\n");
        }

        return text.ToString();
    }

    private sealed class Probe(int units) : IStageProbe
    {
        private readonly long[][] _ticks = [.. Enumerable.Range(0, Enum.GetValues<EvaluationStage>().Length).Select(_ => new long[units])];
        private long _lap;
        private int _unit;

        public void Start() => _lap = Stopwatch.GetTimestamp();

        public void Next() => _unit++;

        public void Done(EvaluationStage stage)
        {
            var now = Stopwatch.GetTimestamp();
            _ticks[(int)stage][_unit] = now - _lap;
            _lap = now;
        }

        public string Report()
        {
            var text = new StringBuilder("  stage (wall us per unit)   units 1-10  11-100  101-1000  1001-end   median(last half)\n");
            foreach (var stage in Enum.GetValues<EvaluationStage>())
            {
                var t = _ticks[(int)stage];
                double Mean(int from, int to) => t.Skip(from).Take(Math.Max(0, Math.Min(to, t.Length) - from)).DefaultIfEmpty(0).Average() * 1e6 / Stopwatch.Frequency;
                var half = t.Skip(t.Length / 2).Order().ToArray();
                var median = half.Length > 0 ? half[half.Length / 2] * 1e6 / Stopwatch.Frequency : 0;
                text.Append(CultureInfo.InvariantCulture, $"  {stage,-26} {Mean(0, 10),10:F1} {Mean(10, 100),7:F1} {Mean(100, 1000),9:F1} {Mean(1000, t.Length),9:F1} {median,10:F1}\n");
            }

            return text.ToString();
        }
    }
}
