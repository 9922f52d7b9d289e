using System.Security.Cryptography;
using System.Text;
using Microsoft.Extensions.Logging;
using StandFit.Edges.Logging;

namespace StandFit.Edges.RecipeFiles;

/// <summary>
/// The recipes in force for a long-lived worker, reloaded when the recipe folder changes. Each
/// rescan reads every recipe file and hashes the folder's names and bytes (so an edit is seen even
/// when it keeps the size and modification time). A change is taken into force only when the whole
/// folder is valid; otherwise the last good recipes stay in force, and the problems are logged once
/// for that state of the folder. An unreadable or missing folder is treated the same way.
/// </summary>
public sealed class RecipeSource
{
    private readonly string _path;
    private readonly ILogger _logger;
    private RecipeCatalog _current;
    private string _stamp;

    public RecipeSource(string path, RecipeCatalog initial, ILogger logger)
    {
        _path = path;
        _current = initial;
        _logger = logger;
        _stamp = Stamp(path);
    }

    /// <summary>The recipes in force now.</summary>
    public RecipeCatalog Current => Volatile.Read(ref _current);

    /// <summary>Rereads the folder if it changed; true when another set of recipes came into force.</summary>
    public bool Check()
    {
        var stamp = Stamp(_path);
        if (stamp == _stamp)
        {
            return false;
        }

        _stamp = stamp;
        var loaded = Directory.Exists(_path) || File.Exists(_path)
            ? Load()
            : null;
        if (loaded is null || !loaded.IsValid || loaded.Recipes.Length == 0)
        {
            var problems = loaded?.Problems ?? [];
            foreach (var problem in problems)
            {
                Log.RecipeProblem(_logger, problem.ToString());
            }

            if (loaded is null || problems.IsEmpty)
            {
                Log.RecipeProblem(_logger, $"{_path}: the recipe folder is missing, unreadable or empty.");
            }

            Log.RecipesKept(_logger, Math.Max(1, problems.Length));
            return false;
        }

        if (loaded.Fingerprint == Current.Fingerprint)
        {
            return false;
        }

        Volatile.Write(ref _current, loaded);
        Log.RecipesReloaded(_logger, loaded.Recipes.Length, _path);
        return true;
    }

    private RecipeCatalog? Load()
    {
        try
        {
            return RecipeCatalog.Load(_path);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return null;
        }
    }

    /// <summary>A hash of every recipe file's name and bytes, or of the error that stopped reading them.</summary>
    private static string Stamp(string path)
    {
        try
        {
            var files = Directory.Exists(path)
                ? Directory.EnumerateFiles(path).Where(f => f.EndsWith(".yaml", StringComparison.OrdinalIgnoreCase) || f.EndsWith(".yml", StringComparison.OrdinalIgnoreCase)).Order(StringComparer.Ordinal).ToArray()
                : File.Exists(path) ? [path] : [];
            using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
            foreach (var file in files)
            {
                hash.AppendData(Encoding.UTF8.GetBytes(Path.GetFileName(file) + "\n"));
                hash.AppendData(SHA256.HashData(File.ReadAllBytes(file)));
            }

            return files.Length + ":" + Convert.ToHexStringLower(hash.GetHashAndReset());
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return "unreadable:" + e.GetType().Name + ":" + e.Message;
        }
    }
}
