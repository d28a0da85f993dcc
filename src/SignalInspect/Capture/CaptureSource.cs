namespace SignalInspect.Capture;

/// <summary>
/// An opened capture: what it is (<see cref="Info"/>) and the means to read windows of it.
/// Holds no file handle itself; each <see cref="CaptureReader"/> opens its own, so several
/// readers (e.g. parallel stages) can read one capture at once.
/// </summary>
public sealed class CaptureSource
{
    private readonly Func<ByteSource> _openBytes;
    private readonly SampleFormat _storedFormat;
    private readonly int _frameComponents;
    private readonly int[] _pick;
    private readonly long _firstSample;

    internal CaptureSource(
        CaptureInfo info,
        Func<ByteSource> openBytes,
        SampleFormat storedFormat,
        int frameComponents,
        int[] pick,
        long firstSample = 0
    )
    {
        Info = info;
        _openBytes = openBytes;
        _storedFormat = storedFormat;
        _frameComponents = frameComponents;
        _pick = pick;
        _firstSample = firstSample;
    }

    /// <summary>What was read from the file.</summary>
    public CaptureInfo Info { get; }

    /// <summary>A centre frequency the user gave, which wins over a segment's own.</summary>
    internal double? CenterOverrideHz { get; init; }

    internal CaptureSource WithInfo(CaptureInfo info) =>
        new(info, _openBytes, _storedFormat, _frameComponents, _pick, _firstSample)
        {
            CenterOverrideHz = CenterOverrideHz,
        };

    /// <summary>
    /// Opens a capture, choosing the reader from the file's content and name: WAV/RF64/BW64,
    /// SigMF (<c>.sigmf-meta</c>, <c>.sigmf-data</c>, <c>.sigmf</c> archive) or headerless raw IQ.
    /// The file is opened read-only and never written.
    /// </summary>
    /// <exception cref="CaptureException">The file is missing, malformed or needs options it was not given.</exception>
    public static CaptureSource Open(string path, ReaderOptions? options = null)
    {
        options ??= ReaderOptions.Default;
        if (Directory.Exists(path))
            throw CaptureException.ForFile(path, "is a folder, not a capture file");
        if (!File.Exists(path))
            throw CaptureException.ForFile(path, "file not found");
        try
        {
            return OpenKnown(path, options);
        }
        catch (IOException e) when (e is not FileNotFoundException)
        {
            throw CaptureException.ForFile(path, "cannot be read: " + e.Message);
        }
        catch (UnauthorizedAccessException)
        {
            throw CaptureException.ForFile(path, "permission denied");
        }
    }

    private static CaptureSource OpenKnown(string path, ReaderOptions options)
    {
        long size = ByteSource.LengthOf(path);
        CaptureFileKind kind = CaptureFormats.KindOf(path);
        if (kind == CaptureFileKind.SigMfPair)
            return SigMfReader.OpenPair(path, options);
        if (size == 0)
            throw CaptureException.ForFile(path, "file is empty");
        if (kind == CaptureFileKind.SigMfArchive)
            return SigMfReader.OpenArchive(path, options);
        string magic = ReadMagic(path);
        if (magic is "RIFF" or "RF64" or "BW64")
            return WavReader.Open(path, options);
        if (kind == CaptureFileKind.Wav)
            throw CaptureException.ForFile(path, "not a WAV file (no RIFF, RF64 or BW64 header)");
        string sidecar = path + CaptureFormats.SidecarSuffix;
        if (File.Exists(sidecar))
        {
            CaptureSource raw = RawReader.Open(path, CaptureFormats.UnderSidecar(path, options));
            return raw.WithInfo(
                raw.Info with
                {
                    Notes =
                    [
                        .. raw.Info.Notes,
                        $"what the options left unset was read from {Path.GetFileName(sidecar)}",
                    ],
                }
            );
        }
        return RawReader.Open(path, options);
    }

    private static string ReadMagic(string path)
    {
        using FileStream fs = ByteSource.OpenReadOnly(path);
        Span<byte> head = stackalloc byte[4];
        int n = fs.ReadAtLeast(head, 4, throwOnEndOfStream: false);
        return n < 4 ? string.Empty : System.Text.Encoding.ASCII.GetString(head);
    }

