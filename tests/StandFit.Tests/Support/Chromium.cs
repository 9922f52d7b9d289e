using System.Diagnostics;

namespace StandFit.Tests.Support;

/// <summary>
/// Headless Chromium, as Debian packages it (<c>chromium</c>; .ci/run installs it when it is
/// absent). Runs as root in CI, hence <c>--no-sandbox</c>; a fresh profile folder for each call.
/// </summary>
public static class Chromium
{
    private static readonly Lazy<string?> Found = new(Find);

    /// <summary>The browser's path, or null when none is installed.</summary>
    public static string? Binary => Found.Value;

    public static async Task<StandFitProcess.Outcome> RunAsync(TimeSpan timeout, params string[] args)
    {
        using var profile = new TempFolder();
        var info = new ProcessStartInfo(Binary ?? throw new InvalidOperationException("No chromium binary: install Debian's chromium (apt-get install -y chromium), as .ci/run does."))
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--disable-dev-shm-usage", "--no-first-run", "--no-default-browser-check", "--disable-extensions", "--hide-scrollbars", "--user-data-dir=" + profile.Path }.Concat(args))
        {
            info.ArgumentList.Add(a);
        }

        using var process = Process.Start(info) ?? throw new InvalidOperationException("chromium did not start.");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEndAsync();
        using var cancel = new CancellationTokenSource(timeout);
        try
        {
            await process.WaitForExitAsync(cancel.Token);
        }
        catch (OperationCanceledException)
        {
            process.Kill(entireProcessTree: true);
            throw new TimeoutException($"chromium {string.Join(' ', args)} did not finish within {timeout}.");
        }

        return new StandFitProcess.Outcome(process.ExitCode, await output, await error);
    }

    private static string? Find()
    {
        var path = Environment.GetEnvironmentVariable("PATH") ?? "";
        foreach (var name in new[] { "chromium", "chromium-browser", "google-chrome", "google-chrome-stable" })
        {
            foreach (var folder in path.Split(Path.PathSeparator, StringSplitOptions.RemoveEmptyEntries))
            {
                var candidate = Path.Combine(folder, name);
                if (File.Exists(candidate))
                {
                    return candidate;
                }
            }
        }

        return null;
    }
}

/// <summary>
/// A fact that needs headless Chromium: skipped, saying why, when no chromium binary is installed on
/// a developer's machine. Under CI (CI=true) it is never skipped: .ci/run installs chromium, so a
/// missing browser there is a failure.
/// </summary>
public sealed class ChromiumFactAttribute : FactAttribute
{
    public ChromiumFactAttribute()
    {
        if (Chromium.Binary is null && !string.Equals(Environment.GetEnvironmentVariable("CI"), "true", StringComparison.OrdinalIgnoreCase))
        {
            Skip = "No chromium binary on PATH (chromium, chromium-browser, google-chrome): install Debian's chromium (apt-get install -y chromium), as .ci/run does in CI.";
        }
    }
}
