using System.Globalization;
using System.Text;
using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.IO;

public class Utf8NumberTests
{
    // Reference: .NET's float.Parse, which returns the correctly rounded IEEE 754 binary32 value since .NET Core 3.0
    // (common practice to treat it as the reference). Compared bit for bit, so -0 and rounding ties count.
    private static void AssertSameAsFloatParse(string text)
    {
        bool ok = Utf8Number.TryParseFloat(Encoding.UTF8.GetBytes(text), out float ours);
        bool refOk = float.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out float expected);
        Assert.True(refOk == ok, $"'{text}': accepted {ok}, float.Parse accepted {refOk}");
        if (ok) Assert.True(BitConverter.SingleToInt32Bits(expected) == BitConverter.SingleToInt32Bits(ours),
            $"'{text}': got {ours:R}, float.Parse gives {expected:R}");
    }

    [Fact]
    public void TryParseFloat_RandomDecimalForms_MatchFloatParseBitForBit()
    {
        var rnd = new Random(12345);
        for (int n = 0; n < 200_000; n++)
        {
            var sb = new StringBuilder();
            int sign = rnd.Next(3);
            if (sign == 1) sb.Append('-'); else if (sign == 2 && rnd.Next(4) == 0) sb.Append('+');
            int intDigits = rnd.Next(0, 9), fracDigits = rnd.Next(0, 12);
            if (intDigits == 0 && fracDigits == 0) intDigits = 1;
            for (int i = 0; i < intDigits; i++) sb.Append((char)('0' + rnd.Next(10)));
            if (fracDigits > 0 || rnd.Next(5) == 0)
            {
                sb.Append('.');
                for (int i = 0; i < fracDigits; i++) sb.Append((char)('0' + rnd.Next(10)));
            }
            if (rnd.Next(4) == 0)
            {
                sb.Append(rnd.Next(2) == 0 ? 'e' : 'E');
                int es = rnd.Next(3);
                if (es == 1) sb.Append('-'); else if (es == 2) sb.Append('+');
                sb.Append(rnd.Next(0, 45).ToString(CultureInfo.InvariantCulture));
            }
            AssertSameAsFloatParse(sb.ToString());
        }
    }

    [Fact]
    public void TryParseFloat_RoundTripOfRandomFloats_MatchFloatParse()
    {
        var rnd = new Random(7);
        for (int n = 0; n < 100_000; n++)
        {
            float f = (float)((rnd.NextDouble() * 2 - 1) * Math.Pow(10, rnd.Next(-8, 8)));
            AssertSameAsFloatParse(f.ToString("R", CultureInfo.InvariantCulture));
            AssertSameAsFloatParse(f.ToString("F6", CultureInfo.InvariantCulture));
            AssertSameAsFloatParse(f.ToString("E5", CultureInfo.InvariantCulture));
        }
    }

    [Fact]
    public void TryParseFloat_NearFloatMidpoints_MatchFloatParse()
    {
        // Decimal strings at, just below and just above the exact midpoint between two adjacent floats: the cases
        // where converting through double could round twice (the fast path must hand the exact ties on).
        var rnd = new Random(99);
        for (int n = 0; n < 50_000; n++)
        {
            float f = (float)((rnd.NextDouble() * 2 - 1) * Math.Pow(10, rnd.Next(-6, 9)));
            double mid = ((double)f + MathF.BitIncrement(f)) / 2; // exact in double (25 significant bits)
            string r = mid.ToString("R", CultureInfo.InvariantCulture);
            AssertSameAsFloatParse(r);
            AssertSameAsFloatParse(mid.ToString("E14", CultureInfo.InvariantCulture));
            AssertSameAsFloatParse(Math.BitIncrement(mid).ToString("R", CultureInfo.InvariantCulture));
            AssertSameAsFloatParse(Math.BitDecrement(mid).ToString("R", CultureInfo.InvariantCulture));
        }
    }

    [Theory]
    // Edges of the exact fast path: limits of the significand (2^53) and exponent (22), and float ties.
    [InlineData("16777216")]
    [InlineData("16777217")]
    [InlineData("1.6777217")]
    [InlineData("9007199254740992")]
    [InlineData("9007199254740993")]
    [InlineData("1e22")]
    [InlineData("1e-22")]
    [InlineData("1e23")]
    [InlineData("16777217.000001")]
    [InlineData("16777219")]
    [InlineData("1e10")]
    [InlineData("1e11")]
    [InlineData("1e-10")]
    [InlineData("1e-11")]
    [InlineData("0.1")]
    [InlineData("-0")]
    [InlineData("-0.0")]
    [InlineData("0e999999")]
    [InlineData("000000000000000000000000000012.5")]
    [InlineData("0.00000000000000000000000001")]
    [InlineData("3.4028235e38")]
    [InlineData("3.4028236e38")]
    [InlineData("1.4e-45")]
    [InlineData("123456789012345678901234567890")]
    [InlineData(".5")]
    [InlineData("5.")]
    [InlineData("+7")]
    public void TryParseFloat_EdgeCases_MatchFloatParse(string text) => AssertSameAsFloatParse(text);

    [Theory]
    [InlineData("")]
    [InlineData("-")]
    [InlineData(".")]
    [InlineData("abc")]
    [InlineData("1.2.3")]
    [InlineData("1e")]
    [InlineData("e5")]
    [InlineData("1,5")]
    [InlineData("0x10")]
    public void TryParseFloat_NotANumber_Rejected(string text)
    {
        Assert.False(Utf8Number.TryParseFloat(Encoding.UTF8.GetBytes(text), out _));
        AssertSameAsFloatParse(text);
    }

    [Theory]
    [InlineData("0.418", true)]
    [InlineData("-0.41242", true)]
    [InlineData("2e-1", true)]
    [InlineData("0.41242313", true)]
    [InlineData("1e11", true)]
    [InlineData("16777217", false)] // exactly halfway between the floats 2^24 and 2^24+2: full parser
    [InlineData("1e23", false)]
    [InlineData("12345678901234567", false)]
    [InlineData("NaN", false)]
    public void TryParseFast_CommonFormsTakeFastPath(string text, bool fast)
        => Assert.Equal(fast, Utf8Number.TryParseFast(Encoding.UTF8.GetBytes(text), out _));
}
