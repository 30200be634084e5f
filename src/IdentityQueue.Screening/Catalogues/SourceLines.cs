using System.Buffers;
using System.Text;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>One physical line of a catalogue file: its text, or why it cannot be read (and as much of it as can be shown).</summary>
public readonly record struct SourceLine(int Number, string? Text, string? Problem, string Raw);

/// <summary>
/// Reads a file line by line from bytes, so that a bad line is one rejection and the rest still import: each line is
/// decoded as strict UTF-8 on its own (an invalid byte makes that line a problem, not the file), a line longer than
/// the limit is skipped without being held in memory, and a UTF-8 byte-order mark at the start is dropped.
/// Lines end at '\n', with an optional '\r' before it. Memory stays bounded by the line limit whatever the file holds:
/// a line within the limit is held as its bytes (in a buffer reused from line to line) and its string, nothing more.
/// </summary>
public static class SourceLines
{
    /// <summary>Raw text kept for a rejection (the store's <c>rejection.raw</c>), in characters.</summary>
    public const int RawLimit = 2_000;

    private static readonly UTF8Encoding Lenient = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: false);

    public static IEnumerable<SourceLine> Read(Stream stream, int maxLineLength)
    {
        var reader = new Reader(maxLineLength);
        var buffer = new byte[1 << 16];
        int count;
        while ((count = stream.Read(buffer, 0, buffer.Length)) > 0)
        {
            var position = 0;
            while (position < count)
            {
                var end = reader.Append(buffer.AsSpan(position, count - position));
                if (end < 0) break;
                position += end + 1;
                yield return reader.Finish();
            }
        }
        if (reader.Pending) yield return reader.Finish();
    }

    /// <summary>
    /// The state of one file's reading: the bytes of the current line in fixed-size chunks (no copying as a long line
    /// grows) and its length in UTF-16 chars, counted as the bytes arrive, so that the text is decoded straight into a
    /// string of the right length. A line within the limit costs its bytes once and its string once.
    /// </summary>
    private sealed class Reader(int maxLineLength)
    {
        private const int ChunkSize = 1 << 16;

        // Bytes beyond these are not kept: enough to show the start of an over-long line in its rejection.
        private const int KeptOfLongLine = RawLimit * 4;

        private static readonly UTF8Encoding Strict = new(encoderShouldEmitUTF8Identifier: false, throwOnInvalidBytes: true);

        private readonly List<byte[]> _chunks = [new byte[ChunkSize]];
        private long _kept; // bytes of the line held in the chunks
        private long _lineBytes;
        private long _lineChars; // exact for valid UTF-8: one per byte that starts a sequence, two for a 4-byte sequence
        private int _number;
        private bool _atStart = true;

        public bool Pending => _lineBytes > 0;

        /// <summary>
        /// Takes bytes up to the next '\n' into the current line; returns the index of that '\n', or -1 when there is none.
        /// Once the line has more chars than the limit only its first bytes are kept, so an over-long line costs no memory.
        /// </summary>
        public int Append(ReadOnlySpan<byte> bytes)
        {
            var end = bytes.IndexOf((byte)'\n');
            var piece = end < 0 ? bytes : bytes[..end];
            var tooLong = _lineChars > maxLineLength + 1; // + 1: a final '\r' is not part of the line
            foreach (var b in piece)
            {
                if ((b & 0xC0) != 0x80) _lineChars++;
                if (b >= 0xF0) _lineChars++;
            }
            _lineBytes += piece.Length;
            Keep(tooLong ? piece[..(int)Math.Clamp(KeptOfLongLine - _kept, 0, piece.Length)] : piece);
            return end;
        }

        private void Keep(ReadOnlySpan<byte> piece)
        {
            while (piece.Length > 0)
            {
                var index = (int)(_kept / ChunkSize);
                var offset = (int)(_kept % ChunkSize);
                if (index == _chunks.Count) _chunks.Add(new byte[ChunkSize]);
                var n = Math.Min(piece.Length, ChunkSize - offset);
                piece[..n].CopyTo(_chunks[index].AsSpan(offset));
                piece = piece[n..];
                _kept += n;
            }
        }

        public SourceLine Finish()
        {
            var line = Decode(++_number);
            // Chunks beyond the first are let go: a long line does not pin its memory for the rest of the file.
            if (_chunks.Count > 1) _chunks.RemoveRange(1, _chunks.Count - 1);
            _kept = 0;
            _lineBytes = 0;
            _lineChars = 0;
            return line;
        }

        /// <summary>The kept bytes from <paramref name="start"/> to <paramref name="end"/> as spans, chunk by chunk.</summary>
        private IEnumerable<ReadOnlyMemory<byte>> Pieces(long start, long end)
        {
            for (var at = start; at < end;)
            {
                var offset = (int)(at % ChunkSize);
                var n = (int)Math.Min(ChunkSize - offset, end - at);
                yield return _chunks[(int)(at / ChunkSize)].AsMemory(offset, n);
                at += n;
            }
        }

        private SourceLine Decode(int number)
        {
            long start = 0, end = _kept, lineBytes = _lineBytes, lineChars = _lineChars;
            var first = _chunks[0].AsSpan(0, (int)Math.Min(_kept, ChunkSize));
            if (_atStart)
            {
                _atStart = false;
                if (first.StartsWith("\uFEFF"u8)) { start = 3; lineBytes -= 3; lineChars -= 1; }
            }
            if (end > start && end == _lineBytes && _chunks[(int)((end - 1) / ChunkSize)][(end - 1) % ChunkSize] == '\r')
            {
                end--;
                lineBytes--;
                lineChars--;
            }
            var shown = first[(int)Math.Min(start, first.Length)..(int)Math.Min(end, first.Length)];
            if (lineChars > maxLineLength)
                return new SourceLine(number, null, LineTooLong(lineChars, lineBytes, maxLineLength), Raw(shown, $"{lineBytes} bytes"));
            var text = TryDecode(start, end, (int)lineChars, out var badByte);
            if (text is null)
                return new SourceLine(number, null, $"the line is not valid UTF-8 (byte {badByte + 1} of the line)", Raw(shown, $"{lineBytes} bytes"));
            return new SourceLine(number, text, null, text);
        }

        /// <summary>
        /// Strict UTF-8 decoding of the kept bytes straight into a string of <paramref name="chars"/> chars (no second buffer);
        /// null, with the first bad byte, when they are not valid UTF-8.
        /// </summary>
        private string? TryDecode(long start, long end, int chars, out long badByte)
        {
            _badByte = -1;
            string text;
            try
            {
                text = string.Create(chars, (Reader: this, Start: start, End: end), static (span, state) =>
                {
                    var (reader, start, end) = state;
                    var decoder = Strict.GetDecoder();
                    var written = 0;
                    var at = start;
                    try
                    {
                        foreach (var piece in reader.Pieces(start, end))
                        {
                            decoder.Convert(piece.Span, span[written..], at + piece.Length == end, out var used, out var charsUsed, out _);
                            written += charsUsed;
                            at += used;
                        }
                    }
                    catch (DecoderFallbackException e)
                    {
                        reader._badByte = at - start + Math.Max(0, e.Index);
                        throw;
                    }
                    catch (ArgumentException)
                    {
                        // More chars than counted, which only invalid input gives.
                        reader._badByte = at - start;
                        throw;
                    }
                    if (written != span.Length) reader._badByte = at - start;
                });
            }
            catch (ArgumentException) // DecoderFallbackException is one
            {
                text = "";
            }
            badByte = _badByte;
            return _badByte < 0 ? text : null;
        }

        private long _badByte;
    }

    /// <summary>The limit, the size in characters and in bytes, and what to do (the line number is added by the caller).</summary>
    public static string LineTooLong(long chars, long bytes, int limit) =>
        $"the line is {chars} characters long ({bytes} bytes); the limit MaxLineLength is {limit} characters ({limit / (1024.0 * 1024):0.##} MiB): " +
        "split the entry, or raise the limit";

    /// <summary>Undecodable or over-long bytes, shown with U+FFFD for invalid sequences and cut to <see cref="RawLimit"/>.</summary>
    private static string Raw(ReadOnlySpan<byte> bytes, string size)
    {
        var shown = Lenient.GetString(bytes[..Math.Min(bytes.Length, RawLimit * 4)]);
        return shown.Length <= RawLimit && bytes.Length <= RawLimit * 4 ? shown : Cut(shown, size);
    }

    /// <summary>The text as stored in <c>rejection.raw</c>: at most <see cref="RawLimit"/> characters, saying so when cut.</summary>
    public static string Truncate(string text) => text.Length <= RawLimit ? text : Cut(text, $"{text.Length} characters");

    private static string Cut(string text, string size) => text[..Math.Min(text.Length, RawLimit)] + $" … [truncated; the line has {size}]";
}
