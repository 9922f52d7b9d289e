using System.Buffers.Binary;
using System.IO.Compression;

namespace StandFit.Tests.Support;

/// <summary>A small PNG decoder for screenshots: 8-bit RGB or RGBA, non-interlaced (what Chromium writes); pixels as 0xRRGGBBAA.</summary>
public sealed class Png
{
    private Png(int width, int height, uint[] pixels)
    {
        Width = width;
        Height = height;
        Pixels = pixels;
    }

    public int Width { get; }

    public int Height { get; }

    public uint[] Pixels { get; }

    public static Png Decode(byte[] bytes)
    {
        ReadOnlySpan<byte> signature = [0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A];
        if (!bytes.AsSpan(0, 8).SequenceEqual(signature))
        {
            throw new InvalidDataException("Not a PNG file.");
        }

        int width = 0, height = 0, colourType = -1;
        using var idat = new MemoryStream();
        var at = 8;
        while (at + 8 <= bytes.Length)
        {
            var length = (int)BinaryPrimitives.ReadUInt32BigEndian(bytes.AsSpan(at));
            var type = System.Text.Encoding.ASCII.GetString(bytes, at + 4, 4);
            var data = bytes.AsSpan(at + 8, length);
            if (type == "IHDR")
            {
                width = (int)BinaryPrimitives.ReadUInt32BigEndian(data);
                height = (int)BinaryPrimitives.ReadUInt32BigEndian(data[4..]);
                if (data[8] != 8 || data[12] != 0)
                {
                    throw new InvalidDataException("Only 8-bit, non-interlaced PNG files are read here.");
                }

                colourType = data[9];
            }
            else if (type == "IDAT")
            {
                idat.Write(data);
            }
            else if (type == "IEND")
            {
                break;
            }

            at += 12 + length;
        }

        var channels = colourType switch { 2 => 3, 6 => 4, _ => throw new InvalidDataException($"PNG colour type {colourType} is not read here.") };
        idat.Position = 0;
        using var inflated = new MemoryStream();
        using (var z = new ZLibStream(idat, CompressionMode.Decompress))
        {
            z.CopyTo(inflated);
        }

        var raw = inflated.ToArray();
        var stride = width * channels;
        var previous = new byte[stride];
        var row = new byte[stride];
        var pixels = new uint[width * height];
        for (var y = 0; y < height; y++)
        {
            var filter = raw[y * (stride + 1)];
            Array.Copy(raw, (y * (stride + 1)) + 1, row, 0, stride);
            for (var i = 0; i < stride; i++)
            {
                int left = i >= channels ? row[i - channels] : 0;
                int up = previous[i];
                int upLeft = i >= channels ? previous[i - channels] : 0;
                row[i] = (byte)(row[i] + filter switch
                {
                    0 => 0,
                    1 => left,
                    2 => up,
                    3 => (left + up) / 2,
                    4 => Paeth(left, up, upLeft),
                    _ => throw new InvalidDataException($"PNG filter {filter} is not defined."),
                });
            }

            for (var x = 0; x < width; x++)
            {
                var o = x * channels;
                var alpha = channels == 4 ? row[o + 3] : (byte)255;
                pixels[(y * width) + x] = ((uint)row[o] << 24) | ((uint)row[o + 1] << 16) | ((uint)row[o + 2] << 8) | alpha;
            }

            (previous, row) = (row, previous);
        }

        return new Png(width, height, pixels);
    }

    private static int Paeth(int a, int b, int c)
    {
        var p = a + b - c;
        var pa = Math.Abs(p - a);
        var pb = Math.Abs(p - b);
        var pc = Math.Abs(p - c);
        return pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
    }
}
