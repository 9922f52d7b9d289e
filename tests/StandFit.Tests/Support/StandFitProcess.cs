using System.Diagnostics;

namespace StandFit.Tests.Support;

/// <summary>Runs the built <c>standfit</c> executable as a separate process, as a line PC would.</summary>
public static class StandFitProcess
{
    public sealed record Outcome(int ExitCode, string Output, string Error);

    /// <summary>The standfit.dll built beside this test assembly's configuration (Debug or Release).</summary>
    public static string Executable
    {
        get
        {
            var tfmDir = new DirectoryInfo(AppContext.BaseDirectory.TrimEnd(Path.DirectorySeparatorChar));
            var configuration = tfmDir.Parent!.Name;
            var path = RepoPaths.InRepo("src", "StandFit.Cli", "bin", configuration, tfmDir.Name, "standfit.dll");
            return File.Exists(path) ? path : throw new FileNotFoundException("Build the command line first.", path);
        }
    }

    public static Process Start(string workingDirectory, params string[] args) => Start(workingDirectory, null, args);

    /// <summary>Starts standfit with extra environment variables (for example DOTNET_PROCESSOR_COUNT).</summary>
    public static Process Start(string workingDirectory, IReadOnlyDictionary<string, string>? environment, params string[] args)
    {
        var info = new ProcessStartInfo("dotnet")
        {
            WorkingDirectory = workingDirectory,
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        info.ArgumentList.Add(Executable);
        foreach (var a in args)
        {
            info.ArgumentList.Add(a);
        }

        info.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        foreach (var (key, value) in environment ?? new Dictionary<string, string>())
        {
            info.Environment[key] = value;
        }

        return Process.Start(info) ?? throw new InvalidOperationException("dotnet did not start.");
    }

    public static Task<Outcome> RunAsync(string workingDirectory, TimeSpan timeout, params string[] args) => RunAsync(workingDirectory, timeout, null, args);

    public static async Task<Outcome> RunAsync(string workingDirectory, TimeSpan timeout, IReadOnlyDictionary<string, string>? environment, params string[] args)
    {
        using var process = Start(workingDirectory, environment, args);
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
            throw new TimeoutException($"standfit {string.Join(' ', args)} did not finish within {timeout}.");
        }

        return new Outcome(process.ExitCode, await output, await error);
    }
}
