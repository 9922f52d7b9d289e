using System.Diagnostics;
using System.Globalization;
using System.Text;
using Parquet;

// StandFit soak bench: COUNT sweep files fed into the inbox of one `standfit watch` child process
// (in chunks, as stands would drop them), the child's resident memory sampled twice a second from
// /proc, and at the end the outputs counted: every input archived once, one summary row and one
// pass/fail key per input. Prints the working set every 10,000 files and the growth after a
// warm-up (the first 20 % of the files): the least-squares slope of the working set against files
// done, and the last 10,000-file interval's mean minus the first one's. Acceptance: peak working set
// (VmHWM) at most 250 MB (250,000,000 bytes), and growth within noise: the growth the slope predicts
// over the run after warm-up is at most twice the residual standard deviation of the samples about
// the line. Exits non-zero if a check fails.
// Usage: StandFit.Soak STANDFIT_DLL REPO_ROOT [COUNT] [WORKDIR]
if (args.Length < 2)
{
    Console.Error.WriteLine("usage: StandFit.Soak STANDFIT_DLL REPO_ROOT [COUNT] [WORKDIR]");
    return 2;
}

var standfit = Path.GetFullPath(args[0]);
var repo = Path.GetFullPath(args[1]);
var count = args.Length > 2 ? int.Parse(args[2], CultureInfo.InvariantCulture) : 100_000;
var work = args.Length > 3 ? Path.GetFullPath(args[3]) : Path.Combine(Path.GetTempPath(), "standfit-soak-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture));
const long CeilingBytes = 250_000_000L; // 250 MB
const int Chunk = 2_000;
const int Interval = 10_000;
const double WarmUp = 0.2;
const double MiB = 1024 * 1024;

Directory.CreateDirectory(work);
var staging = Path.Combine(work, "staging");
var inbox = Path.Combine(work, "inbox");
Directory.CreateDirectory(staging);
Directory.CreateDirectory(inbox);
var config = Path.Combine(work, "standfit.yaml");
File.WriteAllText(config, $"""
    folders:
      inbox: inbox
      archive: archive
      rejected: rejected
      output: output
      recipes: "{Path.Combine(repo, "config", "recipes").Replace('\\', '/')}"
      logs: logs
    watch:
      poll_seconds: 0.5
      stable_seconds: 0
      status_seconds: 5
      worker_id: soak
    output:
      flush_units: 500
      journal_compact_units: 10000
    """);

// Inputs: the demo's first KP-250 unit with its own serial, test start and seeded output noise;
// every 50th file after the first RetestLag is a retest of the unit of the file RetestLag before
// it (new readings, the same serial), whose latest row is then long folded into the index files on
// disk; those past 2 x RetestLag make chains of three, and more.
const int RetestLag = 25_000;
static int SerialOf(int i) => i > RetestLag && i % 50 == 0 ? SerialOf(i - RetestLag) : i;
var retests = Enumerable.Range(1, count).Count(i => SerialOf(i) != i);
var template = File.ReadAllLines(Path.Combine(repo, "sample-runs", "line-3", "KP250-26110-0001.csv"));
var clock = Stopwatch.StartNew();
for (var i = 1; i <= count; i++)
{
    var random = new Random(i);
    var text = new StringBuilder(1024);
    foreach (var line in template)
    {
        if (line.StartsWith("# serial:", StringComparison.Ordinal))
        {
            text.Append(CultureInfo.InvariantCulture, $"# serial: KP250-SOAK-{SerialOf(i):D7}\n");
        }
        else if (line.StartsWith("# test start:", StringComparison.Ordinal))
        {
            text.Append(CultureInfo.InvariantCulture, $"# test start: {new DateTime(2026, 11, 1, 0, 0, 0, DateTimeKind.Utc).AddSeconds(20.0 * i):yyyy-MM-dd'T'HH:mm:ss'Z'}\n");
        }
        else if (line.Length > 0 && char.IsAsciiDigit(line[0]))
        {
            var cells = line.Split(',');
            cells[3] = (double.Parse(cells[3], CultureInfo.InvariantCulture) + (random.Next(-5, 6) * 1e-5)).ToString("F5", CultureInfo.InvariantCulture);
            text.Append(string.Join(',', cells)).Append('\n');
        }
        else
        {
            text.Append(line).Append('\n');
        }
    }

    File.WriteAllText(Path.Combine(staging, string.Create(CultureInfo.InvariantCulture, $"soak-{i:D7}.csv")), text.ToString());
}

Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"generated {count} files in {clock.Elapsed.TotalSeconds:F1} s"));
var pending = new Queue<string>(Directory.EnumerateFiles(staging).Order(StringComparer.Ordinal));

