namespace SignalInspect.Capture;

/// <summary>One capture segment of a SigMF recording (a run of samples with its own metadata).</summary>
/// <param name="Index">Zero-based position in the recording's capture list.</param>
/// <param name="SampleStart">First sample of the segment (<c>core:sample_start</c>).</param>
/// <param name="SampleCount">Samples in the segment (up to the next segment or the end).</param>
/// <param name="FrequencyHz">Centre frequency (<c>core:frequency</c>), null when not given.</param>
/// <param name="StartTime">Time of the first sample (<c>core:datetime</c>), null when not given.</param>
/// <param name="HeaderBytes">Bytes of non-sample data before the segment (<c>core:header_bytes</c>).</param>
public sealed record CaptureSegment(
    int Index,
    long SampleStart,
    long SampleCount,
    double? FrequencyHz,
    DateTimeOffset? StartTime,
    long HeaderBytes
);

/// <summary>One SigMF annotation, as listed in the metadata.</summary>
/// <param name="SampleStart">First sample the annotation covers.</param>
/// <param name="SampleCount">Samples covered, null for "to the end".</param>
/// <param name="LowerEdgeHz">Lower frequency edge, null when not given.</param>
/// <param name="UpperEdgeHz">Upper frequency edge, null when not given.</param>
/// <param name="Label">Short label, null when not given.</param>
/// <param name="Comment">Free text, null when not given.</param>
public sealed record CaptureAnnotation(
    long SampleStart,
    long? SampleCount,
    double? LowerEdgeHz,
    double? UpperEdgeHz,
    string? Label,
    string? Comment
);

/// <summary>
/// What was read from a capture file: everything later stages need to interpret its samples.
/// Values are as the file states them, after any user override (recorded in <see cref="Notes"/>).
/// </summary>
public sealed record CaptureInfo
{
    /// <summary>Path of the file the user named.</summary>
    public required string Path { get; init; }

    /// <summary>Container: <c>WAV</c>, <c>RF64</c>, <c>BW64</c>, <c>raw</c>, <c>SigMF</c> or <c>SigMF
    /// archive</c>.</summary>
    public required string Container { get; init; }

    /// <summary>Sample rate in Hz (always positive and finite).</summary>
    public required double SampleRateHz { get; init; }

    /// <summary>Centre (tuning) frequency in Hz, null when unknown.</summary>
    public double? CenterFrequencyHz { get; init; }

    /// <summary>True for complex (I/Q) samples, false for a real signal.</summary>
    public required bool IsComplex { get; init; }

    /// <summary>Samples available to read (per channel), after selecting a segment.</summary>
    public required long SampleCount { get; init; }

    /// <summary>Duration in seconds: <see cref="SampleCount"/> / <see cref="SampleRateHz"/>.</summary>
    public double DurationS => SampleCount / SampleRateHz;

    /// <summary>Channels in the file (a two-channel IQ WAV has 2; a one-channel complex SigMF has 1).</summary>
    public required int Channels { get; init; }

    /// <summary>How the delivered signal is taken from the file's channels, e.g. "I=ch0, Q=ch1", "ch1
    /// (right)".</summary>
    public required string ChannelUse { get; init; }

    /// <summary>Datatype of the delivered signal in SigMF words (e.g. <c>ci16_le</c> for a 16-bit IQ WAV).</summary>
    public required string Datatype { get; init; }

    /// <summary>Time of the first sample, null when unknown.</summary>
    public DateTimeOffset? StartTime { get; init; }

    /// <summary>The file that holds the samples (the .sigmf-data file of a SigMF pair; else the file named).</summary>
    public string? DataPath { get; init; }

    /// <summary>Size of the file the user named, in bytes.</summary>
    public required long FileSizeBytes { get; init; }

    /// <summary>SigMF capture segments (empty for other containers).</summary>
    public IReadOnlyList<CaptureSegment> Segments { get; init; } = [];

    /// <summary>The segment chosen with a segment option, null when the whole recording is read.</summary>
    public int? SelectedSegment { get; init; }

    /// <summary>SigMF annotations (empty for other containers).</summary>
    public IReadOnlyList<CaptureAnnotation> Annotations { get; init; } = [];

    /// <summary>Free-text description from the metadata, null when none.</summary>
    public string? Description { get; init; }

    /// <summary>Recording hardware from the metadata, null when none.</summary>
    public string? Hardware { get; init; }

    /// <summary>The program that wrote the recording (SigMF core:recorder), null when not stated.</summary>
    public string? Recorder { get; init; }

    /// <summary>Who made the recording (SigMF core:author), null when not stated.</summary>
    public string? Author { get; init; }

    /// <summary>Where it was made (SigMF core:geolocation) in words, null when not stated.</summary>
    public string? Location { get; init; }

    /// <summary>State of the data checksum: "verified", "not present", "not checked".</summary>
    public string ChecksumStatus { get; init; } = "not present";

    /// <summary>What the reader changed or filled in at the user's request (overrides), one line each.</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];

    /// <summary>Problems found that still allow a result (e.g. a truncated data chunk), one line each.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];
}
