using System.Globalization;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Parses decimal numbers straight from UTF-8 bytes with invariant rules. The common short forms of word-vector files
/// ("-0.041", "1.5e-3", "0.41242313": at most 15 significant digits, small exponents) take an exact fast path; everything else falls back to
/// <see cref="float.TryParse(ReadOnlySpan{byte}, NumberStyles, IFormatProvider?, out float)"/>, so the result is
/// always the correctly rounded float that .NET's own parser returns.
/// </summary>
internal static class Utf8Number
{
    // Powers of ten exactly representable in double: 10^0 .. 10^22 (5^22 < 2^53).
    private static readonly double[] PowersOfTen =
        [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

    /// <summary>Parses <paramref name="text"/> (no surrounding white space expected) as a float.</summary>
    public static bool TryParseFloat(ReadOnlySpan<byte> text, out float value)
    {
        if (TryParseFast(text, out value)) return true;
        return float.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out value);
    }

    /// <summary>
    /// Exact fast path. Step 1 (Clinger 1990, "How to read floating point numbers accurately", PLDI, the fast path of
    /// section 3): when the decimal significand m is at most 2^53 and |e| at most 22, m and 10^|e| are exact doubles, so
    /// one IEEE multiplication or division gives d, the double nearest to the true value x = m·10^e.
    /// Step 2: (float)d is the float nearest to x unless d is exactly halfway between two floats. Proof: every float
    /// midpoint in this range is itself a double (25 significant bits); a midpoint strictly between x and d would be a
    /// double nearer to x than d. So the only unsafe case is d == a midpoint, which is detected from the 29 low
    /// significand bits (exactly 1 followed by 28 zeros) and handed to the full parser.
    /// Values stay inside float's normal range here (1e-22 ≤ |x| ≤ 2^53·1e22 &lt; 3.4e38), so no subnormal cases arise.
    /// Returns false (no value) for any other form, which the caller hands to the full parser.
    /// </summary>
    internal static bool TryParseFast(ReadOnlySpan<byte> s, out float value)
        => TryParseFastPrefix(s, out value, out int used) && used == s.Length;

    /// <summary>The fast path over the longest number-shaped prefix of <paramref name="s"/> (one pass over the bytes:
    /// the text reader calls it at a token start and checks that a blank or the line end follows).
    /// <paramref name="used"/> is the prefix length.</summary>
    internal static bool TryParseFastPrefix(ReadOnlySpan<byte> s, out float value, out int used)
    {
        value = 0;
        used = 0;
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
        used = i;

        if (mantissa == 0) { value = negative ? -0f : 0f; return true; }
        if (mantissa > (1UL << 53) || exponent < -22 || exponent > 22) return false;
        double d = exponent < 0 ? mantissa / PowersOfTen[-exponent] : mantissa * PowersOfTen[exponent];
        const ulong LowBits = (1UL << 29) - 1, Half = 1UL << 28; // the 29 significand bits float drops, and half its ulp
        if ((BitConverter.DoubleToUInt64Bits(d) & LowBits) == Half) return false;
        float result = (float)d;
        value = negative ? -result : result;
        return true;
    }
}
