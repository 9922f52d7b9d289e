using System.Globalization;
using StandFit.Core.Uncertainty;

namespace StandFit.Tests.Reference;

/// <summary>
/// Student-t critical values against the NIST/SEMATECH e-Handbook of Statistical Methods table of
/// t critical values (two-sided 95 %, printed to 3 decimals; values as quoted in
/// shared/notes/trade-reference.md), and the p-value inverting the critical value.
/// </summary>
public sealed class StudentTCriticalValueTests
{
    public static TheoryData<int, double, double> RoundTrips()
    {
        var data = new TheoryData<int, double, double>();
        int[] dfs = [1, 2, 3, 5, 10, 30, 100, 1000];
        double[] levels = [0.5, 0.6827, 0.9, 0.95, 0.99, 0.9973, 0.9999, 0.999999];
        foreach (var df in dfs)
        {
            foreach (var level in levels)
            {
                data.Add(df, level, 1e-12);
            }
        }

        return data;
    }

    // NIST/SEMATECH e-Handbook, table of t critical values, two-sided 95 % (upper 0.025 point).
    [Theory]
    [InlineData(1, 12.706)]
    [InlineData(2, 4.303)]
    [InlineData(5, 2.571)]
    [InlineData(10, 2.228)]
    [InlineData(20, 2.086)]
    [InlineData(30, 2.042)]
    [InlineData(60, 2.000)]
    [InlineData(100, 1.984)]
    public void The_95_percent_critical_value_matches_the_handbook_table_to_three_decimals(int df, double table)
    {
        var t = StudentT.TwoSidedCritical(ConfidenceLevel.Default95, df);
        Assert.True(
            Math.Round(t, 3, MidpointRounding.AwayFromZero) == table,
            string.Create(CultureInfo.InvariantCulture, $"df {df}: t = {t:R}, handbook {table:F3}"));
    }

    // NIST/SEMATECH e-Handbook, table of t critical values, row "infinity": the normal 1.960.
    [Fact]
    public void The_95_percent_critical_value_for_infinite_df_matches_the_handbook_table()
    {
        var z = StudentT.NormalTwoSidedCritical(ConfidenceLevel.Default95);
        Assert.True(
            Math.Round(z, 3, MidpointRounding.AwayFromZero) == 1.960,
            string.Create(CultureInfo.InvariantCulture, $"z = {z:R}, handbook 1.960"));
    }

    [Theory]
    [MemberData(nameof(RoundTrips))]
    public void The_p_value_of_the_critical_value_is_one_minus_the_level(int df, double level, double tolerance)
    {
        var confidence = ConfidenceLevel.Of(level);
        var t = StudentT.TwoSidedCritical(confidence, df);
        var p = StudentT.TwoSidedPValue(t, df);
        Assert.True(
            Math.Abs(p - confidence.Alpha) <= tolerance,
            string.Create(CultureInfo.InvariantCulture, $"df {df}, level {level:R}: t = {t:R}, p = {p:R}, 1 - level = {confidence.Alpha:R}, difference {p - confidence.Alpha:E2}"));
    }
}
