using System.Diagnostics;
using System.Globalization;
using System.Text;
using StandFit.Core.Problems;

namespace StandFit.Edges.Outputs;

/// <summary>
/// The pass/fail log, <c>output/passfail/passfail-YYYY-MM-DD.log</c> (by processing date, UTC): one
/// line per unit, appended and flushed to disk before the unit's input is archived.
/// Line format (docs/outputs.md): <c>time RULING serial=.. part=.. station=.. file=.. recipe=..@..
/// reasons=a,b key=..</c>. Values are quoted and escaped when they hold anything but plain
/// characters, so no metadata can break a line.
/// <para>
/// Several workers append to one day's file. .NET's <see cref="FileMode.Append"/> is not the
/// system's append (<c>O_APPEND</c>): a stream writes at the end the file had when the stream was
/// opened, so two workers appending at once would write over each other's lines. Every append
/// therefore holds <c>output/journal/.passfail.lock</c> exclusively (<see cref="FileShare.None"/>:
/// an advisory lock on Linux, a sharing lock on Windows), taken before the log is opened and let go
/// after its lines are flushed to disk; a worker that finds it held waits a little and tries again.
/// </para>
/// </summary>
public sealed class PassFailLog : IAuditSink
{
    /// <summary>How long an append waits for another worker's append before it gives up (the pass/fail log is then unwritable).</summary>
    public static readonly TimeSpan LockTimeout = TimeSpan.FromSeconds(30);

    private static readonly UTF8Encoding Utf8 = new(encoderShouldEmitUTF8Identifier: false);
    private readonly string _folder;
    private readonly string _lock;

    public PassFailLog(string outputFolder)
    {
        _folder = Path.Combine(outputFolder, "passfail");
        _lock = Path.Combine(outputFolder, "journal", ".passfail.lock");
    }

    public void Append(IReadOnlyList<SummaryRecord> records) => AppendLines([.. records.Select(r => FormatLine(r))]);

    public void AppendLines(IReadOnlyList<string> lines)
    {
        if (lines.Count == 0)
        {
            return;
        }

        try
        {
            if (!Directory.Exists(Path.GetDirectoryName(_folder)))
            {
                throw new DirectoryNotFoundException(Messages.OutputFolderMissing(Path.GetDirectoryName(_folder)!));
            }

            Directory.CreateDirectory(_folder);
            using var exclusive = TakeLock();
            foreach (var day in lines.GroupBy(l => l[..10], StringComparer.Ordinal))
            {
                var path = Path.Combine(_folder, $"passfail-{day.Key}.log");
                using var stream = new FileStream(path, FileMode.Append, FileAccess.Write, FileShare.Read, 16 * 1024);
                using (var writer = new StreamWriter(stream, Utf8, 16 * 1024, leaveOpen: true))
                {
                    foreach (var line in day)
                    {
                        writer.Write(line);
                        writer.Write('\n');
                    }
                }

                stream.Flush(flushToDisk: true);
            }
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new AuditSinkException($"The pass/fail log in {_folder} cannot be written: {e.Message}", e);
        }
    }

    /// <summary>Opens the lock file exclusively, waiting (1 ms, doubling up to 50 ms) while another append holds it, at most <see cref="LockTimeout"/>.</summary>
    private FileStream TakeLock()
    {
        Directory.CreateDirectory(Path.GetDirectoryName(_lock)!);
        var started = Stopwatch.GetTimestamp();
        var wait = TimeSpan.FromMilliseconds(1);
        while (true)
        {
            try
            {
                return new FileStream(_lock, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
            }
            catch (IOException e) when (IsHeldByAnother(e) && Stopwatch.GetElapsedTime(started) < LockTimeout)
            {
                Thread.Sleep(wait);
                wait = TimeSpan.FromTicks(Math.Min(wait.Ticks * 2, TimeSpan.FromMilliseconds(50).Ticks));
            }
        }
    }

    /// <summary>
    /// The open failed because another stream holds the file: EWOULDBLOCK from the advisory lock
    /// (11 on Linux, 35 on macOS; .NET gives the errno as the HResult), or a sharing or lock
    /// violation on Windows.
    /// </summary>
    private static bool IsHeldByAnother(IOException e) =>
        e.GetType() == typeof(IOException) && (OperatingSystem.IsWindows()
            ? e.HResult is unchecked((int)0x80070020) or unchecked((int)0x80070021)
            : e.HResult == (OperatingSystem.IsMacOS() || OperatingSystem.IsFreeBSD() ? 35 : 11));

    /// <summary>The line of a unit; <paramref name="ruling"/> and <paramref name="reasons"/> replace the row's (a duplicate's line).</summary>
    public static string FormatLine(SummaryRecord r, string? ruling = null, IReadOnlyList<string>? reasons = null)
    {
        var line = new StringBuilder(256);
        line.Append(r.ProcessedAt.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture));
        line.Append(' ').Append((ruling ?? r.Ruling).ToUpperInvariant().PadRight(8));
        Field(line, "serial", r.Serial);
        Field(line, "part", r.Part);
        Field(line, "station", r.Station);
        Field(line, "file", r.SourceFile);
        Field(line, "recipe", r.RecipeName is null ? null : $"{r.RecipeName}@{r.RecipeVersion}");
        Field(line, "reasons", string.Join(',', reasons ?? r.ReasonCodes));
        Field(line, "key", r.UnitKey);
        return line.ToString();
    }

    /// <summary>A value as it appears in a line: bare when plain, otherwise quoted with \" \\ and \uXXXX escapes.</summary>
    public static string Escape(string? value)
    {
        if (value is null)
        {
            return "-";
        }

        if (value.Length > 0 && value.All(IsPlain))
        {
            return value;
        }

        var quoted = new StringBuilder(value.Length + 2).Append('"');
        foreach (var c in value)
        {
            if (c is '"' or '\\')
            {
                quoted.Append('\\').Append(c);
            }
            else if (char.IsControl(c) || char.IsSurrogate(c) || c is '\u2028' or '\u2029' or '\u0085')
            {
                quoted.Append(CultureInfo.InvariantCulture, $"\\u{(int)c:x4}");
            }
            else
            {
                quoted.Append(c);
            }
        }

        return quoted.Append('"').ToString();
    }

    private static bool IsPlain(char c) => char.IsAsciiLetterOrDigit(c) || c is '.' or '_' or '-' or ':' or '@' or '/' or '+' or ',';

    private static void Field(StringBuilder line, string key, string? value) => line.Append(' ').Append(key).Append('=').Append(Escape(value));
}
