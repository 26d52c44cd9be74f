using System.Globalization;
using System.Text;

namespace SenseSplit.Core.Text;

/// <summary>What a UTF-16 code unit means to the tokenizer. See docs/tokenizer.md for the rules.</summary>
internal enum CharKind : byte
{
    /// <summary>Punctuation, symbols, controls, emoji, lone low surrogates: ends a token, is dropped.</summary>
    Separator = 0,
    /// <summary>Whitespace other than a line end: ends a token; a line of only these is blank.</summary>
    Space,
    /// <summary>Line end: LF, NEL (U+0085), LINE SEPARATOR (U+2028), VT, FF.</summary>
    LineEnd,
    /// <summary>CR: a line end, merged with a following LF.</summary>
    CarriageReturn,
    /// <summary>PARAGRAPH SEPARATOR (U+2029): ends the paragraph like a blank line.</summary>
    ParagraphEnd,
    /// <summary>Letters (L*) and letter numbers (Nl).</summary>
    Letter,
    /// <summary>Combining marks (M*, including variation selectors) and ZWNJ/ZWJ: part of a word they follow, dropped elsewhere.</summary>
    Mark,
    /// <summary>Decimal digits (Nd) of any script.</summary>
    Digit,
    /// <summary>Hyphen-minus, HYPHEN (U+2010), NON-BREAKING HYPHEN (U+2011): kept between two word characters.</summary>
    Hyphen,
    /// <summary>Apostrophe, RIGHT SINGLE QUOTATION MARK (U+2019), MODIFIER LETTER APOSTROPHE (U+02BC): kept between two word characters.</summary>
    Apostrophe,
    /// <summary>'.' and ',': kept between two digits (3.14, 1,000).</summary>
    NumberSeparator,
    /// <summary>Han ideographs in the BMP: each one is a token of its own.</summary>
    Ideograph,
    /// <summary>High surrogate: classified by the code point it starts.</summary>
    HighSurrogate,
    /// <summary>SOFT HYPHEN (U+00AD): skipped without ending the token.</summary>
    Ignorable,
}

/// <summary>Lookup tables (one entry per UTF-16 code unit) for the tokenizer's classes and lower-case mapping.</summary>
internal static class CharClasses
{
    public static readonly CharKind[] Kind = BuildKinds();
    public static readonly char[] Lower = BuildLower();

    private static CharKind[] BuildKinds()
    {
        var kinds = new CharKind[65536];
        for (int i = 0; i < kinds.Length; i++) kinds[i] = Classify((char)i);
        return kinds;
    }

    private static char[] BuildLower()
    {
        var lower = new char[65536];
        for (int i = 0; i < lower.Length; i++)
        {
            char c = (char)i;
            lower[i] = char.IsSurrogate(c) ? c : char.ToLowerInvariant(c);
        }
        return lower;
    }

    private static CharKind Classify(char c)
    {
        switch (c)
        {
            case '\n': case '\u0085': case '\u2028': case '\v': case '\f': return CharKind.LineEnd;
            case '\r': return CharKind.CarriageReturn;
            case '\u2029': return CharKind.ParagraphEnd;
            case '-': case '\u2010': case '\u2011': return CharKind.Hyphen;
            case '\'': case '\u2019': case '\u02BC': return CharKind.Apostrophe;
            case '.': case ',': return CharKind.NumberSeparator;
            case '\u00AD': return CharKind.Ignorable;
            case '\u200C': case '\u200D': return CharKind.Mark;
        }
        if (char.IsHighSurrogate(c)) return CharKind.HighSurrogate;
        if (char.IsLowSurrogate(c)) return CharKind.Separator;
        if (IsHanIdeograph(c)) return CharKind.Ideograph;
        if (char.IsWhiteSpace(c)) return CharKind.Space;
        return KindOfCategory(CharUnicodeInfo.GetUnicodeCategory(c));
    }

    /// <summary>Class of a supplementary-plane code point (after a surrogate pair was decoded).</summary>
    public static CharKind OfRune(Rune rune)
    {
        int v = rune.Value;
        // CJK Unified Ideographs Extensions B-H and the compatibility supplement (U+20000-U+3FFFF).
        if (v >= 0x20000 && v <= 0x3FFFF) return CharKind.Ideograph;
        return KindOfCategory(Rune.GetUnicodeCategory(rune));
    }

    private static CharKind KindOfCategory(UnicodeCategory category) => category switch
    {
        UnicodeCategory.UppercaseLetter or UnicodeCategory.LowercaseLetter or UnicodeCategory.TitlecaseLetter
            or UnicodeCategory.ModifierLetter or UnicodeCategory.OtherLetter
            or UnicodeCategory.LetterNumber => CharKind.Letter,
        UnicodeCategory.NonSpacingMark or UnicodeCategory.SpacingCombiningMark or UnicodeCategory.EnclosingMark => CharKind.Mark,
        UnicodeCategory.DecimalDigitNumber => CharKind.Digit,
        UnicodeCategory.SpaceSeparator => CharKind.Space,
        _ => CharKind.Separator,
    };

    /// <summary>CJK Unified Ideographs (U+4E00-U+9FFF), Extension A (U+3400-U+4DBF), compatibility ideographs
    /// (U+F900-U+FAFF) and the iteration mark U+3005.</summary>
    private static bool IsHanIdeograph(char c) =>
        (c >= '\u4E00' && c <= '\u9FFF') || (c >= '\u3400' && c <= '\u4DBF') || (c >= '\uF900' && c <= '\uFAFF') || c == '\u3005';
}
