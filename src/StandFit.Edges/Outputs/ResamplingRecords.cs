using System.Globalization;
using System.Text.Json.Serialization;
using Parquet.Serialization.Attributes;
using StandFit.Core.Uncertainty.Resampling;

namespace StandFit.Edges.Outputs;

/// <summary>One figure's result by one resampling method, as a struct inside the summary row's <c>resampling</c> list.</summary>
public sealed class ResamplingRecord
{
    [JsonPropertyName("figure")]
    [ParquetRequired]
    public string Figure { get; set; } = "";

    /// <summary>jackknife, percentile, basic or bca.</summary>
    [JsonPropertyName("method")]
    [ParquetRequired]
    public string Method { get; set; } = "";

    /// <summary>delete-one, delete-leg or delete-cycle for the jackknife; pairs, residual, wild-rademacher or wild-mammen for the bootstrap.</summary>
    [JsonPropertyName("scheme")]
    [ParquetRequired]
    public string Scheme { get; set; } = "";

    /// <summary>The figure on all the data.</summary>
    [JsonPropertyName("estimate")]
    public double Estimate { get; set; }

    [JsonPropertyName("bias_corrected")]
    public double? BiasCorrected { get; set; }

    [JsonPropertyName("bias")]
    public double? Bias { get; set; }

    [JsonPropertyName("se")]
    public double? StandardError { get; set; }

    [JsonPropertyName("ci_low")]
    public double? CiLow { get; set; }

    [JsonPropertyName("ci_high")]
    public double? CiHigh { get; set; }

    [JsonPropertyName("coverage")]
    public double Coverage { get; set; }

    /// <summary>Bootstrap resamples asked for, or the jackknife's deletions.</summary>
    [JsonPropertyName("resamples")]
    public int Resamples { get; set; }

    [JsonPropertyName("failed")]
    public int Failed { get; set; }
}

/// <summary>Fills the resampling columns of a summary row.</summary>
public static class ResamplingRecords
{
    public static void Fill(SummaryRecord record, ResamplingResult? result)
    {
        ArgumentNullException.ThrowIfNull(record);
        if (result is null)
        {
            return;
        }

        var plan = result.Plan;
        record.ResamplingSeed = (long)plan.Seed;
        record.ResamplingStream = result.StreamSeed.ToString("x16", CultureInfo.InvariantCulture);
        record.ResamplingScheme = plan.Bootstrap is { } s ? ResamplingPlan.SchemeName(s) : null;
        record.ResamplingResamples = result.Bootstrap?.Requested;
        record.ResamplingFailed = result.Bootstrap?.Failed;
        var jackknife = ResamplingPlan.JackknifeName(plan.Jackknife);
        foreach (var f in result.Figures)
        {
            if (f.Jackknife is { } j)
            {
                record.Resampling.Add(new ResamplingRecord
                {
                    Figure = f.Figure,
                    Method = "jackknife",
                    Scheme = jackknife,
                    Estimate = f.Estimate,
                    BiasCorrected = j.BiasCorrected,
                    Bias = j.Bias,
                    StandardError = j.StandardError,
                    CiLow = f.JackknifeInterval?.Low,
                    CiHigh = f.JackknifeInterval?.High,
                    Coverage = result.Coverage,
                    Resamples = result.JackknifeDeletions,
                    Failed = 0,
                });
            }

            if (f.Bootstrap is { } b && result.Bootstrap is { } counts)
            {
                var scheme = ResamplingPlan.SchemeName(plan.Bootstrap!.Value);
                foreach (var (method, interval) in new[] { ("percentile", b.Percentile), ("basic", b.Basic), ("bca", b.Bca) })
                {
                    record.Resampling.Add(new ResamplingRecord
                    {
                        Figure = f.Figure,
                        Method = method,
                        Scheme = scheme,
                        Estimate = f.Estimate,
                        BiasCorrected = Finite(f.Estimate - b.Bias),
                        Bias = Finite(b.Bias),
                        StandardError = Finite(b.StandardError),
                        CiLow = interval?.Low,
                        CiHigh = interval?.High,
                        Coverage = result.Coverage,
                        Resamples = counts.Requested,
                        Failed = counts.Failed,
                    });
                }
            }
        }
    }

    private static double? Finite(double v) => double.IsFinite(v) ? v : null;
}
