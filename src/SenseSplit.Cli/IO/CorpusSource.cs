using System.IO.Compression;
using System.Security.Cryptography;
using System.Text;
using SenseSplit.Core.Text;

namespace SenseSplit.Cli.IO;

/// <summary>One input of a corpus: a file (plain UTF-8 or gzip) or standard input spooled to a temporary file.</summary>
/// <param name="Name">What messages and the manifest call it: the path as given, or "-" for standard input.</param>
/// <param name="Path">The file that is read.</param>
public sealed record CorpusInput(string Name, string Path, long Bytes, bool Gzip);

/// <summary>Finds the corpus files named on the command line: files as given, folders searched recursively for
/// <c>*.txt</c> and <c>*.txt.gz</c> (ordinal order of their paths), "-" for standard input.</summary>
public static class CorpusSource
{
    public static List<CorpusInput> Resolve(IReadOnlyList<string> arguments, Func<Stream> standardInput, string spoolFolder)
    {
        var inputs = new List<CorpusInput>();
        bool sawStdin = false;
        foreach (var arg in arguments)
        {
            if (arg == "-")
            {
                if (sawStdin) throw new UserFacingException("standard input ('-') is named more than once", ExitCodes.Usage);
                sawStdin = true;
                Directory.CreateDirectory(spoolFolder);
                string spool = System.IO.Path.Combine(spoolFolder, "stdin.txt");
                using (var input = standardInput())
                using (var output = new FileStream(spool, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 20))
                    input.CopyTo(output, 1 << 20);
                var info = new FileInfo(spool);
                inputs.Add(new CorpusInput("-", spool, info.Length, IsGzip(spool)));
            }
            else if (Directory.Exists(arg))
            {
                var files = Directory.EnumerateFiles(arg, "*", new EnumerationOptions { RecurseSubdirectories = true, IgnoreInaccessible = false, AttributesToSkip = FileAttributes.None })
                    .Where(f => f.EndsWith(".txt", StringComparison.OrdinalIgnoreCase) || f.EndsWith(".txt.gz", StringComparison.OrdinalIgnoreCase))
                    .OrderBy(f => f, StringComparer.Ordinal)
                    .ToList();
                if (files.Count == 0) throw new UserFacingException($"folder {arg}: no *.txt or *.txt.gz files in it or below it");
                foreach (var f in files) inputs.Add(new CorpusInput(f, f, new FileInfo(f).Length, IsGzip(f)));
            }
            else if (File.Exists(arg))
            {
                inputs.Add(new CorpusInput(arg, arg, new FileInfo(arg).Length, IsGzip(arg)));
            }
            else throw new UserFacingException($"input not found: {arg}");
        }
        if (inputs.Count == 0) throw new UserFacingException("no input: name corpus files, folders or '-' for standard input", ExitCodes.Usage);
        return inputs;
    }

    /// <summary>Gzip by content (magic bytes 1f 8b), whatever the name; dictzip files are gzip too.</summary>
    private static bool IsGzip(string path)
    {
        try
        {
            using var f = File.OpenRead(path);
            return f.ReadByte() == 0x1f && f.ReadByte() == 0x8b;
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new UserFacingException($"input {path}: cannot be read ({ex.Message})");
        }
    }
}

/// <summary>Decodes a corpus file as UTF-8 in chunks (no line is ever held whole) and feeds a <see cref="TokenScanner"/>.
/// Invalid byte sequences become U+FFFD (which separates tokens) and are counted.</summary>
public sealed class CorpusReader
{
    private const int ByteBuffer = 1 << 20;
    private readonly byte[] _bytes = new byte[ByteBuffer];
    private readonly char[] _chars = new char[ByteBuffer + TokenScanner.MaxTokenLength + 64];
    private readonly CountingFallback _fallback = new();
    private readonly Encoding _encoding;

