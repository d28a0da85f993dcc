using System.Buffers.Binary;
using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;

namespace SignalInspect.Capture;

/// <summary>Containers <see cref="CaptureWriter"/> can write.</summary>
public enum CaptureContainer
{
    /// <summary>WAV (RIFF), or RF64 when the data passes 4 GiB or RF64 is asked for.</summary>
    Wav,

    /// <summary>Headerless raw samples.</summary>
    Raw,

    /// <summary>SigMF <c>.sigmf-meta</c> + <c>.sigmf-data</c> pair.</summary>
    SigMf,

    /// <summary>SigMF <c>.sigmf</c> tar archive.</summary>
    SigMfArchive,
}

/// <summary>What a written capture states about itself.</summary>
public sealed record CaptureMetadata
{
    /// <summary>Sample rate in Hz.</summary>
    public required double SampleRateHz { get; init; }

    /// <summary>Centre frequency in Hz, null when unknown.</summary>
    public double? CenterFrequencyHz { get; init; }

    /// <summary>Time of the first sample, null when unknown.</summary>
    public DateTimeOffset? StartTime { get; init; }

    /// <summary>Free-text description (SigMF <c>core:description</c>).</summary>
    public string? Description { get; init; }
}

/// <summary>
/// Writes samples (full-scale units, interleaved I/Q for complex) into a capture file, block by
/// block. Integer codes are round(x * full scale + offset), clamped to the code range; clamped
/// samples are counted. Files appear only on <see cref="Complete"/>: everything is written to a
/// temporary file first and renamed, so a failure never leaves a half-written capture. An
/// existing file is not replaced unless asked.
/// </summary>
public sealed class CaptureWriter : IDisposable
{
    private readonly CaptureContainer _container;
    private readonly SampleFormat _format;
    private readonly CaptureMetadata _meta;
    private readonly long _totalSamples;
    private readonly string _dataPath;
    private readonly string? _metaPath;
    private readonly string _tempPath;
    private readonly FileStream _out;
    private readonly IncrementalHash _sha = IncrementalHash.CreateHash(HashAlgorithmName.SHA512);
    private readonly bool _rf64;
    private byte[] _buffer = [];
    private long _written;
    private bool _completed;

    /// <summary>Starts a capture file.</summary>
    /// <param name="path">Output path (for a SigMF pair, the stem or either file's name).</param>
    /// <param name="container">Container to write.</param>
    /// <param name="format">Datatype; for WAV a real format per channel is derived (complex -> two channels).</param>
    /// <param name="metadata">Rate, centre frequency, time, description.</param>
    /// <param name="totalSamples">Samples that will be written (needed up front for headers).</param>
    /// <param name="overwrite">Replace existing files.</param>
    /// <param name="forceRf64">Write RF64 even below 4 GiB (WAV only).</param>
    /// <exception cref="CaptureException">The output exists and <paramref name="overwrite"/> is false, or the format
    /// does not fit the container.</exception>
    public CaptureWriter(
        string path,
        CaptureContainer container,
        SampleFormat format,
        CaptureMetadata metadata,
        long totalSamples,
        bool overwrite = false,
        bool forceRf64 = false
    )
    {
        ArgumentOutOfRangeException.ThrowIfNegative(totalSamples);
        _container = container;
        _format = format;
        _meta = metadata;
        _totalSamples = totalSamples;
        if (container == CaptureContainer.Wav && format.IsUnsigned && format.Encoding != ComponentEncoding.UInt8)
            throw new CaptureException(
                $"WAV cannot hold {format.Name}: use 8-bit unsigned, 16/24/32-bit signed or float"
            );
        if (container == CaptureContainer.Wav && format.BigEndian && format.BytesPerComponent > 1)
            throw new CaptureException($"WAV is little-endian: {format.Name} cannot be written to it");
        if (container != CaptureContainer.Wav && format.Encoding == ComponentEncoding.Int24)
            throw new CaptureException("24-bit samples are written to WAV only (SigMF has no 24-bit datatype)");
        if (container == CaptureContainer.Wav && format.Encoding == ComponentEncoding.UInt8)
            _format = format with { UnsignedOffset = 128 };
        string full = Path.GetFullPath(path);
        if (container == CaptureContainer.SigMf)
        {
            string stem =
                full.EndsWith(".sigmf-meta", StringComparison.OrdinalIgnoreCase)
                || full.EndsWith(".sigmf-data", StringComparison.OrdinalIgnoreCase)
                    ? full[..^11]
                    : full;
            _dataPath = stem + ".sigmf-data";
            _metaPath = stem + ".sigmf-meta";
        }
        else
        {
            _dataPath = full;
            // A raw file states nothing: its sidecar (CaptureFormats.SidecarSuffix) carries the datatype, rate and
            // centre, so that the tool reads it back with no options.
            if (container == CaptureContainer.Raw)
                _metaPath = full + CaptureFormats.SidecarSuffix;
        }
        foreach (string p in OutputPaths)
            if (File.Exists(p) && !overwrite)
                throw OutputException.Exists(p);
        string? dir = Path.GetDirectoryName(_dataPath);
        if (dir is not null && !Directory.Exists(dir))
            throw CaptureException.ForFile(_dataPath, $"output folder {dir} does not exist");
        _tempPath = Path.Combine(
            dir ?? ".",
            $".{Path.GetFileName(_dataPath)}.{Environment.ProcessId}.{Guid.NewGuid():N}.tmp"
        );
        _out = new FileStream(_tempPath, FileMode.CreateNew, FileAccess.ReadWrite, FileShare.None, 1 << 16);
        long dataBytes = totalSamples * _format.BytesPerSample;
        _rf64 = container == CaptureContainer.Wav && (forceRf64 || dataBytes + 44 > uint.MaxValue);
        if (container == CaptureContainer.Wav)
            WriteWavHeader(dataBytes);
        if (container == CaptureContainer.SigMfArchive)
            WriteTarHeader(_out, ArchiveMemberName(".sigmf-data"), dataBytes);
    }

