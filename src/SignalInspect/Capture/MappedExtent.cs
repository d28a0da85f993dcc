using System.IO.MemoryMappedFiles;

namespace SignalInspect.Capture;

/// <summary>
/// One byte range of a file seen through a memory map, a bounded window at a time, so that the
/// bytes are used where the page cache holds them instead of being copied out by a read (a read of
/// a 1.15 GB capture spends ~0.1 s of CPU in the kernel's copy alone; touching it through a map,
/// ~0.02 s). Only the current window is mapped, so the process's resident memory stays bounded
/// whatever the file's length. Not thread-safe: one per reader.
/// </summary>
/// <remarks>
/// A file truncated by another program while it is mapped faults the process (SIGBUS) where a read
/// would have come up short; set SIGNALINSPECT_NO_MAP=1 to read with copies instead (see <see cref="Enabled"/>).
/// </remarks>
internal sealed unsafe class MappedExtent : IDisposable
{
    /// <summary>Bytes mapped at a time (more when one request needs more).</summary>
    public const int WindowBytes = 8 << 20;

    private readonly MemoryMappedFile _map;
    private readonly FileStream _stream;
    private readonly long _offset,
        _length;
    private readonly int _window;
    private MemoryMappedViewAccessor? _view;
    private byte* _base;
    private long _viewStart,
        _viewLength;

    private MappedExtent(MemoryMappedFile map, FileStream stream, long offset, long length, int window)
    {
        _map = map;
        _stream = stream;
        _offset = offset;
        _length = length;
        _window = window;
    }

    /// <summary>
    /// Whether files are mapped at all: yes unless the environment variable SIGNALINSPECT_NO_MAP is
    /// set to 1 (read with copies, e.g. for a file that another program may truncate), and unless tests switch it.
    /// </summary>
    public static bool Enabled => EnabledForTests.Value ?? !FromEnvironment;

    private static readonly bool FromEnvironment = Environment.GetEnvironmentVariable("SIGNALINSPECT_NO_MAP") == "1";

    /// <summary>Tests only: maps or reads in the calling flow whatever the environment says.</summary>
    internal static readonly AsyncLocal<bool?> EnabledForTests = new();

    /// <summary>Tests only: a smaller window in the calling flow, so that small files cross window
    /// boundaries.</summary>
    internal static readonly AsyncLocal<int?> WindowBytesForTests = new();

    /// <summary>
    /// Maps <paramref name="length"/> bytes of <paramref name="stream"/> from <paramref name="offset"/>
    /// for reading; null when mapping is switched off, the range is empty or lies past the file's end,
    /// or the file cannot be mapped (a pipe, a special file): the caller then reads with copies.
    /// The stream stays open and owned by the caller.
    /// </summary>
    public static MappedExtent? TryOpen(FileStream stream, long offset, long length)
    {
        if (!Enabled || length <= 0 || offset < 0)
            return null;
        try
        {
            if (offset + length > stream.Length)
                return null;
            var map = MemoryMappedFile.CreateFromFile(
                stream,
                null,
                0,
                MemoryMappedFileAccess.Read,
                HandleInheritability.None,
                leaveOpen: true
            );
            return new MappedExtent(map, stream, offset, length, WindowBytesForTests.Value ?? WindowBytes);
        }
        catch (Exception e)
            when (e is IOException or UnauthorizedAccessException or NotSupportedException or ArgumentException)
        {
            return null;
        }
    }

    /// <summary>Bytes in the range.</summary>
    public long Length => _length;

    /// <summary>Bytes mapped at a time (<see cref="WindowBytes"/> outside tests).</summary>
    public int Window => _window;

    /// <summary>
    /// The range's bytes from <paramref name="at"/>, <paramref name="count"/> of them or up to the
    /// range's end; valid until the next call or <see cref="Dispose"/>.
    /// </summary>
    public ReadOnlySpan<byte> Get(long at, int count)
    {
        if (at < 0 || at > _length)
            throw new ArgumentOutOfRangeException(nameof(at));
        count = (int)Math.Min(count, _length - at);
        if (count <= 0)
            return default;
        if (at < _viewStart || at + count > _viewStart + _viewLength || _view is null)
        {
            Release();
            long len = Math.Min(Math.Max(_window, count), _length - at);
            // Touching a mapped page past a file's end kills the process (SIGBUS): before each window the file's
            // length is looked at again, so a file cut by another program is an error, not a crash (a cut during
            // the window's own few milliseconds is still not caught: SIGNALINSPECT_NO_MAP=1 closes that too).
            if (CurrentLength() < _offset + at + len)
                throw CaptureReader.Shrank(_stream.Name);
            _view = _map.CreateViewAccessor(_offset + at, len, MemoryMappedFileAccess.Read);
            byte* p = null;
            _view.SafeMemoryMappedViewHandle.AcquirePointer(ref p);
            _base = p + _view.PointerOffset;
            _viewStart = at;
            _viewLength = len;
        }
        return new ReadOnlySpan<byte>(_base + (at - _viewStart), count);
    }

    /// <summary>The file's length now (by its name: the open stream caches it); unknown (taken as enough) when the
    /// name no longer leads to it, as after a delete, which leaves the mapped data readable.</summary>
    private long CurrentLength()
    {
        try
        {
            return ByteSource.LengthOf(_stream.Name);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException or CaptureException)
        {
            return long.MaxValue;
        }
    }

    private void Release()
    {
        if (_view is null)
            return;
        _view.SafeMemoryMappedViewHandle.ReleasePointer();
        _view.Dispose();
        _view = null;
        _base = null;
        _viewLength = 0;
    }

    /// <inheritdoc />
    public void Dispose()
    {
        Release();
        _map.Dispose();
    }
}
