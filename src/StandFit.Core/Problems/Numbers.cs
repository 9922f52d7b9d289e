using System.Globalization;

namespace StandFit.Core.Problems;

/// <summary>How numbers are written in messages and sentences: invariant culture, always.</summary>
public static class Numbers
{
    /// <summary>A number with <paramref name="digits"/> significant digits.</summary>
    public static string Format(double value, int digits = 6) =>
        double.IsFinite(value)
            ? value.ToString("G" + digits.ToString(CultureInfo.InvariantCulture), CultureInfo.InvariantCulture)
            : value.ToString(CultureInfo.InvariantCulture);

    /// <summary>
    /// Formats a value and a reference so that they read differently: starts at
    /// <paramref name="digits"/> significant digits and adds digits until the texts differ (at most 17).
    /// </summary>
    public static int DigitsToTellApart(double value, double reference, int digits = 5)
    {
        for (var d = digits; d < 17; d++)
        {
            if (value == reference || Format(value, d) != Format(reference, d))
            {
                return d;
            }
        }

        return 17;
    }
}
