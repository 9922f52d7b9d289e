using System.Diagnostics;
using System.Globalization;
using System.Text;
using StandFit.Core.Evaluation;

namespace StandFit.Edges.Processing;

/// <summary>The stages of a run that <see cref="StageTimes"/> adds time to.</summary>
public enum Stage
{
    /// <summary>Claiming inputs out of the inbox (renames into the claim folder).</summary>
    Claim,

    /// <summary>A file's bytes read from disk.</summary>
    Read,

    /// <summary>Hash, strict decoding, the text parse and the sweep assembled.</summary>
    Parse,

    /// <summary>Screen and fit.</summary>
    Fit,

    /// <summary>Intervals, derived figures, runs test, residual diagnostics, curve figures.</summary>
    Diagnostics,

    /// <summary>Jackknife and bootstrap.</summary>
    Resampling,

    /// <summary>Limits and gates judged.</summary>
    Judge,

    /// <summary>The per-point rows of a unit.</summary>
    Points,

    /// <summary>Summary rows made, duplicates and retests looked up in the journal.</summary>
    Records,

    /// <summary>The batch's Parquet files written (temporary names, flushed) and renamed.</summary>
    Write,

    /// <summary>The journal's commit and logged lines (flushed to disk).</summary>
    Journal,

    /// <summary>The pass/fail lines and the operations log.</summary>
    Log,

    /// <summary>Inputs moved (or copied) to archive/ or rejected/.</summary>
    Move,
}

/// <summary>
/// Time per stage, summed over all units and threads (<c>standfit run --stats</c>). The stages of a
/// unit run on the thread that processes it: each <see cref="Lap"/> adds the time since that
/// thread's last lap (or <see cref="Start"/>), so the per-unit stages cost two clock reads a
/// stage and no allocation. The stages of a batch are added with <see cref="Add"/>. Thread-safe.
/// </summary>
public sealed class StageTimes : IStageProbe
{
    public static readonly int Count = Enum.GetValues<Stage>().Length;

    [ThreadStatic]
    private static long t_lap;

    private readonly long[] _ticks = new long[Count];

    /// <summary>Starts a unit's first stage on this thread.</summary>
    public static void Start() => t_lap = Stopwatch.GetTimestamp();

    /// <summary>Adds the time since this thread's last lap to <paramref name="stage"/>.</summary>
    public void Lap(Stage stage)
    {
        var now = Stopwatch.GetTimestamp();
        Interlocked.Add(ref _ticks[(int)stage], now - t_lap);
        t_lap = now;
    }

    /// <summary>Adds the time since <paramref name="startedTimestamp"/> (a <see cref="Stopwatch.GetTimestamp"/>) to <paramref name="stage"/>.</summary>
    public void Add(Stage stage, long startedTimestamp) => Interlocked.Add(ref _ticks[(int)stage], Stopwatch.GetTimestamp() - startedTimestamp);

    void IStageProbe.Done(EvaluationStage stage) => Lap(stage switch
    {
        EvaluationStage.Assemble => Stage.Parse,
        EvaluationStage.Fit => Stage.Fit,
        EvaluationStage.Diagnostics => Stage.Diagnostics,
        EvaluationStage.Resampling => Stage.Resampling,
        _ => Stage.Judge,
    });

    /// <summary>The time summed in one stage (over all threads).</summary>
    public TimeSpan this[Stage stage] => Stopwatch.GetElapsedTime(0, Interlocked.Read(ref _ticks[(int)stage]));

    /// <summary>
    /// One line a stage: seconds summed over threads, microseconds per unit, share of the total;
    /// the per-unit stages (read to points) run on all cores at once, the batch stages on one.
    /// </summary>
    public string Format(int units)
    {
        var total = Enum.GetValues<Stage>().Sum(s => this[s].TotalSeconds);
        var text = new StringBuilder();
        text.Append(CultureInfo.InvariantCulture, $"stage        seconds   us/unit   share  (summed over threads; {units} units)\n");
        foreach (var stage in Enum.GetValues<Stage>())
        {
            var seconds = this[stage].TotalSeconds;
            var perUnit = units > 0 ? seconds * 1e6 / units : 0;
            var share = total > 0 ? 100 * seconds / total : 0;
            text.Append(CultureInfo.InvariantCulture, $"{stage.ToString().ToLowerInvariant(),-12} {seconds,8:F3} {perUnit,9:F1} {share,6:F1} %\n");
        }

        return text.ToString();
    }
}
