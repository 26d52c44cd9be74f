using System.Globalization;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Parses decimal numbers straight from UTF-8 bytes with invariant rules. The common short forms of word-vector files
/// ("-0.041", "1.5e-3", at most 7 significant digits) take an exact fast path; everything else falls back to
/// <see cref="float.TryParse(ReadOnlySpan{byte}, NumberStyles, IFormatProvider?, out float)"/>, so the result is
/// always the correctly rounded float that .NET's own parser returns.
/// </summary>
internal static class Utf8Number
{
    // Powers of ten exactly representable in float: 10^0 .. 10^10 (10^10 < 2^34, and 5^10 < 2^24, so exact).
    private static readonly float[] PowersOfTen = [1e0f, 1e1f, 1e2f, 1e3f, 1e4f, 1e5f, 1e6f, 1e7f, 1e8f, 1e9f, 1e10f];

    /// <summary>Parses <paramref name="text"/> (no surrounding white space expected) as a float.</summary>
    public static bool TryParseFloat(ReadOnlySpan<byte> text, out float value)
    {
        if (TryParseFast(text, out value)) return true;
        return float.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out value);
    }

    /// <summary>
    /// Exact fast path (Clinger 1990, "How to read floating point numbers accurately", the fast path of section 3):
    /// when the decimal significand m fits in the 24-bit float significand and |e| is at most 10, both m and 10^|e| are
    /// exact floats, so one IEEE multiplication or division rounds the true value m·10^e correctly.
    /// Returns false (no value) for any other form, which the caller hands to the full parser.
    /// </summary>
    internal static bool TryParseFast(ReadOnlySpan<byte> s, out float value)
    {
        value = 0;
        int i = 0, n = s.Length;
        if (n == 0) return false;
        bool negative = false;
        if (s[0] == (byte)'-') { negative = true; i++; }
        else if (s[0] == (byte)'+') i++;

        ulong mantissa = 0;
        int significant = 0;   // digits accumulated into mantissa after leading zeros
        int exponent = 0;      // decimal exponent adjustment from digits after the point
        int digits = 0;        // digits seen at all (integer and fraction part)
        while (i < n && (uint)(s[i] - '0') <= 9)
        {
            if (mantissa != 0 || s[i] != (byte)'0') { mantissa = mantissa * 10 + (uint)(s[i] - '0'); significant++; }
            i++; digits++;
        }
        if (i < n && s[i] == (byte)'.')
        {
            i++;
            while (i < n && (uint)(s[i] - '0') <= 9)
            {
                if (mantissa != 0 || s[i] != (byte)'0') { mantissa = mantissa * 10 + (uint)(s[i] - '0'); significant++; }
                exponent--; i++; digits++;
            }
        }
        if (digits == 0 || significant > 18) return false; // no digits, or a significand that might overflow: full parser
        if (i < n && (s[i] == (byte)'e' || s[i] == (byte)'E'))
        {
            i++;
            bool expNegative = false;
            if (i < n && (s[i] == (byte)'-' || s[i] == (byte)'+')) { expNegative = s[i] == (byte)'-'; i++; }
            int expStart = i, explicitExp = 0;
            while (i < n && (uint)(s[i] - '0') <= 9)
            {
                if (explicitExp < 100_000) explicitExp = explicitExp * 10 + (s[i] - '0');
                i++;
            }
            if (i == expStart) return false;
            exponent += expNegative ? -explicitExp : explicitExp;
        }
        if (i != n) return false; // trailing characters: let the full parser decide (it rejects them)

        if (mantissa == 0) { value = negative ? -0f : 0f; return true; }
        if (mantissa > (1UL << 24) || exponent < -10 || exponent > 10) return false;
        float m = mantissa;
        float result = exponent < 0 ? m / PowersOfTen[-exponent] : m * PowersOfTen[exponent];
        value = negative ? -result : result;
        return true;
    }
}
