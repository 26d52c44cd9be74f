namespace SenseSplit.Core.Senses;

/// <summary>Close spellings for unknown terms.</summary>
public static class Spelling
{
    /// <summary>Levenshtein distance (insertions, deletions, substitutions, each cost 1) between <paramref name="a"/> and
    /// <paramref name="b"/>, or <paramref name="limit"/> + 1 as soon as it is known to exceed <paramref name="limit"/>.</summary>
    /// <remarks>V. I. Levenshtein (1966), "Binary codes capable of correcting deletions, insertions, and reversals";
    /// the two-row dynamic programme of R. A. Wagner &amp; M. J. Fischer (1974), "The string-to-string correction
    /// problem", JACM 21(1); a row whose minimum exceeds the limit ends the computation.</remarks>
    public static int Distance(ReadOnlySpan<char> a, ReadOnlySpan<char> b, int limit = int.MaxValue)
    {
        Guard.NonNegative(limit);
        int over = limit == int.MaxValue ? int.MaxValue : limit + 1;
        if (Math.Abs(a.Length - b.Length) > limit) return over;
        if (a.Length == 0) return Math.Min(b.Length, over);
        if (b.Length == 0) return Math.Min(a.Length, over);
        Span<int> prev = b.Length < 256 ? stackalloc int[b.Length + 1] : new int[b.Length + 1];
        Span<int> cur = b.Length < 256 ? stackalloc int[b.Length + 1] : new int[b.Length + 1];
        for (int j = 0; j <= b.Length; j++) prev[j] = j;
        for (int i = 1; i <= a.Length; i++)
        {
            cur[0] = i;
            int rowMin = i;
            for (int j = 1; j <= b.Length; j++)
            {
                int sub = prev[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
                int v = Math.Min(sub, Math.Min(prev[j] + 1, cur[j - 1] + 1));
                cur[j] = v;
                if (v < rowMin) rowMin = v;
            }
            if (rowMin > limit) return over;
            var t = prev; prev = cur; cur = t;
        }
        return Math.Min(prev[b.Length], over);
    }

    /// <summary>Up to <paramref name="max"/> words of <paramref name="vocabulary"/> within <paramref name="maxDistance"/>
    /// edits of <paramref name="word"/>: nearest first, then the more frequent (when <paramref name="counts"/> are given),
    /// then in ordinal order.</summary>
    public static string[] Closest(string word, IReadOnlyList<string> vocabulary, long[]? counts, int maxDistance, int max)
    {
        ArgumentNullException.ThrowIfNull(word);
        ArgumentNullException.ThrowIfNull(vocabulary);
        Guard.NonNegative(maxDistance);
        Guard.NonNegative(max);
        var found = new List<(int dist, long count, string w)>();
        for (int i = 0; i < vocabulary.Count; i++)
        {
            var w = vocabulary[i];
            if (Math.Abs(w.Length - word.Length) > maxDistance || w == word) continue;
            int dist = Distance(word, w, maxDistance);
            if (dist <= maxDistance) found.Add((dist, counts?[i] ?? 0, w));
        }
        return found.OrderBy(f => f.dist).ThenByDescending(f => f.count).ThenBy(f => f.w, StringComparer.Ordinal)
            .Take(max).Select(f => f.w).ToArray();
    }
}
