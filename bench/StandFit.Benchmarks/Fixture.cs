using System.Globalization;
using System.Text;
using StandFit.Core.Fitting;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Benchmarks;

/// <summary>
/// Writes the inputs of tests/StandFit.Tests/Resampling/Fixtures/boot_reference.R: a simulated
/// 21-point straight line (line.csv), 1000 pairs resamples of it as drawn by StandFit's generator
/// (line-indices.csv, 0-based point indices, one resample per row), and 1000 pairs resamples of
/// the 15 law-school pairs (law-indices.csv). The test checks that the generator still draws
/// exactly these indices, and that StandFit's intervals on them equal boot's. For
/// nls_boot_reference.R (the nonlinear refits): 1000 pairs resamples of the 54 points of NIST StRD
/// Chwirut2 (chwirut2-pairs-indices.csv) and 1000 residual resamples of the 14 points of Misra1a
/// (misra1a-residual-indices.csv: the indices of the adjusted residuals drawn), each resample one
/// <see cref="Xoshiro256StarStar.FillBelow"/> of n, exactly as the resamplers draw them (the test
/// checks the resampler still does). For inverse_boot_reference.R (resampled inverse predictions):
/// 1000 pairs resamples of the 40 points of NIST StRD Pontius (pontius-pairs-indices.csv); its
/// nonlinear cases reuse the Chwirut2 and Misra1a indices.
/// </summary>
internal static class Fixture
{
    public const ulong LineSeed = 20261202;
    public const ulong LineStream = 424242;
    public const ulong LawStream = 1993;
    public const ulong Chwirut2Stream = 541;
    public const ulong Misra1aStream = 141;
    public const ulong PontiusStream = 1881;
    public const int B = 1000;

    public static void Write(string folder)
    {
        Directory.CreateDirectory(folder);
        var rng = new Xoshiro256StarStar(LineSeed);
        var sweep = Simulation.Sweep(21, ref rng);
        var csv = new StringBuilder("x,y\n");
        for (var i = 0; i < sweep.Count; i++)
        {
            csv.Append(sweep.Stimulus[i].ToString("R", CultureInfo.InvariantCulture)).Append(',').Append(sweep.Output[i].ToString("R", CultureInfo.InvariantCulture)).Append('\n');
        }

        File.WriteAllText(Path.Combine(folder, "line.csv"), csv.ToString());
        var fit = Simulation.Fit(sweep, Polynomial.StraightLine);
        var kernel = new LinearResampler(fit, [1, 0, 0, 1]);
        var indices = new int[B * 21];
        var stream = new Xoshiro256StarStar(LineStream);
        kernel.Bootstrap(BootstrapScheme.Pairs, B, ref stream, new double[2 * B], indices);
        File.WriteAllText(Path.Combine(folder, "line-indices.csv"), Rows(indices, 21));

        var law = new Xoshiro256StarStar(LawStream);
        var lawIndices = new int[B * 15];
        for (var i = 0; i < lawIndices.Length; i++)
        {
            lawIndices[i] = law.NextBelow(15);
        }

        File.WriteAllText(Path.Combine(folder, "law-indices.csv"), Rows(lawIndices, 15));
        File.WriteAllText(Path.Combine(folder, "chwirut2-pairs-indices.csv"), Rows(Draws(Chwirut2Stream, 54), 54));
        File.WriteAllText(Path.Combine(folder, "misra1a-residual-indices.csv"), Rows(Draws(Misra1aStream, 14), 14));
        File.WriteAllText(Path.Combine(folder, "pontius-pairs-indices.csv"), Rows(Draws(PontiusStream, 40), 40));
    }

    /// <summary>B resamples of n indices from one stream, each one FillBelow of n (a pairs or residual resample's draws).</summary>
    private static int[] Draws(ulong stream, int n)
    {
        var rng = new Xoshiro256StarStar(stream);
        var indices = new int[B * n];
        var threshold = Xoshiro256StarStar.RejectionThreshold(n);
        for (var r = 0; r < B; r++)
        {
            rng.FillBelow(indices.AsSpan(r * n, n), (uint)n, threshold);
        }

        return indices;
    }

    private static string Rows(int[] indices, int n)
    {
        var text = new StringBuilder();
        for (var r = 0; r < indices.Length / n; r++)
        {
            text.AppendJoin(',', indices.Skip(r * n).Take(n).Select(i => i.ToString(CultureInfo.InvariantCulture))).Append('\n');
        }

        return text.ToString();
    }
}
