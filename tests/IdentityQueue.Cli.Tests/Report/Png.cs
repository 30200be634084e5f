using System.Buffers.Binary;
using System.IO.Compression;

namespace IdentityQueue.Cli.Tests.Report;

/// <summary>
/// A minimal PNG reader for screenshots: 8-bit greyscale, RGB or RGBA, not interlaced (what Chromium writes). Follows the
/// PNG specification (W3C, 2nd edition): chunks, zlib-compressed IDAT, per-row filters 0–4 with the Paeth predictor.
/// </summary>
internal sealed class Png
{
    public required int Width { get; init; }
    public required int Height { get; init; }
    /// <summary>Pixels row by row, each packed as 0xRRGGBBAA.</summary>
    public required uint[] Pixels { get; init; }

    public static Png Read(byte[] file)
    {
        ReadOnlySpan<byte> signature = [137, 80, 78, 71, 13, 10, 26, 10];
        if (!file.AsSpan(0, 8).SequenceEqual(signature)) throw new InvalidDataException("not a PNG file");
        int width = 0, height = 0, channels = 0;
        using var idat = new MemoryStream();
        for (var at = 8; at + 8 <= file.Length;)
        {
            var length = BinaryPrimitives.ReadInt32BigEndian(file.AsSpan(at));
            var type = System.Text.Encoding.ASCII.GetString(file, at + 4, 4);
            var data = file.AsSpan(at + 8, length);
            if (type == "IHDR")
            {
                width = BinaryPrimitives.ReadInt32BigEndian(data);
                height = BinaryPrimitives.ReadInt32BigEndian(data[4..]);
                var (depth, color, interlace) = (data[8], data[9], data[12]);
                if (depth != 8 || interlace != 0) throw new InvalidDataException($"unsupported PNG: depth {depth}, interlace {interlace}");
                channels = color switch { 0 => 1, 2 => 3, 4 => 2, 6 => 4, _ => throw new InvalidDataException($"unsupported PNG colour type {color}") };
            }
            else if (type == "IDAT") idat.Write(data);
            else if (type == "IEND") break;
            at += 12 + length;
        }
        idat.Position = 0;
        using var inflated = new MemoryStream();
        using (var z = new ZLibStream(idat, CompressionMode.Decompress)) z.CopyTo(inflated);
        var raw = inflated.ToArray();
        var stride = width * channels;
        var previous = new byte[stride];
        var row = new byte[stride];
        var pixels = new uint[width * height];
        for (var y = 0; y < height; y++)
        {
            var filter = raw[y * (stride + 1)];
            var line = raw.AsSpan(y * (stride + 1) + 1, stride);
            for (var i = 0; i < stride; i++)
            {
                int a = i >= channels ? row[i - channels] : 0, b = previous[i], c = i >= channels ? previous[i - channels] : 0;
                var predicted = filter switch
                {
                    0 => 0,
                    1 => a,
                    2 => b,
                    3 => (a + b) / 2,
                    4 => Paeth(a, b, c),
                    _ => throw new InvalidDataException($"bad PNG filter {filter}"),
                };
                row[i] = (byte)(line[i] + predicted);
            }
            for (var x = 0; x < width; x++)
            {
                var p = row.AsSpan(x * channels, channels);
                pixels[y * width + x] = channels switch
                {
                    1 => (uint)(p[0] << 24 | p[0] << 16 | p[0] << 8 | 0xFF),
                    2 => (uint)(p[0] << 24 | p[0] << 16 | p[0] << 8 | p[1]),
                    3 => (uint)(p[0] << 24 | p[1] << 16 | p[2] << 8 | 0xFF),
                    _ => (uint)(p[0] << 24 | p[1] << 16 | p[2] << 8 | p[3]),
                };
            }
            (previous, row) = (row, previous);
        }
        return new Png { Width = width, Height = height, Pixels = pixels };
    }

    private static int Paeth(int a, int b, int c)
    {
        var p = a + b - c;
        int pa = Math.Abs(p - a), pb = Math.Abs(p - b), pc = Math.Abs(p - c);
        return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
    }
}