var info = new ProcessStartInfo("dotnet") { WorkingDirectory = work, RedirectStandardError = true, RedirectStandardOutput = true, UseShellExecute = false };
info.ArgumentList.Add(standfit);
info.ArgumentList.Add("watch");
info.ArgumentList.Add("--config");
info.ArgumentList.Add(config);
using var child = Process.Start(info)!;
child.ErrorDataReceived += (_, _) => { };
child.OutputDataReceived += (_, _) => { };
child.BeginErrorReadLine();
child.BeginOutputReadLine();

var archive = Path.Combine(work, "archive");
var claimed = Path.Combine(inbox, ".claimed", "soak");
var samples = new List<(double Seconds, int Done, long Rss)>();
clock.Restart();
long peakRss = 0;
var moved = 0;
var nextReport = Interval;
var intervalStart = (Seconds: 0.0, Index: 0);
int Archived() => Directory.Exists(archive) ? Directory.EnumerateDirectories(archive).Sum(d => Directory.EnumerateFiles(d).Count()) : 0;
int InHand() => Directory.EnumerateFiles(inbox).Count() + (Directory.Exists(claimed) ? Directory.EnumerateFiles(claimed).Count() : 0);
Console.WriteLine("  files    seconds   units/s   working set MiB: mean    max    managed heap MiB");
while (true)
{
    if (child.HasExited)
    {
        Console.Error.WriteLine("standfit watch exited early with " + child.ExitCode.ToString(CultureInfo.InvariantCulture));
        return 1;
    }

    var ready = Directory.EnumerateFiles(inbox).Count();
    while (ready < Chunk && pending.Count > 0)
    {
        for (var k = 0; k < Chunk && pending.Count > 0; k++, ready++, moved++)
        {
            var file = pending.Dequeue();
            File.Move(file, Path.Combine(inbox, Path.GetFileName(file)));
        }
    }

    var (rss, hwm) = Memory(child.Id);
    peakRss = Math.Max(peakRss, hwm);
    var done = Math.Max(0, moved - InHand()); // moved into the inbox and neither there nor claimed: judged and moved on
    samples.Add((clock.Elapsed.TotalSeconds, done, rss));
    while (done >= nextReport && nextReport <= count)
    {
        var interval = samples.Skip(intervalStart.Index).Select(x => x.Rss).ToList();
        var seconds = clock.Elapsed.TotalSeconds;
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{nextReport,7}  {seconds,9:F0}  {Interval / Math.Max(seconds - intervalStart.Seconds, 1e-9),8:F0}  {interval.Average() / MiB,21:F1}  {interval.Max() / MiB,6:F1}  {ManagedHeap(work) / MiB,14:F1}"));
        intervalStart = (seconds, samples.Count);
        nextReport += Interval;
    }

    if (done >= count && Archived() >= count)
    {
        break;
    }

    Thread.Sleep(500); // a bench samples on a clock; this is not a test
}

var elapsed = clock.Elapsed.TotalSeconds;
using (var term = Process.Start("kill", ["-TERM", child.Id.ToString(CultureInfo.InvariantCulture)]))
{
    term.WaitForExit();
}

child.WaitForExit();
long rows = 0, linked = 0;
foreach (var file in Directory.EnumerateFiles(Path.Combine(work, "output", "summaries"), "*.parquet", SearchOption.AllDirectories))
{
    using var stream = File.OpenRead(file);
    await using var reader = await ParquetReader.CreateAsync(stream);
    rows += reader.Metadata!.NumRows;
    var retestOf = reader.Schema.GetDataFields().Single(f => f.Name == "retest_of");
    for (var g = 0; g < reader.RowGroupCount; g++)
    {
        using var group = reader.OpenRowGroupReader(g);
        var values = new string?[group.RowCount];
        await group.ReadAsync(retestOf, values.AsMemory(), null);
        linked += values.Count(v => v is not null);
    }
}

var keys = Directory.EnumerateFiles(Path.Combine(work, "output", "passfail")).SelectMany(File.ReadLines)
    .Select(l => l[(l.LastIndexOf(" key=", StringComparison.Ordinal) + 5)..]).Distinct(StringComparer.Ordinal).Count();
var archived = Archived();
var journalFolder = Path.Combine(work, "output", "journal");
var indexBytes = Directory.EnumerateFiles(journalFolder, "*.idx").Sum(f => new FileInfo(f).Length);
var indexFiles = Directory.EnumerateFiles(journalFolder, "*.idx").Count();
var journalBytes = new FileInfo(Path.Combine(journalFolder, "soak.jsonl")).Length;

