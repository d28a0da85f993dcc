using System.Buffers;
using System.Runtime.InteropServices;

namespace SignalInspect.Capture;

/// <summary>
/// Reads consecutive blocks of samples from one window of a capture with a bounded buffer.
/// Complex samples are written interleaved (I, Q, I, Q ...), real samples one value each, in
/// full-scale units. Memory use does not depend on the capture's length. Where the samples are
/// one range of a file, they are taken through a memory map (<see cref="MappedExtent"/>, a bounded
/// window at a time) instead of being copied out of the page cache by reads.
/// </summary>
public sealed class CaptureReader : IDisposable
{
    /// <summary>Size of the byte buffer used for file reads.</summary>
    public const int BufferBytes = 1 << 20;

    private readonly ByteSource _source;
    private readonly SampleDecoder _decoder;
    private readonly long _firstSample;
    private readonly byte[] _bytes;
    private readonly MappedExtent? _mapped;
    private long _position,
        _sourceAt;

    // Read path of Float32View: the samples held, from _heldFirst.
    private float[]? _held;
    private long _heldFirst,
        _heldCount;

    internal CaptureReader(
        CaptureInfo info,
        ByteSource source,
        SampleDecoder decoder,
        long firstSample,
        long sampleCount
    )
    {
        Info = info;
        _source = source;
        _decoder = decoder;
        _firstSample = firstSample;
        SampleCount = sampleCount;
        _mapped = source.Mapped;
        _bytes = _mapped is null
            ? ArrayPool<byte>.Shared.Rent(
                Math.Max(decoder.FrameBytes, BufferBytes / decoder.FrameBytes * decoder.FrameBytes)
            )
            : [];
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

    /// <summary>Whether the file stores floating-point samples (which may exceed 1 without clipping).</summary>
    public bool StoresFloat => _decoder.StoresFloat;

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
        if (_mapped is { } map)
        {
            // Decoded straight from the page cache, a window at a time.
            while (done < wanted)
            {
                int frames = Math.Min(wanted - done, Math.Max(1, map.Window / frameBytes));
                ReadOnlySpan<byte> bytes = map.Get((_firstSample + _position + done) * frameBytes, frames * frameBytes);
                int got = bytes.Length / frameBytes;
                if (got == 0)
                    break;
                _decoder.Decode(bytes[..(got * frameBytes)], destination[(done * ValuesPerSample)..]);
                done += got;
            }
            _position += done;
            return done;
        }
        SyncSource();
        while (done < wanted)
        {
            int frames = Math.Min(wanted - done, _bytes.Length / frameBytes);
            int got = ReadWholeFrames(_bytes.AsSpan(0, frames * frameBytes), frameBytes);
            if (got == 0)
                break;
            _decoder.Decode(_bytes.AsSpan(0, got * frameBytes), destination[(done * ValuesPerSample)..]);
            done += got;
        }
        _position += done;
        _sourceAt = _position;
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
        if (!DeliversFloat32)
            throw new InvalidOperationException("the capture does not store its samples as float32 as delivered");
        int frameBytes = _decoder.FrameBytes;
        int wanted = (int)Math.Min(destination.Length / ValuesPerSample, SampleCount - _position);
        if (_mapped is not null)
        {
            ReadOnlySpan<float> view = Float32View(_position, wanted);
            view.CopyTo(destination);
            return view.Length / ValuesPerSample;
        }
        SyncSource();
        int got = ReadWholeFrames(MemoryMarshal.AsBytes(destination[..(wanted * ValuesPerSample)]), frameBytes);
        _position += got;
        _sourceAt = _position;
        return got;
    }

