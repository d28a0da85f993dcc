using SignalInspect.Capture;
using SignalInspect.Dsp;

namespace SignalInspect.Demodulation;

/// <summary>What one demodulation pass does: the window, the channel filter, the rates and the post-detection
/// filters.</summary>
/// <remarks>With <see cref="HalfBand"/> the channel filter is two stages: the half-band at Fs, then <see cref="Taps"/>
/// at Fs / 2.</remarks>
internal sealed record PassPlan(
    CaptureSource Source,
    long First,
    long Count,
    double[] Taps,
    int Decimation,
    double ShiftHz,
    double Fs,
    double Fsd,
    double ChannelHalfWidthHz,
    double PostLowPassHz,
    double? HighPassHz,
    double? DeEmphasisUs,
    bool Complex,
    int Threads,
    double[]? HalfBand = null
)
{
    /// <summary>Input samples one channel-filter output depends on (the filter's length at the input rate).</summary>
    public int ChannelSpan => ChannelDecimator.InputSpan(Taps, HalfBand);
}