    /// <summary>The files this writer produces.</summary>
    public IReadOnlyList<string> OutputPaths =>
        _metaPath is null ? [_dataPath]
        : _container == CaptureContainer.Raw ? [_dataPath, _metaPath]
        : [_metaPath, _dataPath];

    /// <summary>Sample components (I, Q or real values) whose code had to be clamped to the code range
    /// (clipped).</summary>
    public long ClippedValues { get; private set; }

    /// <summary>Appends samples (interleaved I, Q for complex).</summary>
    /// <exception cref="InvalidOperationException">More samples than announced.</exception>
    public void Write(ReadOnlySpan<double> samples)
    {
        int per = _format.ComponentsPerSample;
        long n = samples.Length / per;
        if (_written + n > _totalSamples)
            throw new InvalidOperationException("more samples written than announced");
        int bytes = samples.Length * _format.BytesPerComponent;
        if (_buffer.Length < bytes)
            _buffer = new byte[bytes];
        Encode(samples, _buffer.AsSpan(0, bytes));
        _out.Write(_buffer, 0, bytes);
        if (_container is CaptureContainer.SigMf or CaptureContainer.SigMfArchive)
            _sha.AppendData(_buffer, 0, bytes);
        _written += n;
    }

    /// <summary>Finishes the file(s) and moves them into place.</summary>
    /// <exception cref="InvalidOperationException">Fewer samples were written than announced.</exception>
    public void Complete()
    {
        if (_written != _totalSamples)
            throw new InvalidOperationException($"{_written} samples written, {_totalSamples} announced");
        string sha = Convert.ToHexStringLower(_sha.GetHashAndReset());
        long dataBytes = _totalSamples * _format.BytesPerSample;
        switch (_container)
        {
            case CaptureContainer.Wav:
                if ((dataBytes & 1) == 1)
                    _out.WriteByte(0);
                break;
            case CaptureContainer.SigMfArchive:
                Pad(_out, dataBytes);
                byte[] metaBytes = MetadataJson(sha);
                WriteTarHeader(_out, ArchiveMemberName(".sigmf-meta"), metaBytes.Length);
                _out.Write(metaBytes);
                Pad(_out, metaBytes.Length);
                _out.Write(new byte[1024]);
                break;
        }
        _out.Flush(flushToDisk: false);
        _out.Dispose();
        if (_metaPath is not null)
        {
            string metaTemp = _tempPath + ".meta";
            File.WriteAllBytes(metaTemp, _container == CaptureContainer.Raw ? SidecarJson() : MetadataJson(sha));
            File.Move(_tempPath, _dataPath, overwrite: true);
            File.Move(metaTemp, _metaPath, overwrite: true);
        }
        else
        {
            File.Move(_tempPath, _dataPath, overwrite: true);
        }
        _completed = true;
    }

