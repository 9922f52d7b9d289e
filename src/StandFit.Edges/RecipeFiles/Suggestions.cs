namespace StandFit.Edges.RecipeFiles;

/// <summary>"Did you mean ...?": the closest known word within a small edit distance.</summary>
public static class Suggestions
{
    public static string? Closest(string word, IEnumerable<string> known)
    {
        string? best = null;
        var bestDistance = int.MaxValue;
        foreach (var candidate in known)
        {
            var d = Distance(word.ToUpperInvariant(), candidate.ToUpperInvariant());
            if (d < bestDistance)
            {
                bestDistance = d;
                best = candidate;
            }
        }

        var allowed = Math.Max(1, Math.Min(3, word.Length / 3));
        return bestDistance <= allowed ? best : null;
    }

    /// <summary>Optimal string alignment distance (Levenshtein with adjacent transpositions).</summary>
    public static int Distance(string a, string b)
    {
        var d = new int[a.Length + 1, b.Length + 1];
        for (var i = 0; i <= a.Length; i++)
        {
            d[i, 0] = i;
        }

        for (var j = 0; j <= b.Length; j++)
        {
            d[0, j] = j;
        }

        for (var i = 1; i <= a.Length; i++)
        {
            for (var j = 1; j <= b.Length; j++)
            {
                var cost = a[i - 1] == b[j - 1] ? 0 : 1;
                d[i, j] = Math.Min(Math.Min(d[i - 1, j] + 1, d[i, j - 1] + 1), d[i - 1, j - 1] + cost);
                if (i > 1 && j > 1 && a[i - 1] == b[j - 2] && a[i - 2] == b[j - 1])
                {
                    d[i, j] = Math.Min(d[i, j], d[i - 2, j - 2] + 1);
                }
            }
        }

        return d[a.Length, b.Length];
    }
}
