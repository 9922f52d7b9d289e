using System.Diagnostics;
using System.Globalization;
using System.Text;
using Parquet;

// StandFit soak bench: COUNT sweep files fed into the inbox of one `standfit watch` child process
// (in chunks, as stands would drop them), the child's resident memory sampled every second from
// /proc, and at the end the outputs counted: every input archived once, one summary row and one
// pass/fail key per input. Prints the figures; exits non-zero if a check or the 250 MB ceiling fails.
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
const long CeilingBytes = 250L * 1024 * 1024;
const int Chunk = 2_000;

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
    """);

// Inputs: the demo's first KP-250 unit with its own serial, test start and seeded output noise.
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
            text.Append(CultureInfo.InvariantCulture, $"# serial: KP250-SOAK-{i:D7}\n");
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
var samples = new List<(double Seconds, int Done, long Rss)>();
clock.Restart();
long peakRss = 0;
int Done() => Directory.Exists(archive) ? Directory.EnumerateDirectories(archive).Sum(d => Directory.EnumerateFiles(d).Count()) : 0;
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
        for (var k = 0; k < Chunk && pending.Count > 0; k++, ready++)
        {
            var file = pending.Dequeue();
            File.Move(file, Path.Combine(inbox, Path.GetFileName(file)));
        }
    }

    var (rss, hwm) = Memory(child.Id);
    peakRss = Math.Max(peakRss, hwm);
    var done = Done();
    samples.Add((clock.Elapsed.TotalSeconds, done, rss));
    if (samples.Count % 15 == 0)
    {
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{clock.Elapsed.TotalSeconds,7:F0} s  {done,7} done  RSS {rss / 1048576.0,6:F1} MiB  peak {hwm / 1048576.0,6:F1} MiB  managed heap {ManagedHeap(work) / 1048576.0,6:F1} MiB"));
    }

    if (done >= count)
    {
        break;
    }

    Thread.Sleep(1000); // a bench samples on a clock; this is not a test
}

var elapsed = clock.Elapsed.TotalSeconds;
using (var term = Process.Start("kill", ["-TERM", child.Id.ToString(CultureInfo.InvariantCulture)]))
{
    term.WaitForExit();
}

child.WaitForExit();
long rows = 0;
foreach (var file in Directory.EnumerateFiles(Path.Combine(work, "output", "summaries"), "*.parquet", SearchOption.AllDirectories))
{
    using var stream = File.OpenRead(file);
    await using var reader = await ParquetReader.CreateAsync(stream);
    rows += reader.Metadata!.NumRows;
}

var keys = Directory.EnumerateFiles(Path.Combine(work, "output", "passfail")).SelectMany(File.ReadLines)
    .Select(l => l[(l.LastIndexOf(" key=", StringComparison.Ordinal) + 5)..]).Distinct(StringComparer.Ordinal).Count();
var archived = Done();
double Mean(IEnumerable<long> xs) => xs.DefaultIfEmpty(0).Average(x => (double)x) / 1048576.0;
var steady = samples.Where(s => s.Done >= count * 0.2).ToList();
var early = Mean(steady.Where(s => s.Done < count * 0.4).Select(s => s.Rss));
var late = Mean(steady.Where(s => s.Done >= count * 0.8).Select(s => s.Rss));
Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"""

    soak: {count} files through standfit watch in {elapsed:F0} s ({count / elapsed:F0} units/s), exit code {child.ExitCode}
    machine: {Environment.ProcessorCount} cores, .NET {Environment.Version}
    archived {archived}, summary rows {rows}, distinct pass/fail keys {keys}
    peak working set (VmHWM) {peakRss / 1048576.0:F1} MiB (ceiling 250 MB)
    mean RSS with 20-40 % done {early:F1} MiB, with 80-100 % done {late:F1} MiB: growth {late - early:+0.0;-0.0} MiB
    """));
var ok = child.ExitCode == 0 && archived == count && rows == count && keys == count && peakRss <= CeilingBytes;
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

static long Kb(string line) => long.Parse(line.Split(' ', StringSplitOptions.RemoveEmptyEntries)[1], CultureInfo.InvariantCulture) * 1024;
