using System.Buffers.Binary;
using NAudio.Wave;

namespace SignalInspect.Capture;

/// <summary>
/// WAV (RIFF), RF64 and BW64 (EBU Tech 3306, ITU-R BS.2088) files: PCM 8/16/24/32-bit, IEEE
/// float 32/64, WAVE_FORMAT_EXTENSIBLE. NAudio.Core parses the format and reads the data chunk;
/// a short scan of the chunk list beforehand finds where the data chunk starts and what size it
/// declares, so that a truncated file is noticed instead of silently read short.
/// </summary>
internal static class WavReader
{
    private const ushort FormatPcm = 1;
    private const ushort FormatFloat = 3;
    private const ushort FormatExtensible = 0xFFFE;

    /// <summary>Most channels a WAV file may declare (a header claiming more is taken as damaged).</summary>
    public const int MaxChannels = 1024;

    public static CaptureSource Open(string path, ReaderOptions options)
    {
        long fileSize = ByteSource.LengthOf(path);
        ChunkScan scan = Scan(path, fileSize);
        (SampleFormat stored, int channels, int rate) = ReadFormat(path, scan);

        var warnings = new List<string>();
        var notes = new List<string>();
        int frameBytes = stored.BytesPerComponent * channels;
        long available = fileSize - scan.DataOffset;
        long dataBytes = scan.DeclaredDataBytes;
        if (scan.DeclaredDataBytes == uint.MaxValue && scan.Magic == "RIFF")
        {
            warnings.Add(
                $"data chunk size is 0xFFFFFFFF (an unfinished recording); the {available} bytes present are read"
            );
            dataBytes = available;
        }
        else if (dataBytes > available)
        {
            warnings.Add(
                $"data chunk declares {dataBytes} bytes but the file holds {available} after its start: the recording "
                    + "looks truncated; the bytes present are read"
            );
            dataBytes = available;
        }
        if (scan.DataChunks.Count > 1)
        {
            dataBytes = scan.DataChunks.Sum(c => c.Length);
            notes.Add(
                $"the samples are spread over {scan.DataChunks.Count} data chunks ({scan.Between} other chunk(s) "
                    + "between them): all are read, in file order"
            );
        }
        if (dataBytes % frameBytes != 0)
            warnings.Add(
                $"data chunk holds {dataBytes % frameBytes} byte(s) after the last whole sample frame; they are ignored"
            );
        dataBytes = dataBytes / frameBytes * frameBytes;

        (int[] pick, bool complex, string use) = CaptureSource.PickChannels(path, stored, channels, options);
        SampleFormat delivered = stored with { IsComplex = complex };
        double rateHz = rate;
        if (options.SampleRateHz is { } r)
        {
            rateHz = CaptureSource.CheckRate(path, r, CaptureSource.UserGiven);
            notes.Add($"sample rate {rateHz:R} Hz from --sample-rate overrides the file's {rate} Hz");
        }
        else
        {
            CaptureSource.CheckRate(path, rate, "WAV header");
        }
        if (options.CenterFrequencyHz is { } cf)
            notes.Add($"centre frequency {cf:R} Hz from --center-frequency (a WAV file does not state one)");
        if (options.Datatype is not null)
            notes.Add("--datatype is ignored: a WAV file states its own format");

        var info = new CaptureInfo
        {
            Path = path,
            DataPath = path,
            Container = scan.Magic == "RIFF" ? "WAV" : scan.Magic,
            SampleRateHz = rateHz,
            CenterFrequencyHz = options.CenterFrequencyHz,
            IsComplex = complex,
            SampleCount = dataBytes / frameBytes,
            Channels = channels,
            ChannelUse = use,
            Datatype = delivered.Name,
            FileSizeBytes = fileSize,
            Notes = notes,
            Warnings = warnings,
        };
        long length = dataBytes;
        if (scan.DataChunks.Count > 1)
        {
            var extents = new List<FileExtent>();
            long left = length;
            foreach (FileExtent c in scan.DataChunks)
            {
                long take = Math.Min(c.Length, left);
                if (take <= 0)
                    break;
                extents.Add(c with { Length = take });
                left -= take;
            }
            return new CaptureSource(info, () => new FileExtentSource(path, extents), stored, channels, pick);
        }
        return new CaptureSource(info, () => OpenData(path, scan.Magic, length), stored, channels, pick);
    }

    /// <summary>The file as NAudio should see it: BW64 is RF64 under another name.</summary>
    private static Stream OpenWaveStream(string path, string magic)
    {
        Stream stream = ByteSource.OpenReadOnly(path);
        return magic == "BW64" ? new MagicPatchStream(stream, "RF64"u8.ToArray()) : stream;
    }

