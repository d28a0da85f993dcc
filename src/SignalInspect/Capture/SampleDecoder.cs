using System.Buffers.Binary;
using System.Numerics;
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

    /// <summary>Whether the stored frames are exactly the output in single precision (little-endian float32, every
    /// component used, in order).</summary>
    public bool StoresOutputAsFloat32 =>
        _identity && _format.Encoding == ComponentEncoding.Float32 && _format.BigEndian != BitConverter.IsLittleEndian;

    /// <summary>Whether the stored components are floating point.</summary>
    public bool StoresFloat => _format.IsFloat;

    /// <summary>Values written per output sample (2 complex, 1 real).</summary>
    public int OutputComponents => _pick.Length;

    /// <summary>Decodes whole frames from <paramref name="bytes"/> into <paramref name="output"/>; returns frames
    /// decoded.</summary>
    public int Decode(ReadOnlySpan<byte> bytes, Span<double> output)
    {
        int frames = Math.Min(bytes.Length / FrameBytes, output.Length / _pick.Length);
        if (_identity)
        {
            DecodeComponents(bytes[..(frames * FrameBytes)], output[..(frames * _frameComponents)]);
            return frames;
        }
        int need = frames * _frameComponents;
        if (_scratch.Length < need)
            _scratch = new double[need];
        Span<double> all = _scratch.AsSpan(0, need);
        DecodeComponents(bytes[..(frames * FrameBytes)], all);
        int k = 0;
        for (int f = 0; f < frames; f++)
        {
            int b = f * _frameComponents;
            foreach (int p in _pick)
                output[k++] = all[b + p];
        }
        return frames;
    }

    private void DecodeComponents(ReadOnlySpan<byte> src, Span<double> dst)
    {
        bool swap = _format.BigEndian == BitConverter.IsLittleEndian;
        double inv = 1.0 / _format.CodeFullScale;
        double off = _format.UnsignedOffset;
        // Unsigned codes divide by a full scale that is not a power of two: divide (exactly as defined) rather than
        // multiply by a rounded inverse.
        double fullScale = _format.CodeFullScale;
        int n = dst.Length;
        switch (_format.Encoding)
        {
            case ComponentEncoding.Float32:
                if (!swap)
                    SignalInspect.Dsp.VectorMath.Widen(MemoryMarshal.Cast<byte, float>(src)[..n], dst);
                else
                {
                    for (int i = 0; i < n; i++)
                        dst[i] = BinaryPrimitives.ReadSingleBigEndian(src[(4 * i)..]);
                }
                break;
            case ComponentEncoding.Float64:
                if (!swap)
                    MemoryMarshal.Cast<byte, double>(src)[..n].CopyTo(dst);
                else
                    for (int i = 0; i < n; i++)
                        dst[i] = BinaryPrimitives.ReadDoubleBigEndian(src[(8 * i)..]);
                break;
            case ComponentEncoding.Int8:
                for (int i = 0; i < n; i++)
                    dst[i] = (sbyte)src[i] * inv;
                break;
            case ComponentEncoding.UInt8:
                WidenUInt8(src[..n], off, fullScale, dst);
                break;
            case ComponentEncoding.Int16:
                if (!swap)
                    WidenInt16(MemoryMarshal.Cast<byte, short>(src)[..n], inv, dst);
                else
                    for (int i = 0; i < n; i++)
                        dst[i] = BinaryPrimitives.ReadInt16BigEndian(src[(2 * i)..]) * inv;
                break;
            case ComponentEncoding.UInt16:
                for (int i = 0; i < n; i++)
                {
                    ushort v = _format.BigEndian
                        ? BinaryPrimitives.ReadUInt16BigEndian(src[(2 * i)..])
                        : BinaryPrimitives.ReadUInt16LittleEndian(src[(2 * i)..]);
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
                    int v = _format.BigEndian
                        ? BinaryPrimitives.ReadInt32BigEndian(src[(4 * i)..])
                        : BinaryPrimitives.ReadInt32LittleEndian(src[(4 * i)..]);
                    dst[i] = v * inv;
                }
                break;
            case ComponentEncoding.UInt32:
                for (int i = 0; i < n; i++)
                {
                    uint v = _format.BigEndian
                        ? BinaryPrimitives.ReadUInt32BigEndian(src[(4 * i)..])
                        : BinaryPrimitives.ReadUInt32LittleEndian(src[(4 * i)..]);
                    dst[i] = (v - off) / fullScale;
                }
                break;
        }
    }

    // SIMD widening of the common formats (the same values as the scalar loops: conversions to
    // double are exact, and the scaling is the same single multiply or division per value).

    private static void WidenInt16(ReadOnlySpan<short> s, double inv, Span<double> dst)
    {
        int w = Vector<short>.Count,
            i = 0,
            q = Vector<double>.Count;
        var scale = new Vector<double>(inv);
        for (; i + w <= s.Length; i += w)
        {
            Vector.Widen(new Vector<short>(s.Slice(i, w)), out Vector<int> a, out Vector<int> b);
            Vector.Widen(a, out Vector<long> a0, out Vector<long> a1);
            Vector.Widen(b, out Vector<long> b0, out Vector<long> b1);
            (Vector.ConvertToDouble(a0) * scale).CopyTo(dst[i..]);
            (Vector.ConvertToDouble(a1) * scale).CopyTo(dst[(i + q)..]);
            (Vector.ConvertToDouble(b0) * scale).CopyTo(dst[(i + 2 * q)..]);
            (Vector.ConvertToDouble(b1) * scale).CopyTo(dst[(i + 3 * q)..]);
        }
        for (; i < s.Length; i++)
            dst[i] = s[i] * inv;
    }

    private static void WidenUInt8(ReadOnlySpan<byte> s, double off, double fullScale, Span<double> dst)
    {
        int w = Vector<byte>.Count,
            i = 0,
            q = Vector<double>.Count;
        var o = new Vector<double>(off);
        var fs = new Vector<double>(fullScale);
        for (; i + w <= s.Length; i += w)
        {
            Vector.Widen(new Vector<byte>(s.Slice(i, w)), out Vector<ushort> a, out Vector<ushort> b);
            Span<Vector<ushort>> halves = [a, b];
            for (int h = 0; h < 2; h++)
            {
                Vector.Widen(halves[h], out Vector<uint> c, out Vector<uint> d);
                Span<Vector<uint>> quarters = [c, d];
                for (int k = 0; k < 2; k++)
                {
                    Vector.Widen(quarters[k], out Vector<ulong> e, out Vector<ulong> f);
                    int at = i + (2 * h + k) * 2 * q;
                    ((Vector.ConvertToDouble(e) - o) / fs).CopyTo(dst[at..]);
                    ((Vector.ConvertToDouble(f) - o) / fs).CopyTo(dst[(at + q)..]);
                }
            }
        }
        for (; i < s.Length; i++)
            dst[i] = (s[i] - off) / fullScale;
    }
}
