namespace RateDeck.Text;

/// <summary>"Did you mean" hints from the edit distance between a misspelt name and the known ones.</summary>
public static class Suggestions
{
    /// <summary>
    /// The known name closest to <paramref name="given"/>, ignoring case, when it is close enough to
    /// be a likely typo: an edit distance of at most 1 for names up to 4 characters, 2 up to 8, and
    /// 3 beyond (common practice for spelling hints). Among equally distant names the one of the
    /// nearest length wins, so <c>k1O</c> suggests <c>k10</c> rather than <c>k1</c>.
    /// </summary>
    public static string? Closest(string given, IEnumerable<string> known)
    {
        string? best = null;
        var bestDistance = int.MaxValue;
        var bestLengthGap = int.MaxValue;
        foreach (var candidate in known)
        {
            var distance = Distance(given.ToLowerInvariant(), candidate.ToLowerInvariant());
            var lengthGap = Math.Abs(candidate.Length - given.Length);
            if (distance < bestDistance || (distance == bestDistance && lengthGap < bestLengthGap))
            {
                best = candidate;
                bestDistance = distance;
                bestLengthGap = lengthGap;
            }
        }

        var allowed = given.Length <= 4 ? 1 : given.Length <= 8 ? 2 : 3;
        return bestDistance <= allowed ? best : null;
    }

    /// <summary>" Did you mean `x`?" or an empty string.</summary>
    public static string Hint(string given, IEnumerable<string> known)
        => Closest(given, known) is { } match ? $" Did you mean `{match}`?" : "";

    /// <summary>Levenshtein distance (insertions, deletions and substitutions each cost 1).</summary>
    public static int Distance(string a, string b)
    {
        var previous = new int[b.Length + 1];
        var current = new int[b.Length + 1];
        for (var j = 0; j <= b.Length; j++)
        {
            previous[j] = j;
        }

        for (var i = 1; i <= a.Length; i++)
        {
            current[0] = i;
            for (var j = 1; j <= b.Length; j++)
            {
                var substitution = previous[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
                current[j] = Math.Min(substitution, Math.Min(previous[j], current[j - 1]) + 1);
            }

            (previous, current) = (current, previous);
        }

        return previous[b.Length];
    }
}
