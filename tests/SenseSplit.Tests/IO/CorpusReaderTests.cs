using System.IO.Compression;
using System.Text;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Text;

namespace SenseSplit.Tests.IO;

public class CorpusReaderTests
{
    /// <summary>Records tokens, "|" for a line break and "¶" for a paragraph break.</summary>
    private sealed class Recorder : ITokenSink
    {
        public readonly List<string> Items = new();
        public void Token(ReadOnlySpan<char> token) => Items.Add(token.ToString());
        public void LineBreak() => Items.Add("|");
        public void ParagraphBreak() => Items.Add("¶");
    }

    private static (List<string> Items, long Invalid, TokenScanner Scanner) Read(string path, bool gzip = false, TokenizerOptions? options = null)
    {
        var reader = new CorpusReader();
        var scanner = new TokenScanner(options ?? new TokenizerOptions());
        var sink = new Recorder();
        reader.Read(new CorpusInput("x", path, new FileInfo(path).Length, gzip), scanner, sink);
        return (sink.Items, reader.InvalidBytes, scanner);
    }

    [Fact]
    public void Read_InvalidUtf8_ReplacedSeparatesTokensAndCounted()
    {
        // Ill-formed sequences of the Unicode Standard, §3.9 (Table 3-7 gives the well-formed byte sequences): a byte
        // that never occurs (FF), a lead byte cut short (C3, E2 82), an overlong form (C0 80), an encoded surrogate
        // (ED A0 80), a lone continuation byte (80), a four-byte sequence cut off by the end of the file (F0 9F 98).
        // Each becomes U+FFFD, which separates tokens; every byte of them is counted.
        using var t = new TempFolder();
        byte[] bytes =
        [
            .. "ab"u8, 0xFF, .. "cd"u8, 0xC3, .. " ef"u8, 0xE2, 0x82, .. "gh"u8, 0xC0, 0x80, .. "ij"u8,
            0xED, 0xA0, 0x80, .. "kl"u8, 0x80, .. "mn"u8, 0xF0, 0x9F, 0x98,
        ];
        var (items, invalid, _) = Read(t.WriteBytes("bad.txt", bytes));
        Assert.Equal(["ab", "cd", "ef", "gh", "ij", "kl", "mn", "|", "¶"], items);
        Assert.Equal(1 + 1 + 2 + 2 + 3 + 1 + 3, invalid);
    }

    [Fact]
    public void Read_OnlyGarbage_NoTokensNoCrash()
    {
        using var t = new TempFolder();
        var rng = new Random(9);
        var bytes = new byte[300_000];
        rng.NextBytes(bytes);
        var (items, invalid, _) = Read(t.WriteBytes("noise.bin", bytes));
        Assert.True(invalid > 100_000, $"{invalid} invalid bytes");
        Assert.Equal("¶", items[^1]);
    }

    [Fact]
    public void Read_MultiByteCharacterAcrossReadChunks_DecodedWhole()
    {
        // The reader decodes 1 MiB at a time: "é" (C3 A9) straddles that edge inside the token "xéy".
        using var t = new TempFolder();
        string text = new string('a', (1 << 20) - 3) + " xéy €z";
        Assert.Equal((1 << 20) - 1, Encoding.UTF8.GetByteCount(text[..text.IndexOf('é')]));
        var (items, invalid, scanner) = Read(t.Write("edge.txt", text));
        Assert.Equal(0, invalid);
        Assert.Equal(["xéy", "z", "|", "¶"], items);
        Assert.Equal(1, scanner.OverlongTokens); // the run of a's
    }

    [Fact]
    public void Read_ByteOrderMarkAndCrlf_DroppedAndOneLineEndEach()
    {
        using var t = new TempFolder();
        var (items, invalid, _) = Read(t.WriteBytes("bom.txt", [0xEF, 0xBB, 0xBF, .. "Un\r\ndeux\r\n\r\ntrois\r\n"u8]));
        Assert.Equal(0, invalid);
        Assert.Equal(["un", "|", "deux", "|", "¶", "trois", "|", "¶"], items);
    }

    [Fact]
    public void Read_GzipByContent_WhateverTheName()
    {
        using var t = new TempFolder();
        string path = t.File("plain-looking.txt");
        using (var f = File.Create(path))
        using (var z = new GZipStream(f, CompressionLevel.Fastest))
            z.Write("zipped words\n"u8);
        var inputs = CorpusSource.Resolve([path], () => Stream.Null, t.File("spool"));
        Assert.True(inputs[0].Gzip);
        var (items, _, _) = Read(path, gzip: true);
        Assert.Equal(["zipped", "words", "|", "¶"], items);
    }

    [Fact]
    public void Read_VeryLongLine_StreamedWithOverlongRunDropped()
    {
        // 5 MB on one line (five read chunks) with a 250-letter run that crosses a chunk edge.
        using var t = new TempFolder();
        var sb = new StringBuilder();
        long expected = 0;
        while (sb.Length < 5_000_000)
        {
            if (sb.Length is > 2_097_000 and < 2_097_006) sb.Append('q', 250).Append(' ');
            sb.Append("word ");
            expected++;
        }
        var (items, _, scanner) = Read(t.Write("long.txt", sb.ToString()));
        Assert.Equal(expected, items.Count(i => i == "word"));
        Assert.Equal(1, scanner.OverlongTokens);
        Assert.Equal(["|", "¶"], items.TakeLast(2));
        Assert.DoesNotContain(items, i => i.StartsWith('q'));
    }
}
