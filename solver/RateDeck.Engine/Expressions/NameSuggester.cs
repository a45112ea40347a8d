namespace RateDeck.Expressions;

/// <summary>Finds the known name a mistyped one most likely meant, for "did you mean" hints.</summary>
internal static class NameSuggester
{
    /// <summary>
    /// The candidate equal to <paramref name="name"/> ignoring case, else the closest candidate
    /// (the first of equals) within edit distance 1 for names of two or three letters and 2 for
    /// longer ones; null when none is close. One-letter names get only the case match: every
    /// other one-letter name is one edit away, which says nothing.
    /// The distance counts insertions, deletions, substitutions and swaps of neighbours.
    /// </summary>
    public static string? Suggest(string name, IEnumerable<string> candidates)
    {
        var list = candidates.ToList();
        var sameLetters = list.FirstOrDefault(c => string.Equals(c, name, StringComparison.OrdinalIgnoreCase));
        if (sameLetters is not null)
        {
            return sameLetters;
        }
        var limit = name.Length switch
        {
            1 => 0,
            <= 3 => 1,
            _ => 2,
        };
        string? best = null;
        var bestDistance = limit + 1;
        foreach (var candidate in list)
        {
            var distance = Distance(name, candidate);
            if (distance < bestDistance)
            {
                best = candidate;
                bestDistance = distance;
            }
        }
        return best;
    }

    /// <summary>Optimal-string-alignment distance (Levenshtein with adjacent transpositions).</summary>
    internal static int Distance(string a, string b)
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
