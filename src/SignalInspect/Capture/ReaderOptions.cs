namespace SignalInspect.Capture;

/// <summary>How to pick the analysed signal from a file with several channels.</summary>
public enum ChannelSelection
{
    /// <summary>Default: two channels are I/Q (I on channel 0, the common practice); one channel is real.</summary>
    Auto,

    /// <summary>Two channels as I/Q with I on channel 0.</summary>
    IQ,

    /// <summary>Two channels as I/Q with I and Q swapped (I on channel 1).</summary>
    QI,

    /// <summary>Channel 0 as a real (audio) signal.</summary>
    Left,

    /// <summary>Channel 1 as a real (audio) signal.</summary>
    Right,

    /// <summary>The channel given by <see cref="ReaderOptions.ChannelIndex"/>.</summary>
    Index,
}

/// <summary>
/// Options that say how to read a capture. Each may be null: the file's own metadata is used,
/// and a value given here overrides or fills it (the capture's notes say so).
/// </summary>
public sealed record ReaderOptions
{
    /// <summary>SigMF datatype word for headerless raw files (e.g. <c>cu8</c>, <c>ci16_le</c>,
    /// <c>cf32_le</c>).</summary>
    public string? Datatype { get; init; }

    /// <summary>Sample rate in Hz; required for raw files, overrides metadata otherwise.</summary>
    public double? SampleRateHz { get; init; }

    /// <summary>Centre frequency in Hz; fills or overrides the metadata.</summary>
    public double? CenterFrequencyHz { get; init; }

    /// <summary>How to use several channels.</summary>
    public ChannelSelection Channels { get; init; } = ChannelSelection.Auto;

    /// <summary>Channel number (zero-based) when <see cref="Channels"/> is <see
    /// cref="ChannelSelection.Index"/>.</summary>
    public int ChannelIndex { get; init; }

    /// <summary>SigMF capture segment to read (zero-based), null for the whole recording.</summary>
    public int? Segment { get; init; }

    /// <summary>Verify <c>core:sha512</c> when present (default true).</summary>
    public bool VerifyChecksum { get; init; } = true;

    /// <summary>Default options: everything from the file.</summary>
    public static ReaderOptions Default { get; } = new();

    /// <summary>Parses a channel selection word: <c>iq</c>, <c>qi</c>, <c>left</c>, <c>right</c> or a channel
    /// number.</summary>
    /// <exception cref="SettingException">The word is none of these.</exception>
    public static (ChannelSelection Selection, int Index) ParseChannel(string word)
    {
        string w = word.Trim().ToLowerInvariant();
        return w switch
        {
            "auto" => (ChannelSelection.Auto, 0),
            "iq" => (ChannelSelection.IQ, 0),
            "qi" => (ChannelSelection.QI, 0),
            "left" or "l" => (ChannelSelection.Left, 0),
            "right" or "r" => (ChannelSelection.Right, 1),
            _ when int.TryParse(
                    w,
                    System.Globalization.NumberStyles.None,
                    System.Globalization.CultureInfo.InvariantCulture,
                    out int n
                ) => (ChannelSelection.Index, n),
            _ => throw new SettingException(nameof(Channels), word, "is not iq, qi, left, right or a channel number"),
        };
    }
}