    /// <summary>
    /// Samples <paramref name="sample"/> to <paramref name="sample"/> + <paramref name="samples"/> - 1 of
    /// the window as stored, in single precision (only when <see cref="DeliversFloat32"/>), clipped
    /// to the window's end, without a copy where the file can be mapped (see <see cref="Mapped"/>);
    /// otherwise read into a buffer of the reader's, re-reading nothing that the previous view
    /// already held. Valid until the next read or view; <see cref="Position"/> moves to its end.
    /// </summary>
    /// <exception cref="InvalidOperationException">The capture does not store float32 samples as delivered.</exception>
    /// <exception cref="ArgumentOutOfRangeException">The sample is outside the window, or the count is
    /// negative.</exception>
    public ReadOnlySpan<float> Float32View(long sample, int samples)
    {
        if (!DeliversFloat32)
            throw new InvalidOperationException("the capture does not store its samples as float32 as delivered");
        ArgumentOutOfRangeException.ThrowIfNegative(sample);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(sample, SampleCount);
        ArgumentOutOfRangeException.ThrowIfNegative(samples);
        int frameBytes = _decoder.FrameBytes,
            vps = ValuesPerSample;
        int count = (int)Math.Min(samples, SampleCount - sample);
        _position = sample + count;
        if (count == 0)
            return default;
        if (_mapped is { } map)
        {
            ReadOnlySpan<byte> bytes = map.Get((_firstSample + sample) * frameBytes, count * frameBytes);
            int frames = bytes.Length / frameBytes;
            _position = sample + frames;
            return MemoryMarshal.Cast<byte, float>(bytes)[..(frames * vps)];
        }
        // Read path: keep what the buffer already holds from the sample on, read the rest.
        long end = sample + count;
        if (sample < _heldFirst || end > _heldFirst + _heldCount)
        {
            int capacity = Math.Max(count, (MappedExtent.WindowBytesForTests.Value ?? BufferBytes) / frameBytes);
            if (_held is null || _held.Length < capacity * vps)
                Array.Resize(ref _held, capacity * vps);
            int keep = 0;
            if (sample >= _heldFirst && sample < _heldFirst + _heldCount)
            {
                keep = (int)(_heldFirst + _heldCount - sample);
                _held.AsSpan((int)(sample - _heldFirst) * vps, keep * vps).CopyTo(_held);
            }
            _source.Seek((_firstSample + sample + keep) * frameBytes);
            int want = (int)Math.Min(_held.Length / vps - keep, SampleCount - sample - keep);
            int got = ReadWholeFrames(MemoryMarshal.AsBytes(_held.AsSpan(keep * vps, want * vps)), frameBytes);
            _heldFirst = sample;
            _heldCount = keep + got;
            _sourceAt = sample + keep + got;
            count = (int)Math.Min(count, _heldCount);
            _position = sample + count;
        }
        return _held.AsSpan((int)(sample - _heldFirst) * vps, count * vps);
    }

    /// <summary>Whether the reader sees the file through a memory map (no copies; see <see
    /// cref="MappedExtent"/>).</summary>
    public bool Mapped => _mapped is not null;

    /// <summary>Moves to a sample within the window (0 is its first sample).</summary>
    /// <exception cref="ArgumentOutOfRangeException">The sample is outside the window.</exception>
    public void Seek(long sample)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(sample);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(sample, SampleCount);
        _position = sample;
    }

    /// <summary>Puts the byte source where the reads go on (a view may have moved it elsewhere).</summary>
    private void SyncSource()
    {
        if (_sourceAt == _position)
            return;
        _source.Seek((_firstSample + _position) * _decoder.FrameBytes);
        _sourceAt = _position;
    }

    private int ReadWholeFrames(Span<byte> buffer, int frameBytes)
    {
        int total = 0;
        while (total < buffer.Length)
        {
            int got = _source.Read(buffer[total..]);
            if (got <= 0)
                break;
            total += got;
        }
        // The window's length was taken at opening: nothing to read before its end means the file was cut since.
        if (total < frameBytes && buffer.Length >= frameBytes && _position < SampleCount)
            throw Shrank(Info.Path);
        return total / frameBytes;
    }

    /// <summary>The error of a capture cut by another program while it was read.</summary>
    internal static CaptureException Shrank(string path) =>
        CaptureException.ForFile(
            path,
            "the file became shorter while it was read (another program cut it): the analysis stopped; measure it "
                + "again when it is complete"
        );

    /// <inheritdoc />
    public void Dispose()
    {
        _source.Dispose();
        if (_mapped is null)
            ArrayPool<byte>.Shared.Return(_bytes);
    }
}
