using SenseSplit.Core.Text;

namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// A token filter between a <see cref="TokenScanner"/> and the next sink: every token equal (ordinal) to one of the
/// words of a merged pair is passed on as that pair's pseudo-word; every other token, and all line and paragraph
/// breaks, pass unchanged. Tokens are compared after the scanner's normalisation (case folding, number folding), so a
/// token is replaced exactly when the embed pipeline would have counted it as w1 or w2.
/// </summary>
/// <remarks>
/// The merge works on the token stream, never on raw text: the pseudo-word's marker U+2295 is a token separator for
/// the scanner (see <see cref="PseudoWord"/>), so re-scanning merged text would split the pseudo-word again.
/// Lookups take spans (no allocation per token).
/// </remarks>
public sealed class TokenMerger<TSink> : ITokenSink where TSink : ITokenSink
{
    private readonly Dictionary<string, int>.AlternateLookup<ReadOnlySpan<char>> _lookup;
    private readonly string[] _pseudoWords;
    private readonly long[] _replaced;
    private readonly TSink _next;

    /// <param name="pairs">(w1, w2, pseudo-word) per pair; the six strings of all pairs together hold no word twice.</param>
    public TokenMerger(IReadOnlyList<(string First, string Second, string Pseudo)> pairs, TSink next)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(next);
        var map = new Dictionary<string, int>(pairs.Count * 2, StringComparer.Ordinal);
        _pseudoWords = new string[pairs.Count];
        for (int p = 0; p < pairs.Count; p++)
        {
            var (a, b, pseudo) = pairs[p];
            if (string.IsNullOrEmpty(a) || string.IsNullOrEmpty(b) || string.IsNullOrEmpty(pseudo))
                throw new ArgumentException($"pair {p + 1}: words and pseudo-word must not be empty", nameof(pairs));
            if (a == b) throw new ArgumentException($"pair {p + 1} ({a}, {b}): the two words must differ", nameof(pairs));
            foreach (var w in new[] { a, b })
                if (!map.TryAdd(w, p)) throw new ArgumentException($"pair {p + 1} ({a}, {b}): '{w}' is already in pair {map[w] + 1}", nameof(pairs));
            _pseudoWords[p] = pseudo;
        }
        foreach (var pseudo in _pseudoWords)
            if (map.TryGetValue(pseudo, out int owner))
                throw new ArgumentException($"pseudo-word '{pseudo}' is also a word of pair {owner + 1}", nameof(pairs));
        _lookup = map.GetAlternateLookup<ReadOnlySpan<char>>();
        _replaced = new long[pairs.Count];
        _next = next;
    }

    /// <summary>Tokens replaced by the pseudo-word of pair <paramref name="pair"/> (occurrences of w1 plus w2).</summary>
    public long Replaced(int pair) => _replaced[pair];

    public void Token(ReadOnlySpan<char> token)
    {
        if (_lookup.TryGetValue(token, out int p))
        {
            _replaced[p]++;
            _next.Token(_pseudoWords[p]);
        }
        else _next.Token(token);
    }

    public void LineBreak() => _next.LineBreak();
    public void ParagraphBreak() => _next.ParagraphBreak();
}
