using System.Globalization;
using StandFit.SweepGen;

const string Usage = "usage: StandFit.SweepGen demo OUTDIR | StandFit.SweepGen bulk OUTDIR COUNT SEED";

if (args.Length == 2 && args[0] == "demo")
{
    SweepSets.WriteDemo(args[1], Console.Out);
    return 0;
}

if (args.Length == 4
    && args[0] == "bulk"
    && int.TryParse(args[2], NumberStyles.None, CultureInfo.InvariantCulture, out int count)
    && count > 0
    && ulong.TryParse(args[3], NumberStyles.None, CultureInfo.InvariantCulture, out ulong seed))
{
    SweepSets.WriteBulk(args[1], count, seed);
    Console.Out.WriteLine(string.Create(CultureInfo.InvariantCulture, $"wrote {count} KP-250 sweeps to {args[1]} (seed {seed})"));
    return 0;
}

Console.Error.WriteLine(Usage);
return 2;
