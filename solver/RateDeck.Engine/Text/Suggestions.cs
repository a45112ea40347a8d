namespace RateDeck.Text;

/// <summary>"Did you mean" hints for misspelt keys, options, states and names.</summary>
public static class Suggestions
{
    /// <summary>
    /// The closest candidate within an edit distance of a third of the name's length (at least 1,
    /// at most 3), formatted as <c> (did you mean 'x'?)</c>; empty when nothing is close.
    /// </summary>
    public static string DidYouMean(string name, IEnumerable<string> candidates)
    {
        var limit = Math.Clamp(name.Length / 3, 1, 3);
        var best = candidates
            .Select(c => (Candidate: c, Distance: EditDistance(c, name)))
            .Where(c => c.Distance <= limit)
            .OrderBy(c => c.Distance)
            .ThenBy(c => c.Candidate, StringComparer.Ordinal)
            .FirstOrDefault();
        return best.Candidate is null ? "" : $" (did you mean '{best.Candidate}'?)";
    }

    /// <summary>Levenshtein distance, case-insensitive (a wrong case is a near miss, not a different word).</summary>
    public static int EditDistance(string a, string b)
    {
        a = a.ToLowerInvariant();
        b = b.ToLowerInvariant();
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
