using System.Globalization;
using System.Text;

namespace SenseSplit.Core.Senses;

/// <summary>One token of a text: its lower-cased form and where it starts.</summary>
/// <param name="Text">The token, lower-cased (invariant culture).</param>
/// <param name="Offset">Start, in Unicode code points from the start of the text (the same number as a Python
/// <c>str</c> index).</param>
/// <param name="CharIndex">Start, in UTF-16 code units (a .NET string index).</param>
/// <param name="CharLength">Length in UTF-16 code units of the token in the original text.</param>
public readonly record struct TextToken(string Text, int Offset, int CharIndex, int CharLength);

/// <summary>Splits text into tokens. The audit, the tagger and the corpus reader take one of these so that the
/// tokenizer of the embedding stage can replace <see cref="WordTokenizer.Tokenize"/>.</summary>
public delegate IEnumerable<TextToken> Tokenizer(string text);

/// <summary>
/// A small Unicode-aware tokenizer: a token is a run of letters, digits and combining marks; a hyphen or an
/// apostrophe (' or U+2019) between two such characters stays inside the token ("state-of-the-art", "don't");
/// tokens are lower-cased with the invariant culture. Everything else separates tokens.
/// </summary>
public static class WordTokenizer
{
    public static readonly Tokenizer Default = Tokenize;

    public static IEnumerable<TextToken> Tokenize(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        return TokenizeCore(text);
    }

    private static IEnumerable<TextToken> TokenizeCore(string text)
    {
        var sb = new StringBuilder();
        int i = 0, codePoint = 0;
        while (i < text.Length)
        {
            if (!IsWordChar(text, i, out int width))
            {
                if (!char.IsLowSurrogate(text[i]) || i == 0 || !char.IsHighSurrogate(text[i - 1])) codePoint++;
                i++;
                continue;
            }
            int start = i, startCp = codePoint;
            sb.Clear();
            while (i < text.Length)
            {
                if (IsWordChar(text, i, out width))
                {
                    Append(sb, text, i, width);
                    i += width; codePoint++;
                }
                else if (IsJoiner(text[i]) && i + 1 < text.Length && IsWordChar(text, i + 1, out _))
                {
                    sb.Append(text[i] == '\u2019' ? '\'' : text[i]);
                    i++; codePoint++;
                }
                else break;
            }
            yield return new TextToken(sb.ToString(), startCp, start, i - start);
        }
    }

    private static bool IsJoiner(char c) => c is '-' or '\'' or '\u2019';

    private static bool IsWordChar(string text, int i, out int width)
    {
        char c = text[i];
        if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1]))
        {
            width = 2;
            var cat = CharUnicodeInfo.GetUnicodeCategory(char.ConvertToUtf32(c, text[i + 1]));
            return IsWordCategory(cat);
        }
        width = 1;
        if (c < 128) return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9');
        return IsWordCategory(CharUnicodeInfo.GetUnicodeCategory(c));
    }

    private static bool IsWordCategory(UnicodeCategory cat) => cat switch
    {
        UnicodeCategory.UppercaseLetter or UnicodeCategory.LowercaseLetter or UnicodeCategory.TitlecaseLetter
            or UnicodeCategory.ModifierLetter or UnicodeCategory.OtherLetter or UnicodeCategory.DecimalDigitNumber
            or UnicodeCategory.NonSpacingMark or UnicodeCategory.SpacingCombiningMark => true,
        _ => false,
    };

    private static void Append(StringBuilder sb, string text, int i, int width)
    {
        char c = text[i];
        if (width == 1)
        {
            if (c < 128) sb.Append(c >= 'A' && c <= 'Z' ? (char)(c + 32) : c);
            else sb.Append(char.ToLowerInvariant(c));
        }
        else sb.Append(text, i, 2); // supplementary planes: kept as is (lower-casing rarely applies there)
    }
}
