namespace RateDeck.Text;

/// <summary>"Did you mean" hints from the edit distance between a misspelt name and the known ones.</summary>
public static class Suggestions
{
    /// <summary>
    /// The known name closest to <paramref name="given"/>, when it is close enough to be a likely
    /// typo: a name equal but for case wins outright; otherwise the edit distance may be at most 1
    /// for names of two to four characters, 2 up to eight and 3 beyond (common practice for
    /// spelling hints). A one-letter name gets only the case match: every other one-letter name is
    /// one edit away, which says nothing. Among equally distant names the one of the nearest
    /// length wins, so <c>k1O</c> suggests <c>k10</c> rather than <c>k1</c>.
    /// </summary>
    public static string? Closest(string given, IEnumerable<string> known)
    {
        var candidates = known.ToList();
        var sameLetters = candidates.FirstOrDefault(c => string.Equals(c, given, StringComparison.OrdinalIgnoreCase));
        if (sameLetters is not null)
        {
            return sameLetters;
        }

        string? best = null;
        var bestDistance = int.MaxValue;
        var bestLengthGap = int.MaxValue;
        foreach (var candidate in candidates)
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

        var allowed = given.Length switch
        {
            1 => 0,
            <= 4 => 1,
            <= 8 => 2,
            _ => 3,
        };
        return bestDistance <= allowed ? best : null;
    }

    /// <summary>" Did you mean `x`?" or an empty string.</summary>
    public static string Hint(string given, IEnumerable<string> known)
        => Closest(given, known) is { } match ? $" Did you mean `{match}`?" : "";

    /// <summary>
    /// Optimal-string-alignment distance: insertions, deletions, substitutions and swaps of
    /// neighbours each cost 1 (a swapped pair of letters is the commonest typo).
    /// </summary>
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