    public CorpusReader()
    {
        var utf8 = (Encoding)new UTF8Encoding(false).Clone();
        utf8.DecoderFallback = _fallback;
        _encoding = utf8;
    }

    /// <summary>Invalid UTF-8 bytes replaced so far.</summary>
    public long InvalidBytes => _fallback.Count;

    /// <summary>Reads one input through the scanner into the sink; returns the SHA-256 (hex) of the file's bytes.</summary>
    /// <param name="onBytes">Called with the count of file bytes read so far in this file (for progress).</param>
    public string Read(CorpusInput input, TokenScanner scanner, ITokenSink sink, Action<long>? onBytes = null)
    {
        FileStream file;
        try { file = new FileStream(input.Path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan); }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new UserFacingException($"input {input.Name}: cannot be opened ({ex.Message})");
        }
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        using (file)
        {
            var hashing = new HashingStream(file, hash);
            Stream stream = input.Gzip ? new GZipStream(hashing, CompressionMode.Decompress) : hashing;
            using (stream)
            {
                var decoder = _encoding.GetDecoder();
                int carry = 0;
                try
                {
                    while (true)
                    {
                        int n = stream.Read(_bytes, 0, _bytes.Length);
                        bool final = n == 0;
                        int decoded = decoder.GetChars(_bytes, 0, n, _chars, carry, flush: final);
                        int total = carry + decoded;
                        int used = scanner.Scan(_chars.AsSpan(0, total), final, sink);
                        carry = total - used;
                        if (carry > 0) Array.Copy(_chars, used, _chars, 0, carry);
                        onBytes?.Invoke(file.Position);
                        if (final) break;
                    }
                }
                catch (InvalidDataException ex)
                {
                    throw new UserFacingException($"input {input.Name}: not a readable gzip stream ({ex.Message})");
                }
                catch (IOException ex)
                {
                    throw new UserFacingException($"input {input.Name}: read failed ({ex.Message})");
                }
                scanner.EndDocument(sink);
            }
            // Hash the whole file even if the decompressor stopped before its end.
            while (hashing.Read(_bytes, 0, _bytes.Length) > 0) { }
        }
        return Convert.ToHexStringLower(hash.GetHashAndReset());
    }

    /// <summary>Counts the bytes it replaces with U+FFFD.</summary>
    private sealed class CountingFallback : DecoderFallback
    {
        public long Count;
        public override int MaxCharCount => 1;
        public override DecoderFallbackBuffer CreateFallbackBuffer() => new Buffer(this);

        private sealed class Buffer(CountingFallback owner) : DecoderFallbackBuffer
        {
            private bool _pending;
            public override int Remaining => _pending ? 1 : 0;

            public override bool Fallback(byte[] bytesUnknown, int index)
            {
                owner.Count += bytesUnknown.Length;
                _pending = true;
                return true;
            }

            public override char GetNextChar()
            {
                if (!_pending) return '\0';
                _pending = false;
                return '\uFFFD';
            }

            public override bool MovePrevious() => false;
            public override void Reset() => _pending = false;
        }
    }

    /// <summary>Passes reads through and hashes every byte read.</summary>
    private sealed class HashingStream(Stream inner, IncrementalHash hash) : Stream
    {
        public override bool CanRead => true;
        public override bool CanSeek => false;
        public override bool CanWrite => false;
        public override long Length => inner.Length;
        public override long Position { get => inner.Position; set => throw new NotSupportedException(); }
        public override void Flush() { }
        public override int Read(byte[] buffer, int offset, int count)
        {
            int n = inner.Read(buffer, offset, count);
            if (n > 0) hash.AppendData(buffer, offset, n);
            return n;
        }
        public override int Read(Span<byte> buffer)
        {
            int n = inner.Read(buffer);
            if (n > 0) hash.AppendData(buffer[..n]);
            return n;
        }
        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();
        public override void SetLength(long value) => throw new NotSupportedException();
        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
        protected override void Dispose(bool disposing) { }
    }
}