    private static ByteSource OpenData(string path, string magic, long length)
    {
        FileStream file = ByteSource.OpenReadOnly(path);
        Stream stream = magic == "BW64" ? new MagicPatchStream(file, "RF64"u8.ToArray()) : file;
        try
        {
            var reader = new WaveFileReader(stream);
            // The reader leaves the stream at the data chunk's first byte.
            return new WaveDataSource(stream, reader, length, file, stream.Position);
        }
        catch
        {
            stream.Dispose();
            throw;
        }
    }

    private static (SampleFormat Stored, int Channels, int Rate) ReadFormat(string path, ChunkScan scan)
    {
        WaveFormat fmt;
        using (Stream stream = OpenWaveStream(path, scan.Magic))
        {
            try
            {
                using var reader = new WaveFileReader(stream);
                fmt = reader.WaveFormat;
            }
            catch (Exception e)
                when (e
                        is FormatException
                            or InvalidDataException
                            or EndOfStreamException
                            or ArgumentException
                            or IOException
                            or OverflowException
                )
            {
                throw CaptureException.ForFile(path, "malformed WAV header: " + OneLine(e.Message));
            }
        }
        if (fmt.Channels < 1)
            throw CaptureException.ForFile(path, "the file declares zero channels");
        if (fmt.SampleRate <= 0)
            throw CaptureException.ForFile(path, $"sample rate {fmt.SampleRate} Hz in the WAV header must be positive");
        ushort code = (ushort)fmt.Encoding;
        if (code == FormatExtensible)
            code = scan.SubFormatCode
                ?? throw CaptureException.ForFile(path, "WAVE_FORMAT_EXTENSIBLE header without a sub-format");
        int bits = fmt.BitsPerSample;
        ComponentEncoding? enc = (code, bits) switch
        {
            (FormatPcm, 8) => ComponentEncoding.UInt8,
            (FormatPcm, 16) => ComponentEncoding.Int16,
            (FormatPcm, 24) => ComponentEncoding.Int24,
            (FormatPcm, 32) => ComponentEncoding.Int32,
            (FormatFloat, 32) => ComponentEncoding.Float32,
            (FormatFloat, 64) => ComponentEncoding.Float64,
            _ => null,
        };
        if (enc is null)
            throw CaptureException.ForFile(
                path,
                $"unsupported WAV encoding (format code {code}, {bits} bits): PCM 8/16/24/32-bit and IEEE float "
                    + "32/64-bit are read"
            );
        var stored = new SampleFormat(false, enc.Value, false, enc == ComponentEncoding.UInt8 ? 128.0 : 0.0);
        if (fmt.BlockAlign != stored.BytesPerComponent * fmt.Channels)
            throw CaptureException.ForFile(
                path,
                $"block align {fmt.BlockAlign} does not match {fmt.Channels} channel(s) of {bits} bits"
            );
        return (stored, fmt.Channels, fmt.SampleRate);
    }

    private sealed record ChunkScan(string Magic, long DataOffset, long DeclaredDataBytes, ushort? SubFormatCode)
    {
        /// <summary>Every data chunk's body (offset, length) when the samples are spread over more than one (some
        /// receivers write hundreds, with their own small chunks between); empty for the usual one.</summary>
        public IReadOnlyList<FileExtent> DataChunks { get; init; } = [];

        /// <summary>Other chunks found between the data chunks.</summary>
        public int Between { get; init; }
    }

