using NAudio.Wave;

namespace SignalInspect.Capture;

/// <summary>The sample-data bytes of a capture, read sequentially with seeks; never the whole file at once.</summary>
internal abstract class ByteSource : IDisposable
{
    /// <summary>Sample-data bytes available.</summary>
    public abstract long Length { get; }

    /// <summary>Moves to a byte offset within the sample data.</summary>
    public abstract void Seek(long offset);

    /// <summary>Reads up to <paramref name="buffer"/>.Length bytes; returns 0 only at the end.</summary>
    public abstract int Read(Span<byte> buffer);

    /// <inheritdoc />
    public abstract void Dispose();

    private MappedExtent? _mapped;
    private bool _mapTried;

    /// <summary>The sample data through a memory map (see <see cref="MappedExtent"/>), made on first use, or null where
    /// it cannot be mapped: then only <see cref="Read"/>.</summary>
    public MappedExtent? Mapped
    {
        get
        {
            if (!_mapTried)
            {
                _mapTried = true;
                _mapped = TryMap();
            }
            return _mapped;
        }
    }

    /// <summary>Maps the sample data if this source can (<see cref="MappedExtent.TryOpen"/>); null otherwise.</summary>
    protected virtual MappedExtent? TryMap() => null;

    /// <summary>Releases the map, if one was made; each source's <see cref="Dispose"/> calls it before closing its
    /// file.</summary>
    protected void DisposeMap() => _mapped?.Dispose();

    /// <summary>Opens a file for reading only, shared with other readers, for sequential access.</summary>
    /// <summary>
    /// The length of a file in bytes, through symbolic links to their final target (FileInfo.Length of a link is
    /// the length of the link's own text): a linked capture is read as its target.
    /// </summary>
    /// <exception cref="CaptureException">The link leads to nothing.</exception>
    public static long LengthOf(string path)
    {
        var info = new FileInfo(path);
        if (info.LinkTarget is null)
            return info.Length;
        return info.ResolveLinkTarget(returnFinalTarget: true) is FileInfo { Exists: true } target
            ? target.Length
            : throw CaptureException.ForFile(path, "is a symbolic link to a file that does not exist");
    }

    public static FileStream OpenReadOnly(string path) =>
        new(
            path,
            new FileStreamOptions
            {
                Mode = FileMode.Open,
                Access = FileAccess.Read,
                Share = FileShare.Read | FileShare.Delete,
                Options = FileOptions.SequentialScan,
                BufferSize = 0,
            }
        );
}

/// <summary>One contiguous byte range of a file.</summary>
internal readonly record struct FileExtent(long Offset, long Length);

/// <summary>Sample data held in one or more byte ranges of a file (raw files, SigMF data, tar members).</summary>
internal sealed class FileExtentSource : ByteSource
{
    private readonly FileStream _stream;
    private readonly FileExtent[] _extents;
    private readonly long _length;
    private long _position;

    public FileExtentSource(string path, IReadOnlyList<FileExtent> extents)
    {
        _stream = OpenReadOnly(path);
        _extents = [.. extents];
        _length = _extents.Sum(e => e.Length);
    }

    public override long Length => _length;

    /// <summary>Mapped when the data is one range of the file (a raw file, a SigMF data file or archive
    /// member).</summary>
    protected override MappedExtent? TryMap() =>
        _extents.Length == 1 ? MappedExtent.TryOpen(_stream, _extents[0].Offset, _extents[0].Length) : null;

    public override void Seek(long offset) => _position = Math.Clamp(offset, 0, _length);

    public override int Read(Span<byte> buffer)
    {
        int total = 0;
        while (total < buffer.Length && _position < _length)
        {
            long start = 0;
            FileExtent extent = default;
            foreach (FileExtent e in _extents)
            {
                if (_position < start + e.Length)
                {
                    extent = e;
                    break;
                }
                start += e.Length;
            }
            long within = _position - start;
            int want = (int)Math.Min(buffer.Length - total, extent.Length - within);
            _stream.Position = extent.Offset + within;
            int got = _stream.Read(buffer.Slice(total, want));
            if (got <= 0)
                break;
            total += got;
            _position += got;
        }
        return total;
    }

    public override void Dispose()
    {
        DisposeMap();
        _stream.Dispose();
    }
}

/// <summary>The data chunk of a WAV/RF64 file, read through NAudio's reader (whole blocks only).</summary>
internal sealed class WaveDataSource : ByteSource
{
    private readonly Stream _stream;
    private readonly WaveFileReader _reader;
    private readonly long _length;
    private readonly FileStream? _file;
    private readonly long _dataStart;

    /// <param name="stream">What NAudio reads.</param>
    /// <param name="reader">NAudio's reader over it.</param>
    /// <param name="length">Data bytes to deliver.</param>
    /// <param name="file">The file under <paramref name="stream"/>, for mapping the data chunk; null: reads
    /// only.</param>
    /// <param name="dataStart">The data chunk's first byte in <paramref name="file"/>.</param>
    public WaveDataSource(
        Stream stream,
        WaveFileReader reader,
        long length,
        FileStream? file = null,
        long dataStart = 0
    )
    {
        _stream = stream;
        _reader = reader;
        _length = length;
        _file = file;
        _dataStart = dataStart;
    }

    public override long Length => _length;

    /// <summary>The data chunk mapped (when it lies wholly within the file; a chunk cut short is read).</summary>
    protected override MappedExtent? TryMap() =>
        _file is null ? null : MappedExtent.TryOpen(_file, _dataStart, _length);

    public override void Seek(long offset)
    {
        long block = _reader.BlockAlign;
        _reader.Position = Math.Clamp(offset, 0, _length) / block * block;
    }

    public override int Read(Span<byte> buffer)
    {
        long left = _length - _reader.Position;
        if (left <= 0)
            return 0;
        int block = _reader.BlockAlign;
        int want = (int)Math.Min(buffer.Length, left) / block * block;
        if (want == 0)
            return 0;
        int total = 0;
        while (total < want)
        {
            int got = _reader.Read(buffer[total..want]);
            if (got <= 0)
                break;
            total += got;
        }
        return total;
    }

    public override void Dispose()
    {
        DisposeMap();
        _reader.Dispose();
        _stream.Dispose();
    }
}
