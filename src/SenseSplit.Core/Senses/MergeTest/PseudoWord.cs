namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// Names of merged pseudo-words: <c>w1⊕w2</c>, joined by U+2295 CIRCLED PLUS. That character is a mathematical
/// symbol (Unicode category Sm), never a letter, digit or connector, so a tokenizer that emits runs of letters and
/// digits (with inner apostrophes or hyphens) never produces it inside a word, and no corpus token can equal a
/// pseudo-word name. The merge must therefore be applied to the token stream after tokenizing, never to raw text
/// (re-tokenizing <c>w1⊕w2</c> would split it again). Vectors read from elsewhere may hold any token, so
/// <see cref="Choose"/> also checks the name against the vocabulary.
/// </summary>
public static class PseudoWord
{
    /// <summary>The marker joining the two words.</summary>
    public const char Marker = '\u2295';

    /// <summary>The plain name <c>w1⊕w2</c>; both words non-empty, without whitespace or the marker.</summary>
    public static string Compose(string frequentWord, string rareWord)
    {
        CheckPart(frequentWord, nameof(frequentWord));
        CheckPart(rareWord, nameof(rareWord));
        return frequentWord + Marker + rareWord;
    }

    /// <summary>
    /// A name for the merged pair that <paramref name="isKnown"/> does not report as an existing token:
    /// <c>w1⊕w2</c>, else <c>w1⊕w2⊕2</c>, <c>w1⊕w2⊕3</c>, … (first free one, at most 1,000 tries).
    /// </summary>
    public static string Choose(string frequentWord, string rareWord, Func<string, bool> isKnown)
    {
        ArgumentNullException.ThrowIfNull(isKnown);
        string name = Compose(frequentWord, rareWord);
        if (!isKnown(name)) return name;
        for (int n = 2; n <= 1000; n++)
        {
            string candidate = name + Marker + n.ToString(System.Globalization.CultureInfo.InvariantCulture);
            if (!isKnown(candidate)) return candidate;
        }
        throw new ArgumentException($"no free pseudo-word name for ({frequentWord}, {rareWord}): '{name}' and 999 numbered variants are all in the vocabulary");
    }

    /// <summary>True when <paramref name="token"/> contains the marker, i.e. could be a pseudo-word name.</summary>
    public static bool IsPseudoWord(string token) => token.Contains(Marker);

    /// <summary>Tokens of <paramref name="vocabulary"/> that hold the marker (normally none; a vocabulary that has
    /// some came from a tokenizer other than ours, and those tokens are kept out of pair selection).</summary>
    public static IReadOnlyList<string> Colliding(IEnumerable<string> vocabulary)
    {
        ArgumentNullException.ThrowIfNull(vocabulary);
        return vocabulary.Where(IsPseudoWord).ToList();
    }

    private static void CheckPart(string word, string name)
    {
        if (string.IsNullOrEmpty(word)) throw new ArgumentException("a merged word must not be empty", name);
        foreach (char ch in word)
        {
            if (char.IsWhiteSpace(ch)) throw new ArgumentException($"word '{word}' contains whitespace and cannot be a token", name);
            if (ch == Marker) throw new ArgumentException($"word '{word}' contains the pseudo-word marker U+2295", name);
        }
    }
}
