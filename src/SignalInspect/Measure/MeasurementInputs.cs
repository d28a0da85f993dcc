using SignalInspect.Capture;
using SignalInspect.Demodulation;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>What every measurement of one analysis reads: the spectrum pass and the demodulation pass.</summary>
internal sealed record MeasurementInputs
{
    /// <summary>What was read.</summary>
    public required CaptureInfo Info { get; init; }

    /// <summary>The mean spectrum (density per Hz).</summary>
    public required PowerSpectrum Psd { get; init; }

    /// <summary>Occupied and x-dB bandwidths of <see cref="Psd"/>.</summary>
    public required BandwidthResult Bandwidth { get; init; }

    /// <summary>The channel the demodulator kept.</summary>
    public required ChannelPlan Channel { get; init; }

    /// <summary>The demodulation pass's statistics.</summary>
    public required PassResult Pass { get; init; }

    /// <summary>Its peaks and spreads.</summary>
    public required DemodulatedFeatures Features { get; init; }

    /// <summary>SNR in the occupied bandwidth, dB.</summary>
    public required double SnrDb { get; init; }

    /// <summary>Lowest modulating frequency searched, Hz: three line-spectrum bins, and two cycles in the
    /// window.</summary>
    public required double MinToneHz { get; init; }

    /// <summary>The modulating frequency found, or null.</summary>
    public Measured? Tone { get; init; }

    /// <summary>The modulating components found, strongest first (empty for CW, FSK and noise).</summary>
    public IReadOnlyList<ModulatingComponent> Components { get; init; } = [];

    /// <summary>How the type-B peak figures grow at this SNR (<see cref="TypeB.NoiseGrowth"/>).</summary>
    public double NoiseGrowth => TypeB.NoiseGrowth(SnrDb);

    /// <summary>
    /// Highest envelope frequency searched, Hz. The envelope is not post-detection filtered (only the
    /// instantaneous frequency is): its lines are searched over the channel's width, so a narrow
    /// post-detection low-pass cannot hide an AM tone.
    /// </summary>
    public double EnvelopeTopHz => Math.Min(Channel.HalfWidthHz, 0.45 * Channel.DecimatedRateHz);
}

/// <summary>What a modulation's measurement adds to the analysis besides its result record.</summary>
/// <param name="NecessaryBandwidthHz">Necessary bandwidth by 47 CFR 2.202, Hz, when a formula applies.</param>
/// <param name="PeaksCorrected">True when the peaks were corrected for the measured noise.</param>
internal readonly record struct MeasurementExtras(double? NecessaryBandwidthHz, bool PeaksCorrected);
