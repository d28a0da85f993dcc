using System.Buffers.Binary;
using System.Runtime.InteropServices;

namespace SignalInspect.Capture;

/// <summary>
/// Turns frames of stored codes into samples in full-scale units. A frame holds one sample of
/// every channel; the decoder picks the components that make the delivered signal: (I, Q) for a
/// complex output, one component for a real output.
/// </summary>
internal sealed class SampleDecoder
{
    private readonly SampleFormat _format;
    private readonly int _frameComponents;
    private readonly int[] _pick;
    private readonly bool _identity;
    private double[] _scratch = [];

    /// <param name="format">Encoding of each stored component.</param>
    /// <param name="frameComponents">Components in one frame (channels x components per channel sample).</param>
    /// <param name="pick">Frame component indices that make one output sample, in output order.</param>
    public SampleDecoder(SampleFormat format, int frameComponents, int[] pick)
    {
        _format = format;
        _frameComponents = frameComponents;
        _pick = pick;
        _identity = pick.Length == frameComponents && pick.Select((p, i) => p == i).All(x => x);
    }

    /// <summary>Bytes in one frame.</summary>
    public int FrameBytes => _frameComponents * _format.BytesPerComponent;

    /// <summary>Values written per output sample (2 complex, 1 real).</summary>
    public int OutputComponents => _pick.Length;

    /// <summary>Decodes whole frames from <paramref name="bytes"/> into <paramref name="output"/>; returns frames decoded.</summary>
    public int Decode(ReadOnlySpan<byte> bytes, Span<double> output)
    {
        int frames = Math.Min(bytes.Length / FrameBytes, output.Length / _pick.Length);
        if (_identity)
        {
            DecodeComponents(bytes[..(frames * FrameBytes)], output[..(frames * _frameComponents)]);
            return frames;
        }
        int need = frames * _frameComponents;
        if (_scratch.Length < need) _scratch = new double[need];
        Span<double> all = _scratch.AsSpan(0, need);
        DecodeComponents(bytes[..(frames * FrameBytes)], all);
        int k = 0;
        for (int f = 0; f < frames; f++)
        {
            int b = f * _frameComponents;
            foreach (int p in _pick) output[k++] = all[b + p];
        }
        return frames;
    }

    private void DecodeComponents(ReadOnlySpan<byte> src, Span<double> dst)
    {
        bool swap = _format.BigEndian == BitConverter.IsLittleEndian;
        double inv = 1.0 / _format.CodeFullScale;
        double off = _format.UnsignedOffset;
        // Unsigned codes divide by a full scale that is not a power of two: divide (exactly as defined) rather than multiply by a rounded inverse.
        double fullScale = _format.CodeFullScale;
        int n = dst.Length;
        switch (_format.Encoding)
        {
            case ComponentEncoding.Float32:
                if (!swap)
                {
                    ReadOnlySpan<float> f = MemoryMarshal.Cast<byte, float>(src);
                    for (int i = 0; i < n; i++) dst[i] = f[i];
                }
                else
                {
                    for (int i = 0; i < n; i++) dst[i] = BinaryPrimitives.ReadSingleBigEndian(src[(4 * i)..]);
                }
                break;
            case ComponentEncoding.Float64:
                if (!swap) MemoryMarshal.Cast<byte, double>(src)[..n].CopyTo(dst);
                else for (int i = 0; i < n; i++) dst[i] = BinaryPrimitives.ReadDoubleBigEndian(src[(8 * i)..]);
                break;
            case ComponentEncoding.Int8:
                for (int i = 0; i < n; i++) dst[i] = (sbyte)src[i] * inv;
                break;
            case ComponentEncoding.UInt8:
                for (int i = 0; i < n; i++) dst[i] = (src[i] - off) / fullScale;
                break;
            case ComponentEncoding.Int16:
                if (!swap)
                {
                    ReadOnlySpan<short> s = MemoryMarshal.Cast<byte, short>(src);
                    for (int i = 0; i < n; i++) dst[i] = s[i] * inv;
                }
                else for (int i = 0; i < n; i++) dst[i] = BinaryPrimitives.ReadInt16BigEndian(src[(2 * i)..]) * inv;
                break;
            case ComponentEncoding.UInt16:
                for (int i = 0; i < n; i++)
                {
                    ushort v = _format.BigEndian ? BinaryPrimitives.ReadUInt16BigEndian(src[(2 * i)..]) : BinaryPrimitives.ReadUInt16LittleEndian(src[(2 * i)..]);
                    dst[i] = (v - off) / fullScale;
                }
                break;
            case ComponentEncoding.Int24:
                for (int i = 0; i < n; i++)
                {
                    int j = 3 * i;
                    int v = _format.BigEndian
                        ? (src[j] << 24) | (src[j + 1] << 16) | (src[j + 2] << 8)
                        : (src[j + 2] << 24) | (src[j + 1] << 16) | (src[j] << 8);
                    dst[i] = (v >> 8) * inv;
                }
                break;
            case ComponentEncoding.Int32:
                for (int i = 0; i < n; i++)
                {
                    int v = _format.BigEndian ? BinaryPrimitives.ReadInt32BigEndian(src[(4 * i)..]) : BinaryPrimitives.ReadInt32LittleEndian(src[(4 * i)..]);
                    dst[i] = v * inv;
                }
                break;
            case ComponentEncoding.UInt32:
                for (int i = 0; i < n; i++)
                {
                    uint v = _format.BigEndian ? BinaryPrimitives.ReadUInt32BigEndian(src[(4 * i)..]) : BinaryPrimitives.ReadUInt32LittleEndian(src[(4 * i)..]);
                    dst[i] = (v - off) / fullScale;
                }
                break;
        }
    }
}
