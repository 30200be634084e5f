using System.Buffers;
using System.Text;
using System.Text.Unicode;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Store.Import;

/// <summary>One physical line of a catalogue file: its text, or why it cannot be read (and as much of it as can be shown).</summary>
internal readonly record struct SourceLine(int Number, string? Text, string? Problem, string Raw);

/// <summary>
/// Reads a file line by line from bytes, so that a bad line is one rejection and the rest still import: each line is
/// decoded as strict UTF-8 on its own (an invalid byte makes that line a problem, not the file), a line longer than
/// the limit is skipped without being held in memory, and a UTF-8 byte-order mark at the start is dropped.
/// Lines end at '\n', with an optional '\r' before it. Memory stays bounded by the line limit whatever the file holds.
/// </summary>
internal static class SourceLines
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

    /// <summary>The state of one file's reading: the bytes of the current line and the decoding buffer.</summary>
    private sealed class Reader(int maxLineLength)
    {
        // A line of at most maxLineLength UTF-16 chars has at most 3 bytes per char (a surrogate pair is 4 bytes for 2 chars),
        // so more bytes than that is too long for certain; the exact char count is checked after decoding.
        private readonly long _byteLimit = (long)maxLineLength * 3;
        private readonly ArrayBufferWriter<byte> _line = new(1 << 12);
        private char[] _chars = [];
        private long _lineBytes;
        private int _number;
        private bool _atStart = true;

        public bool Pending => _lineBytes > 0;

        /// <summary>Takes bytes up to the next '\n' into the current line; returns the index of that '\n', or -1 when there is none.</summary>
        public int Append(ReadOnlySpan<byte> bytes)
        {
            var end = bytes.IndexOf((byte)'\n');
            var piece = end < 0 ? bytes : bytes[..end];
            // Past the limit nothing more is kept: the first bytes are enough to show in the rejection.
            var room = (int)Math.Min(piece.Length, Math.Max(0, _byteLimit + 1 - _line.WrittenCount));
            if (room > 0) _line.Write(piece[..room]);
            _lineBytes += piece.Length;
            return end;
        }

        public SourceLine Finish()
        {
            var line = Decode(++_number, _line.WrittenSpan, _lineBytes);
            _line.Clear();
            _lineBytes = 0;
            return line;
        }

        private SourceLine Decode(int number, ReadOnlySpan<byte> bytes, long lineBytes)
        {
            if (_atStart)
            {
                _atStart = false;
                if (bytes.StartsWith("\uFEFF"u8)) { bytes = bytes[3..]; lineBytes -= 3; }
            }
            if (lineBytes > _byteLimit)
                return new SourceLine(number, null,
                    $"the line is more than {maxLineLength} characters long ({lineBytes} bytes); the limit MaxLineLength is {maxLineLength}",
                    Raw(bytes, $"{lineBytes} bytes"));
            if (bytes.Length > 0 && bytes[^1] == '\r') bytes = bytes[..^1];
            if (_chars.Length < bytes.Length) _chars = new char[Math.Max(bytes.Length, _chars.Length * 2)];
            var status = Utf8.ToUtf16(bytes, _chars, out var read, out var written, replaceInvalidSequences: false);
            if (status != OperationStatus.Done)
                return new SourceLine(number, null, $"the line is not valid UTF-8 (byte {read + 1} of the line)", Raw(bytes, $"{bytes.Length} bytes"));
            var text = new string(_chars, 0, written);
            if (text.Length > maxLineLength)
                return new SourceLine(number, null, SyntaxMessages.LineTooLong(text.Length, maxLineLength), Truncate(text));
            return new SourceLine(number, text, null, text);
        }
    }

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