    /// <inheritdoc />
    public void Dispose()
    {
        _sha.Dispose();
        if (_completed)
            return;
        _out.Dispose();
        try
        {
            File.Delete(_tempPath);
        }
        catch (IOException) { }
    }

    private string ArchiveMemberName(string ext)
    {
        string stem = Path.GetFileNameWithoutExtension(_dataPath);
        return $"{stem}/{stem}{ext}";
    }

    /// <summary>The sidecar of a raw file: <c>datatype</c>, <c>sampleRateHz</c>, <c>centerFrequencyHz</c> when
    /// known.</summary>
    private byte[] SidecarJson()
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteString("datatype", _format.Name);
            w.WriteNumber("sampleRateHz", _meta.SampleRateHz);
            if (_meta.CenterFrequencyHz is { } f)
                w.WriteNumber("centerFrequencyHz", f);
            w.WriteEndObject();
        }
        return ms.ToArray();
    }

    private byte[] MetadataJson(string sha)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteStartObject("global");
            w.WriteString("core:datatype", _format.Name);
            w.WriteString("core:version", "1.2.0");
            w.WriteNumber("core:sample_rate", _meta.SampleRateHz);
            w.WriteString("core:sha512", sha);
            w.WriteString("core:recorder", "signalinspect synth");
            if (_meta.Description is { } d)
                w.WriteString("core:description", d);
            w.WriteEndObject();
            w.WriteStartArray("captures");
            w.WriteStartObject();
            w.WriteNumber("core:sample_start", 0);
            if (_meta.CenterFrequencyHz is { } f)
                w.WriteNumber("core:frequency", f);
            if (_meta.StartTime is { } t)
                w.WriteString(
                    "core:datetime",
                    t.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss.fff'Z'", CultureInfo.InvariantCulture)
                );
            w.WriteEndObject();
            w.WriteEndArray();
            w.WriteStartArray("annotations");
            w.WriteEndArray();
            w.WriteEndObject();
        }
        return ms.ToArray();
    }

    private void WriteWavHeader(long dataBytes)
    {
        int channels = _format.ComponentsPerSample;
        int bytesPer = _format.BytesPerComponent;
        bool extensible = bytesPer > 2 && !_format.IsFloat;
        ushort tag = _format.IsFloat ? (ushort)3 : (ushort)1;
        var h = new BinaryWriter(_out, Encoding.ASCII, leaveOpen: true);
        int fmtSize = extensible ? 40 : 16;
        long riffSize = 4 + (_rf64 ? 8 + 28 : 0) + 8 + fmtSize + 8 + dataBytes + (dataBytes & 1);
        h.Write(Encoding.ASCII.GetBytes(_rf64 ? "RF64" : "RIFF"));
        h.Write(_rf64 ? uint.MaxValue : (uint)riffSize);
        h.Write("WAVE"u8);
        if (_rf64)
        {
            h.Write("ds64"u8);
            h.Write(28u);
            h.Write(riffSize);
            h.Write(dataBytes);
            h.Write(_totalSamples);
            h.Write(0u);
        }
        h.Write("fmt "u8);
        h.Write((uint)fmtSize);
        h.Write(extensible ? (ushort)0xFFFE : tag);
        h.Write((ushort)channels);
        h.Write((uint)Math.Round(_meta.SampleRateHz));
        h.Write((uint)(Math.Round(_meta.SampleRateHz) * channels * bytesPer));
        h.Write((ushort)(channels * bytesPer));
        h.Write((ushort)(bytesPer * 8));
        if (extensible)
        {
            h.Write((ushort)22);
            h.Write((ushort)(bytesPer * 8));
            h.Write(0u);
            h.Write(new Guid($"0000000{tag}-0000-0010-8000-00aa00389b71").ToByteArray());
        }
        h.Write("data"u8);
        h.Write(_rf64 ? uint.MaxValue : (uint)dataBytes);
        h.Flush();
    }

    private static void WriteTarHeader(Stream s, string name, long size)
    {
        var h = new byte[512];
        Encoding.ASCII.GetBytes(name).CopyTo(h, 0);
        Encoding.ASCII.GetBytes("0000644\0").CopyTo(h, 100);
        Encoding.ASCII.GetBytes("0000000\0").CopyTo(h, 108);
        Encoding.ASCII.GetBytes("0000000\0").CopyTo(h, 116);
        Encoding.ASCII.GetBytes(Convert.ToString(size, 8).PadLeft(11, '0') + "\0").CopyTo(h, 124);
        Encoding.ASCII.GetBytes("00000000000\0").CopyTo(h, 136);
        h[156] = (byte)'0';
        Encoding.ASCII.GetBytes("ustar\0").CopyTo(h, 257);
        Encoding.ASCII.GetBytes("00").CopyTo(h, 263);
        for (int i = 148; i < 156; i++)
            h[i] = (byte)' ';
        int sum = h.Sum(b => b);
        Encoding.ASCII.GetBytes(Convert.ToString(sum, 8).PadLeft(6, '0') + "\0 ").CopyTo(h, 148);
        s.Write(h);
    }

    private static void Pad(Stream s, long size)
    {
        int pad = (int)((512 - size % 512) % 512);
        if (pad > 0)
            s.Write(new byte[pad]);
    }

    private void Encode(ReadOnlySpan<double> src, Span<byte> dst)
    {
        SampleFormat f = _format;
        double scale = f.CodeFullScale;
        double off = f.UnsignedOffset;
        bool big = f.BigEndian;
        int w = f.BytesPerComponent;
        (double lo, double hi) = f.Encoding switch
        {
            ComponentEncoding.Int8 => (sbyte.MinValue, sbyte.MaxValue),
            ComponentEncoding.Int16 => (short.MinValue, short.MaxValue),
            ComponentEncoding.Int24 => (-8388608.0, 8388607.0),
            ComponentEncoding.Int32 => (int.MinValue, (double)int.MaxValue),
            ComponentEncoding.UInt8 => (0, byte.MaxValue),
            ComponentEncoding.UInt16 => (0, ushort.MaxValue),
            ComponentEncoding.UInt32 => (0, (double)uint.MaxValue),
            _ => (double.NegativeInfinity, double.PositiveInfinity),
        };
        for (int i = 0; i < src.Length; i++)
        {
            Span<byte> d = dst.Slice(i * w, w);
            double x = src[i];
            if (f.Encoding == ComponentEncoding.Float32)
            {
                if (big)
                    BinaryPrimitives.WriteSingleBigEndian(d, (float)x);
                else
                    BinaryPrimitives.WriteSingleLittleEndian(d, (float)x);
                continue;
            }
            if (f.Encoding == ComponentEncoding.Float64)
            {
                if (big)
                    BinaryPrimitives.WriteDoubleBigEndian(d, x);
                else
                    BinaryPrimitives.WriteDoubleLittleEndian(d, x);
                continue;
            }
            double code = Math.Round(x * scale + off, MidpointRounding.AwayFromZero);
            if (code < lo || code > hi || double.IsNaN(code))
            {
                ClippedValues++;
                code = double.IsNaN(code) ? off : Math.Clamp(code, lo, hi);
            }
            switch (f.Encoding)
            {
                case ComponentEncoding.Int8:
                    d[0] = (byte)(sbyte)code;
                    break;
                case ComponentEncoding.UInt8:
                    d[0] = (byte)code;
                    break;
                case ComponentEncoding.Int16:
                    if (big)
                        BinaryPrimitives.WriteInt16BigEndian(d, (short)code);
                    else
                        BinaryPrimitives.WriteInt16LittleEndian(d, (short)code);
                    break;
                case ComponentEncoding.UInt16:
                    if (big)
                        BinaryPrimitives.WriteUInt16BigEndian(d, (ushort)code);
                    else
                        BinaryPrimitives.WriteUInt16LittleEndian(d, (ushort)code);
                    break;
                case ComponentEncoding.Int24:
                    int v24 = (int)code;
                    d[0] = (byte)v24;
                    d[1] = (byte)(v24 >> 8);
                    d[2] = (byte)(v24 >> 16);
                    break;
                case ComponentEncoding.Int32:
                    if (big)
                        BinaryPrimitives.WriteInt32BigEndian(d, (int)code);
                    else
                        BinaryPrimitives.WriteInt32LittleEndian(d, (int)code);
                    break;
                case ComponentEncoding.UInt32:
                    if (big)
                        BinaryPrimitives.WriteUInt32BigEndian(d, (uint)code);
                    else
                        BinaryPrimitives.WriteUInt32LittleEndian(d, (uint)code);
                    break;
            }
        }
    }
}
