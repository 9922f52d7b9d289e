using BenchmarkDotNet.Configs;
using BenchmarkDotNet.Diagnosers;
using BenchmarkDotNet.Jobs;
using BenchmarkDotNet.Running;
using BenchmarkDotNet.Toolchains.InProcess.Emit;
using StandFit.Benchmarks;

// standfit-benchmarks                    the BenchmarkDotNet suite (one core, in process)
// standfit-benchmarks coverage [UNITS]   the coverage study of docs/uncertainty.md
// standfit-benchmarks gates [UNITS] [SEED] the decision-quality study of the residual gates (docs/diagnostics.md; seed 20261202 unless given)
// standfit-benchmarks cputime [OPS]     CPU time per operation (a cross-check on a loaded machine)
// standfit-benchmarks diagprofile [OPS] CPU time of each part of the residual diagnostics
// standfit-benchmarks diagstage INBOX RECIPES  the pipeline's diagnostics stage on sweep files, cold then warm by part
// standfit-benchmarks fixture DIR        the data and resample indices that boot_reference.R reads
if (args.Length > 0 && args[0] == "coverage")
{
    var units = args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 4000;
    Console.Write(CoverageStudy.Run(units));
    return 0;
}

if (args.Length > 0 && args[0] == "gates")
{
    Console.Write(GateStudy.Run(
        args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 10000,
        args.Length > 2 ? ulong.Parse(args[2], System.Globalization.CultureInfo.InvariantCulture) : GateStudy.DefaultSeed));
    return 0;
}

if (args.Length > 0 && args[0] == "cputime")
{
    Console.Write(CpuTime.Run(args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 2000));
    return 0;
}

if (args.Length > 0 && args[0] == "diagprofile")
{
    Console.Write(DiagnosticsProfile.Run(args.Length > 1 ? int.Parse(args[1], System.Globalization.CultureInfo.InvariantCulture) : 20000));
    return 0;
}

if (args.Length > 2 && args[0] == "diagstage")
{
    Console.Write(DiagnosticsStage.Run(args[1], args[2]));
    return 0;
}

if (args.Length > 1 && args[0] == "fixture")
{
    Fixture.Write(args[1]);
    return 0;
}

var config = ManualConfig.CreateMinimumViable()
    .AddJob(Job.Default.WithToolchain(InProcessEmitToolchain.Instance).WithAffinity(1))
    .AddDiagnoser(MemoryDiagnoser.Default);
BenchmarkSwitcher.FromAssembly(typeof(ResamplingBenchmarks).Assembly).Run(args, config);
return 0;
