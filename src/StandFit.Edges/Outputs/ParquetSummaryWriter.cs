using System.Globalization;
using Parquet;
using Parquet.Serialization;

namespace StandFit.Edges.Outputs;

/// <summary>
/// Writes summary rows to <c>output/summaries/date=YYYY-MM-DD/</c>, one Parquet file per batch and
/// partition (the date is the unit's test start, or its processing time when the file gives none),
/// Zstd-compressed, published atomically (<see cref="AtomicFile"/>).
/// </summary>
public sealed class ParquetSummaryWriter : ISummarySink
{
    private static readonly ParquetOptions Options = new()
    {
        CompressionMethod = CompressionMethod.Zstd,
        CompressionLevel = System.IO.Compression.CompressionLevel.Optimal,
    };

    private readonly string _root;
    private readonly string _filePrefix;
    private int _sequence;

    /// <param name="outputFolder">The configured output folder.</param>
    /// <param name="filePrefix">Unique per writer instance (run id), so two runs never collide.</param>
    public ParquetSummaryWriter(string outputFolder, string filePrefix)
    {
        _root = Path.Combine(outputFolder, "summaries");
        _filePrefix = filePrefix;
    }

    public static string PartitionOf(SummaryRecord record) =>
        "date=" + (record.TestStart ?? record.ProcessedAt).ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);

    public async Task WriteAsync(IReadOnlyList<SummaryRecord> records, CancellationToken cancellationToken)
    {
        foreach (var group in records.GroupBy(PartitionOf).OrderBy(g => g.Key, StringComparer.Ordinal))
        {
            var sequence = Interlocked.Increment(ref _sequence);
            var name = string.Create(CultureInfo.InvariantCulture, $"{_filePrefix}-{sequence:D5}.parquet");
            var path = Path.Combine(_root, group.Key, name);
            var rows = group.ToList();
            await AtomicFile.PublishAsync(
                path,
                stream => ParquetSerializer.SerializeAsync(rows, stream, Options, cancellationToken: cancellationToken),
                cancellationToken).ConfigureAwait(false);
        }
    }
}
