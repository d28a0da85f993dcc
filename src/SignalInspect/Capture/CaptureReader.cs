using System.Buffers;
using System.Runtime.InteropServices;

namespace SignalInspect.Capture;

/// <summary>
/// Reads consecutive blocks of samples from one window of a capture with a bounded buffer.
/// Complex samples are written interleaved (I, Q, I, Q ...), real samples one value each, in
/// full-scale units. Memory use does not depend on the capture's length.
/// </summary>
public sealed class CaptureReader : IDisposable
{
    /// <summary>Size of the byte buffer used for file reads.</summary>
    public const int BufferBytes = 1 << 20;

    private readonly ByteSource _source;
    private readonly SampleDecoder _decoder;
    private readonly long _firstSample;
    private readonly byte[] _bytes;
    private long _position;

    internal CaptureReader(CaptureInfo info, ByteSource source, SampleDecoder decoder, long firstSample, long sampleCount)
    {
        Info = info;
        _source = source;
        _decoder = decoder;
        _firstSample = firstSample;
        SampleCount = sampleCount;
        _bytes = ArrayPool<byte>.Shared.Rent(Math.Max(decoder.FrameBytes, BufferBytes / decoder.FrameBytes * decoder.FrameBytes));
        _source.Seek(firstSample * decoder.FrameBytes);
    }

    /// <summary>What the capture is.</summary>
    public CaptureInfo Info { get; }

    /// <summary>Index of the window's first sample within the capture.</summary>
    public long FirstSample => _firstSample;

    /// <summary>Samples in the window.</summary>
    public long SampleCount { get; }

    /// <summary>Samples already read from the window.</summary>
    public long Position => _position;

    /// <summary>Values per sample in the output: 2 (I, Q) for complex, 1 for real.</summary>
    public int ValuesPerSample => _decoder.OutputComponents;

    /// <summary>
    /// Reads up to <paramref name="destination"/>.Length / <see cref="ValuesPerSample"/> samples.
    /// Returns the number of samples read; 0 at the end of the window.
    /// </summary>
    public int Read(Span<double> destination)
    {
        int frameBytes = _decoder.FrameBytes;
        long left = SampleCount - _position;
        int wanted = (int)Math.Min(destination.Length / ValuesPerSample, left);
        int done = 0;
        while (done < wanted)
        {
            int frames = Math.Min(wanted - done, _bytes.Length / frameBytes);
            int got = ReadWholeFrames(_bytes.AsSpan(0, frames * frameBytes), frameBytes);
            if (got == 0) break;
            _decoder.Decode(_bytes.AsSpan(0, got * frameBytes), destination[(done * ValuesPerSample)..]);
            done += got;
        }
        _position += done;
        return done;
    }

    /// <summary>
    /// Whether <see cref="Read(Span{float})"/> is available: the capture stores its samples as
    /// little-endian float32 exactly as they are delivered (cf32_le, rf32_le, a float WAV), so they
    /// can be read straight into a float buffer with no conversion.
    /// </summary>
    public bool DeliversFloat32 => _decoder.StoresOutputAsFloat32;

    /// <summary>
    /// Reads up to <paramref name="destination"/>.Length / <see cref="ValuesPerSample"/> samples as
    /// stored, in single precision (only when <see cref="DeliversFloat32"/>); the file's bytes go
    /// straight into the buffer. Returns the number of samples read; 0 at the end of the window.
    /// </summary>
    /// <exception cref="InvalidOperationException">The capture does not store float32 samples as delivered.</exception>
    public int Read(Span<float> destination)
    {
        if (!DeliversFloat32) throw new InvalidOperationException("the capture does not store its samples as float32 as delivered");
        int frameBytes = _decoder.FrameBytes;
        int wanted = (int)Math.Min(destination.Length / ValuesPerSample, SampleCount - _position);
        int got = ReadWholeFrames(MemoryMarshal.AsBytes(destination[..(wanted * ValuesPerSample)]), frameBytes);
        _position += got;
        return got;
    }

    /// <summary>Moves to a sample within the window (0 is its first sample).</summary>
    /// <exception cref="ArgumentOutOfRangeException">The sample is outside the window.</exception>
    public void Seek(long sample)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(sample);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(sample, SampleCount);
        _position = sample;
        _source.Seek((_firstSample + sample) * _decoder.FrameBytes);
    }

    private int ReadWholeFrames(Span<byte> buffer, int frameBytes)
    {
        int total = 0;
        while (total < buffer.Length)
        {
            int got = _source.Read(buffer[total..]);
            if (got <= 0) break;
            total += got;
        }
        return total / frameBytes;
    }

    /// <inheritdoc />
    public void Dispose()
    {
        _source.Dispose();
        ArrayPool<byte>.Shared.Return(_bytes);
    }
}