    /// <summary>Walks the chunk list up to the data chunk; sizes are never used to allocate.</summary>
    private static ChunkScan Scan(string path, long fileSize)
    {
        using FileStream fs = ByteSource.OpenReadOnly(path);
        Span<byte> head = stackalloc byte[12];
        if (fs.ReadAtLeast(head, 12, throwOnEndOfStream: false) < 12)
            throw CaptureException.ForFile(path, "truncated WAV header (shorter than 12 bytes)");
        string magic = System.Text.Encoding.ASCII.GetString(head[..4]);
        if (System.Text.Encoding.ASCII.GetString(head[8..12]) != "WAVE")
            throw CaptureException.ForFile(path, $"{magic} file is not of form WAVE");
        long? ds64Data = null;
        ushort? sub = null;
        bool sawFmt = false;
        Span<byte> ch = stackalloc byte[8];
        Span<byte> body = stackalloc byte[40];
        long pos = 12;
        while (true)
        {
            fs.Position = pos;
            if (fs.ReadAtLeast(ch, 8, throwOnEndOfStream: false) < 8)
                throw CaptureException.ForFile(
                    path,
                    sawFmt
                        ? "no data chunk found (the file may be truncated)"
                        : "truncated WAV header: no fmt chunk before the end of the file"
                );
            string id = System.Text.Encoding.ASCII.GetString(ch[..4]);
            uint size = BinaryPrimitives.ReadUInt32LittleEndian(ch[4..]);
            long bodyAt = pos + 8;
            if (id == "ds64")
            {
                if (size < 24 || fs.ReadAtLeast(body[..24], 24, throwOnEndOfStream: false) < 24)
                    throw CaptureException.ForFile(path, "truncated ds64 chunk");
                ds64Data = BinaryPrimitives.ReadInt64LittleEndian(body[8..16]);
                if (ds64Data < 0)
                    throw CaptureException.ForFile(path, "ds64 chunk declares a negative data size");
            }
            else if (id == "fmt ")
            {
                sawFmt = true;
                if (size < 16)
                    throw CaptureException.ForFile(path, $"fmt chunk of {size} bytes is too short (16 at least)");
                if (bodyAt + size > fileSize)
                    throw CaptureException.ForFile(
                        path,
                        $"truncated or damaged WAV header: the fmt chunk declares {size} bytes, more than the file "
                            + "holds"
                    );
                int want = (int)Math.Min(size, 40);
                fs.ReadAtLeast(body[..want], want, throwOnEndOfStream: false);
                ushort declaredChannels = BinaryPrimitives.ReadUInt16LittleEndian(body[2..]);
                if (declaredChannels == 0)
                    throw CaptureException.ForFile(path, "the file declares zero channels");
                if (declaredChannels > MaxChannels)
                    throw CaptureException.ForFile(
                        path,
                        $"the file declares {declaredChannels} channels, more than the {MaxChannels} read"
                    );
                if (BinaryPrimitives.ReadUInt16LittleEndian(body) == FormatExtensible && want >= 26)
                    sub = BinaryPrimitives.ReadUInt16LittleEndian(body[24..]);
            }
            else if (id == "data")
            {
                if (!sawFmt)
                    throw CaptureException.ForFile(path, "data chunk comes before the fmt chunk");
                long declared = size;
                if (magic != "RIFF" && size == uint.MaxValue)
                    declared = ds64Data
                        ?? throw CaptureException.ForFile(path, $"{magic} data chunk needs a ds64 chunk with its size");
                var scan = new ChunkScan(magic, bodyAt, declared, sub);
                return magic == "RIFF" && size != uint.MaxValue && bodyAt + size < fileSize
                    ? MoreData(fs, scan, fileSize)
                    : scan;
            }
            long next = bodyAt + size + (size & 1);
            if (next > fileSize)
                throw CaptureException.ForFile(
                    path,
                    $"'{Printable(id)}' chunk declares {size} bytes, more than the file holds, before any data chunk"
                );
            pos = next;
        }
    }

    /// <summary>Walks on past the first data chunk to the end of the file: every further data chunk is part of the
    /// recording (a chunk running past the end, or a header that does not read, ends the walk).</summary>
    private static ChunkScan MoreData(FileStream fs, ChunkScan first, long fileSize)
    {
        var data = new List<FileExtent> { new(first.DataOffset, first.DeclaredDataBytes) };
        int between = 0;
        Span<byte> ch = stackalloc byte[8];
        long pos = first.DataOffset + first.DeclaredDataBytes + (first.DeclaredDataBytes & 1);
        while (pos + 8 <= fileSize)
        {
            fs.Position = pos;
            if (fs.ReadAtLeast(ch, 8, throwOnEndOfStream: false) < 8)
                break;
            uint size = BinaryPrimitives.ReadUInt32LittleEndian(ch[4..]);
            long bodyAt = pos + 8;
            if (bodyAt + size > fileSize)
                break;
            if (ch[..4].SequenceEqual("data"u8))
                data.Add(new FileExtent(bodyAt, size));
            else
                between++;
            pos = bodyAt + size + (size & 1);
        }
        return data.Count > 1 ? first with { DataChunks = data, Between = between } : first;
    }

    private static string Printable(string id) => new(id.Select(c => c is >= ' ' and <= '~' ? c : '?').ToArray());

    private static string OneLine(string s) => s.ReplaceLineEndings(" ").Trim();

    /// <summary>A read-only view of a stream whose first bytes read as another magic (BW64 is RF64 with another
    /// name).</summary>
    private sealed class MagicPatchStream(Stream inner, byte[] magic) : Stream
    {
        public override bool CanRead => true;
        public override bool CanSeek => inner.CanSeek;
        public override bool CanWrite => false;
        public override long Length => inner.Length;
        public override long Position
        {
            get => inner.Position;
            set => inner.Position = value;
        }

        public override void Flush() { }

        public override int Read(byte[] buffer, int offset, int count) => Read(buffer.AsSpan(offset, count));

        public override int Read(Span<byte> buffer)
        {
            long at = inner.Position;
            int n = inner.Read(buffer);
            for (long i = at; i < magic.Length && i < at + n; i++)
                buffer[(int)(i - at)] = magic[i];
            return n;
        }

        public override long Seek(long offset, SeekOrigin origin) => inner.Seek(offset, origin);

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();

        protected override void Dispose(bool disposing)
        {
            if (disposing)
                inner.Dispose();
            base.Dispose(disposing);
        }
    }
}
