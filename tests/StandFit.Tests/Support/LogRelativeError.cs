using System.Globalization;

namespace StandFit.Tests.Support;

/// <summary>
/// The log relative error of McCullough, B. D. (1998), "Assessing the Reliability of Statistical
/// Software: Part I", The American Statistician 52(4), 358-366: LRE = -log10(|est - cert| / |cert|),
/// roughly the number of significant digits that agree. Capped at the digits the certified value is
/// printed to (an exact match gets the cap); a certified 0 uses the absolute error -log10(|est|).
/// A non-finite estimate scores 0.
/// </summary>
public static class LogRelativeError
{
    public static double Of(double estimate, double certified, int cap = StrdFile.CertifiedDigits)
    {
        if (!double.IsFinite(estimate))
        {
            return 0;
        }

        var error = certified == 0 ? Math.Abs(estimate) : Math.Abs(estimate - certified) / Math.Abs(certified);
        return error == 0 ? cap : Math.Min(cap, -Math.Log10(error));
    }

    /// <summary>
    /// For a certified value of exactly 0 whose quantity has a natural size <paramref name="scale"/>:
    /// -log10(|est| / scale), the digits of agreement relative to that size, capped like <see cref="Of"/>.
    /// </summary>
    public static double AgainstZero(double estimate, double scale, int cap = StrdFile.CertifiedDigits)
    {
        if (!double.IsFinite(estimate) || !(scale > 0))
        {
            return 0;
        }

        var error = Math.Abs(estimate) / scale;
        return error == 0 ? cap : Math.Min(cap, -Math.Log10(error));
    }

    /// <summary>"estimate ..., certified ..., LRE ..." with round-trip numbers, for failure messages.</summary>
    public static string Describe(double estimate, double certified, double lre) =>
        string.Create(CultureInfo.InvariantCulture, $"estimate {estimate:R}, certified {certified:R}, LRE {lre:F2}");
}