// Growth after warm-up: least squares of the working set on files done.
var warm = (int)(count * WarmUp);
var steady = samples.Where(x => x.Done >= warm).ToList();
var growth = Fit(steady.Select(x => ((double)x.Done, (double)x.Rss)).ToList());
var span = count - warm;
var predicted = growth.Slope * span;
double IntervalMean(int from) => steady.Where(x => x.Done >= from && x.Done < from + Interval).Select(x => (double)x.Rss).DefaultIfEmpty(double.NaN).Average();
var firstMean = IntervalMean(warm);
var lastMean = IntervalMean(count - Interval);
var peakOk = peakRss <= CeilingBytes;
var growthOk = Math.Abs(predicted) <= 2 * growth.ResidualSd;
Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"""

    soak: {count} files through standfit watch in {elapsed:F0} s ({count / elapsed:F0} units/s), exit code {child.ExitCode}
    machine: {Environment.ProcessorCount} cores, .NET {Environment.Version}, load average (1, 5, 15 min) at the end {LoadAverage()}
    archived {archived}, summary rows {rows}, distinct pass/fail keys {keys}, rows with retest_of {linked} (retests dropped {retests})
    journal: {journalBytes} bytes; index: {indexFiles} files, {indexBytes} bytes ({(double)indexBytes / count:F1} bytes per unit)
    peak working set (VmHWM) {peakRss / MiB:F1} MiB = {peakRss / 1e6:F1} MB (ceiling 250 MB = {CeilingBytes / MiB:F1} MiB): {(peakOk ? "ok" : "OVER")}
    growth after warm-up ({warm} files; {steady.Count} samples over the next {span} files):
      least-squares slope {growth.Slope * Interval / 1024:+0;-0} KiB per 10,000 files (standard error {growth.SlopeSe * Interval / 1024:F0}), {predicted / MiB:+0.0;-0.0} MiB over the {span} files
      residual SD about the line {growth.ResidualSd / MiB:F1} MiB; mean working set {firstMean / MiB:F1} MiB over files {warm}-{warm + Interval}, {lastMean / MiB:F1} MiB over the last {Interval}: last minus first {(lastMean - firstMean) / MiB:+0.0;-0.0} MiB
      within noise (|slope x files| <= 2 residual SD = {2 * growth.ResidualSd / MiB:F1} MiB): {(growthOk ? "yes" : "NO")}
    """));
var ok = child.ExitCode == 0 && archived == count && rows == count && keys == count && linked == retests && peakOk && growthOk;
Console.WriteLine(ok ? "soak: OK" : "soak: FAILED");
return ok ? 0 : 1;

static (long Rss, long Peak) Memory(int pid)
{
    long rss = 0, peak = 0;
    try
    {
        foreach (var line in File.ReadLines($"/proc/{pid}/status"))
        {
            if (line.StartsWith("VmRSS:", StringComparison.Ordinal))
            {
                rss = Kb(line);
            }
            else if (line.StartsWith("VmHWM:", StringComparison.Ordinal))
            {
                peak = Kb(line);
            }
        }
    }
    catch (IOException)
    {
        // The process is gone.
    }

    return (rss, peak);
}

static long ManagedHeap(string work)
{
    try
    {
        var text = File.ReadAllText(Path.Combine(work, "output", "status-soak.json"));
        var at = text.IndexOf("\"managed_heap_bytes\": ", StringComparison.Ordinal);
        return at < 0 ? 0 : long.Parse(new string([.. text[(at + 22)..].TakeWhile(char.IsAsciiDigit)]), CultureInfo.InvariantCulture);
    }
    catch (IOException)
    {
        return 0;
    }
}

// Ordinary least squares y = a + b x: the slope b, its standard error and the residual standard deviation.
static (double Slope, double SlopeSe, double ResidualSd) Fit(IReadOnlyList<(double X, double Y)> points)
{
    var n = points.Count;
    if (n < 3)
    {
        return (0, double.NaN, double.NaN);
    }

    var mx = points.Average(p => p.X);
    var my = points.Average(p => p.Y);
    var sxx = points.Sum(p => (p.X - mx) * (p.X - mx));
    var sxy = points.Sum(p => (p.X - mx) * (p.Y - my));
    var slope = sxx > 0 ? sxy / sxx : 0;
    var sse = points.Sum(p => Math.Pow(p.Y - my - (slope * (p.X - mx)), 2));
    var sd = Math.Sqrt(sse / (n - 2));
    return (slope, sxx > 0 ? sd / Math.Sqrt(sxx) : double.NaN, sd);
}

// Other work on the machine slows the worker: the figures are read with this beside them.
static string LoadAverage()
{
    try
    {
        return string.Join(", ", File.ReadAllText("/proc/loadavg").Split(' ').Take(3));
    }
    catch (IOException)
    {
        return "unknown";
    }
}

static long Kb(string line) => long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1], CultureInfo.InvariantCulture) * 1024;
