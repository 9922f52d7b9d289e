using Parquet;
using Parquet.Serialization;

namespace StandFit.Edges.Outputs;

/// <summary>
/// The Parquet serializer builds and compiles its row-to-column code once per record type, on
/// first use: a few hundred milliseconds for the summary row's nested schema. A one-shot run
/// starts that work on another core at once (<see cref="Start"/>), while it reads its configuration,
/// recipes and journal and judges its first batch, so the first write, and the runs table's row of
/// a run with nothing to do, do not wait for it. The rows written are thrown away.
/// </summary>
public static class ParquetWarmup
{
    /// <summary>Serializes one empty row of each type to nowhere, on the thread pool; never throws (the real write reports any fault).</summary>
    public static Task Start(params Type[] recordTypes) => Task.Run(async () =>
    {
        foreach (var type in recordTypes)
        {
            try
            {
                if (type == typeof(RunRecord))
                {
                    await ParquetSerializer.SerializeAsync([new RunRecord()], Stream.Null).ConfigureAwait(false);
                }
                else if (type == typeof(SummaryRecord))
                {
                    await ParquetSerializer.SerializeAsync([new SummaryRecord()], Stream.Null).ConfigureAwait(false);
                }
                else if (type == typeof(PointRecord))
                {
                    await ParquetSerializer.SerializeAsync([new PointRecord()], Stream.Null).ConfigureAwait(false);
                }
                else
                {
                    throw new ArgumentException($"No warm-up for {type.Name}.", nameof(recordTypes));
                }
            }
            catch (Exception e) when (e is IOException or NotSupportedException or InvalidOperationException or ParquetException)
            {
                // Only a warm-up: the real write compiles again and reports what is wrong.
            }
        }
    });
}