    /// <summary>Opens a reader over the whole capture.</summary>
    public CaptureReader OpenReader() => OpenReader(0, Info.SampleCount);

    /// <summary>Opens a reader over a window given in samples.</summary>
    /// <param name="firstSample">First sample, from 0.</param>
    /// <param name="sampleCount">Samples to read; clipped to the end of the capture.</param>
    /// <exception cref="ArgumentOutOfRangeException">The window starts outside the capture.</exception>
    public CaptureReader OpenReader(long firstSample, long sampleCount)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(firstSample);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(firstSample, Info.SampleCount);
        ArgumentOutOfRangeException.ThrowIfNegative(sampleCount);
        long count = Math.Min(sampleCount, Info.SampleCount - firstSample);
        var decoder = new SampleDecoder(_storedFormat, _frameComponents, _pick);
        return new CaptureReader(Info, _openBytes(), decoder, _firstSample + firstSample, count);
    }

    /// <summary>
    /// A window given in seconds from the capture's first sample, as (first sample, sample count);
    /// the count is clipped to the end of the capture.
    /// </summary>
    /// <param name="startS">Start time in seconds, 0 or more and less than the duration.</param>
    /// <param name="durationS">Length in seconds, null for "to the end".</param>
    /// <exception cref="SettingException">The window lies outside the capture.</exception>
    public (long First, long Count) WindowSamples(double startS, double? durationS)
    {
        if (!double.IsFinite(startS) || startS < 0 || (startS > 0 && startS >= Info.DurationS))
            throw new SettingException(
                "StartS",
                startS,
                $"lies outside the capture (0 to {Info.DurationS:0.######} s)",
                Info.Path
            );
        if (durationS is { } d && (!double.IsFinite(d) || d <= 0))
            throw new SettingException("DurationS", d, "must be a positive number of seconds", Info.Path);
        long first = (long)Math.Round(startS * Info.SampleRateHz);
        long count = durationS is { } dur ? (long)Math.Round(dur * Info.SampleRateHz) : Info.SampleCount - first;
        return (first, Math.Min(count, Info.SampleCount - first));
    }

    /// <summary>Opens a reader over a window given in seconds from the capture's first sample (see <see
    /// cref="WindowSamples"/>).</summary>
    /// <exception cref="SettingException">The window lies outside the capture.</exception>
    public CaptureReader OpenReader(double startS, double? durationS)
    {
        var (first, count) = WindowSamples(startS, durationS);
        return OpenReader(first, count);
    }

    /// <summary>
    /// The same capture restricted to one SigMF capture segment (its own centre frequency and time).
    /// </summary>
    /// <exception cref="CaptureException">The index names no segment.</exception>
    public CaptureSource ForSegment(int index)
    {
        if (index < 0 || index >= Info.Segments.Count)
            throw new SettingException(
                nameof(ReaderOptions.Segment),
                index,
                $"the recording has {Info.Segments.Count} capture segment(s), numbered from 0",
                Info.Path
            );
        CaptureSegment seg = Info.Segments[index];
        long first = Info.Segments.Take(index).Sum(s => s.SampleCount);
        CaptureInfo info = Info with
        {
            SampleCount = seg.SampleCount,
            CenterFrequencyHz = CenterOverrideHz ?? seg.FrequencyHz ?? Info.CenterFrequencyHz,
            StartTime = seg.StartTime,
            SelectedSegment = index,
        };
        return new CaptureSource(info, _openBytes, _storedFormat, _frameComponents, _pick, _firstSample + first)
        {
            CenterOverrideHz = CenterOverrideHz,
        };
    }

    /// <summary>
    /// Works out which frame components make the delivered signal, from the stored layout and
    /// the user's channel choice. Real multi-channel data (WAV) can pair two channels into I/Q.
    /// </summary>
    internal static (int[] Pick, bool IsComplex, string Use) PickChannels(
        string path,
        SampleFormat stored,
        int channels,
        ReaderOptions options
    )
    {
        if (channels < 1)
            throw CaptureException.ForFile(path, "the file declares zero channels");
        int Check(int ch)
        {
            if (ch < 0 || ch >= channels)
                throw new SettingException(
                    nameof(ReaderOptions.Channels),
                    ch,
                    $"the file has {channels} channel(s), numbered from 0",
                    path
                );
            return ch;
        }
        if (stored.IsComplex)
        {
            if (
                options.Channels
                    is ChannelSelection.IQ
                        or ChannelSelection.QI
                        or ChannelSelection.Left
                        or ChannelSelection.Right
                && channels == 1
            )
                throw new SettingException(
                    nameof(ReaderOptions.Channels),
                    options.Channels.ToString().ToLowerInvariant(),
                    "iq, qi, left and right apply to real two-channel files; this file is already complex",
                    path
                );
            int ch = options.Channels == ChannelSelection.Index ? Check(options.ChannelIndex) : 0;
            if (channels > 1 && options.Channels != ChannelSelection.Index)
                throw new SettingException(
                    nameof(ReaderOptions.Channels),
                    null,
                    $"the file has {channels} complex channels: pick one by number (0 to {channels - 1})",
                    path
                );
            return (
                [2 * ch, 2 * ch + 1],
                true,
                channels == 1 ? "single complex channel" : $"complex channel {ch} of {channels}"
            );
        }
        switch (options.Channels)
        {
            case ChannelSelection.Auto when channels == 1:
                return ([0], false, "single real channel");
            case ChannelSelection.Auto or ChannelSelection.IQ when channels == 2:
                return ([0, 1], true, "I = channel 0, Q = channel 1");
            case ChannelSelection.QI when channels == 2:
                return ([1, 0], true, "I = channel 1, Q = channel 0 (swapped)");
            case ChannelSelection.IQ or ChannelSelection.QI:
                throw new SettingException(
                    nameof(ReaderOptions.Channels),
                    options.Channels.ToString().ToLowerInvariant(),
                    $"iq and qi need exactly two channels; the file has {channels}",
                    path
                );
            case ChannelSelection.Left:
                return ([0], false, $"channel 0 (left) of {channels}, as a real signal");
            case ChannelSelection.Right:
                Check(1);
                return ([1], false, $"channel 1 (right) of {channels}, as a real signal");
            case ChannelSelection.Index:
                return (
                    [Check(options.ChannelIndex)],
                    false,
                    $"channel {options.ChannelIndex} of {channels}, as a real signal"
                );
            default:
                throw new SettingException(
                    nameof(ReaderOptions.Channels),
                    null,
                    $"the file has {channels} channels: pick one by number (0 to {channels - 1})",
                    path
                );
        }
    }

    /// <summary>Lowest sample rate read, Hz.</summary>
    public const double MinRateHz = 1;

    /// <summary>Highest sample rate read, Hz (100 GS/s).</summary>
    public const double MaxRateHz = 1e11;

    /// <summary>The origin of a rate the user gave (a setting, not the file).</summary>
    internal const string UserGiven = "the rate given";

    /// <summary>Validates a sample rate from a file or an option.</summary>
    /// <param name="path">File, for the message.</param>
    /// <param name="rateHz">The rate, null when none was found.</param>
    /// <param name="origin">Where the rate came from (e.g. "global.core:sample_rate"), or why there is none.</param>
    internal static double CheckRate(string path, double? rateHz, string origin)
    {
        if (rateHz is not { } r)
            throw new SettingException(nameof(ReaderOptions.SampleRateHz), null, $"needed ({origin})", path);
        // 1 Hz to 100 GHz: beyond either end durations and bin widths overflow or vanish (1e-308 Hz read as an
        // infinite duration with NaN results; 1e13 Hz overflowed a sample count).
        bool plausible = double.IsFinite(r) && r >= MinRateHz && r <= MaxRateHz;
        if (origin == UserGiven && !plausible)
            throw new SettingException(
                nameof(ReaderOptions.SampleRateHz),
                r,
                "must be a number of Hz from 1 to 1e11",
                path
            );
        if (!plausible)
            throw CaptureException.ForFile(path, $"sample rate {r:R} Hz from {origin} must lie from 1 Hz to 1e11 Hz");
        return r;
    }
}
