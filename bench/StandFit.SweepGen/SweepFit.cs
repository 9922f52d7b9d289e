namespace StandFit.SweepGen;

/// <summary>A parameter estimate with its two-sided 95 % t-interval.</summary>
internal sealed record Interval(double Estimate, double Low, double High)
{
    public double HalfWidth => (High - Low) / 2.0;
}

internal sealed record FitOutcome(
    Interval Gain,
    Interval Offset,
    int Runs,
    int Positives,
    int Negatives,
    double RunsZ,
    double RunsP,
    IReadOnlyList<string> Reasons,
    string Ruling);

/// <summary>
/// The generator's own check of a sweep, mirroring the recipe rule: least-squares polynomial fit of
/// output on the reference reading, 95 % t-intervals for offset (c0) and gain (c1), the guarded
/// limit rule, and a Wald-Wolfowitz runs test (normal approximation, no continuity correction) on
/// the residual signs ordered by stimulus, ties kept in file order.
/// </summary>
internal static class SweepFit
{
    public const double RunsFloor = 0.01;

    public static FitOutcome Evaluate(IReadOnlyList<SweepPoint> points, PartSpec part)
    {
        int n = points.Count;
        int m = part.Degree + 1;
        int df = n - m;
        var normal = new double[m][];
        for (int j = 0; j < m; j++)
        {
            normal[j] = new double[m];
        }

        var rhs = new double[m];
        var powers = new double[m];
        foreach (SweepPoint p in points)
        {
            FillPowers(powers, p.Stimulus);
            for (int j = 0; j < m; j++)
            {
                rhs[j] += powers[j] * p.Output;
                for (int k = 0; k < m; k++)
                {
                    normal[j][k] += powers[j] * powers[k];
                }
            }
        }

        double[][] inverse = Invert(normal);
        var beta = new double[m];
        for (int j = 0; j < m; j++)
        {
            for (int k = 0; k < m; k++)
            {
                beta[j] += inverse[j][k] * rhs[k];
            }
        }

        var residuals = new double[n];
        double rss = 0.0;
        for (int i = 0; i < n; i++)
        {
            FillPowers(powers, points[i].Stimulus);
            double fitted = 0.0;
            for (int j = 0; j < m; j++)
            {
                fitted += beta[j] * powers[j];
            }

            residuals[i] = points[i].Output - fitted;
            rss += residuals[i] * residuals[i];
        }

        double s2 = rss / df;
        double t = T975(df);
        Interval Ci(int j)
        {
            double half = t * Math.Sqrt(s2 * inverse[j][j]);
            return new Interval(beta[j], beta[j] - half, beta[j] + half);
        }

        Interval offset = Ci(0);
        Interval gain = Ci(1);

        int[] order = Enumerable.Range(0, n).OrderBy(i => points[i].Stimulus).ToArray();
        int positives = 0;
        int negatives = 0;
        int runs = 0;
        int previous = 0;
        foreach (int i in order)
        {
            int sign = Math.Sign(residuals[i]);
            if (sign == 0)
            {
                continue;
            }

            if (sign > 0)
            {
                positives++;
            }
            else
            {
                negatives++;
            }

            if (sign != previous)
            {
                runs++;
                previous = sign;
            }
        }

        double n1 = positives;
        double n2 = negatives;
        double total = n1 + n2;
        double mean = (2.0 * n1 * n2 / total) + 1.0;
        double variance = 2.0 * n1 * n2 * ((2.0 * n1 * n2) - total) / (total * total * (total - 1.0));
        double z = variance > 0.0 ? (runs - mean) / Math.Sqrt(variance) : 0.0;
        double pValue = Erfc(Math.Abs(z) / Math.Sqrt(2.0));

        var reasons = new List<string>();
        AddLimitReason(reasons, "gain", gain, part.GainMin, part.GainMax);
        AddLimitReason(reasons, "offset", offset, part.OffsetMin, part.OffsetMax);
        if (pValue < RunsFloor)
        {
            reasons.Add("residuals.runs_structure");
        }

        string ruling = reasons.Exists(r => !r.EndsWith(".straddles_limit", StringComparison.Ordinal))
            ? "FAIL"
            : reasons.Count > 0 ? "RETEST" : "PASS";
        return new FitOutcome(gain, offset, runs, positives, negatives, z, pValue, reasons, ruling);
    }

    private static void AddLimitReason(List<string> reasons, string name, Interval ci, double min, double max)
    {
        if (ci.Low > max)
        {
            reasons.Add(name + ".above_limit");
        }
        else if (ci.High < min)
        {
            reasons.Add(name + ".below_limit");
        }
        else if (!(ci.Low > min && ci.High < max))
        {
            reasons.Add(name + ".straddles_limit");
        }
    }

    private static void FillPowers(double[] powers, double x)
    {
        powers[0] = 1.0;
        for (int j = 1; j < powers.Length; j++)
        {
            powers[j] = powers[j - 1] * x;
        }
    }

    /// <summary>Upper 97.5 % point of Student's t for the degrees of freedom the sweeps produce.</summary>
    private static double T975(int df) => df switch
    {
        18 => 2.100922,
        19 => 2.093024,
        _ => throw new ArgumentOutOfRangeException(nameof(df), df, "no t quantile tabulated"),
    };

    /// <summary>Gauss-Jordan inversion with partial pivoting.</summary>
    private static double[][] Invert(double[][] a)
    {
        int m = a.Length;
        var work = new double[m][];
        for (int i = 0; i < m; i++)
        {
            work[i] = new double[2 * m];
            Array.Copy(a[i], work[i], m);
            work[i][m + i] = 1.0;
        }

        for (int col = 0; col < m; col++)
        {
            int pivot = col;
            for (int r = col + 1; r < m; r++)
            {
                if (Math.Abs(work[r][col]) > Math.Abs(work[pivot][col]))
                {
                    pivot = r;
                }
            }

            (work[col], work[pivot]) = (work[pivot], work[col]);
            double d = work[col][col];
            for (int k = 0; k < 2 * m; k++)
            {
                work[col][k] /= d;
            }

            for (int r = 0; r < m; r++)
            {
                if (r == col)
                {
                    continue;
                }

                double f = work[r][col];
                for (int k = 0; k < 2 * m; k++)
                {
                    work[r][k] -= f * work[col][k];
                }
            }
        }

        var inverse = new double[m][];
        for (int i = 0; i < m; i++)
        {
            inverse[i] = work[i][m..];
        }

        return inverse;
    }

    /// <summary>Complementary error function, Abramowitz and Stegun 7.1.26 (absolute error below 1.5e-7).</summary>
    private static double Erfc(double x)
    {
        double t = 1.0 / (1.0 + (0.3275911 * x));
        double poly = t * (0.254829592 + (t * (-0.284496736 + (t * (1.421413741 + (t * (-1.453152027 + (t * 1.061405429))))))));
        return poly * Math.Exp(-x * x);
    }
}
