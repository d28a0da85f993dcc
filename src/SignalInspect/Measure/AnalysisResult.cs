using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>A measured value with its standard uncertainty (k = 1) and how that was estimated.</summary>
/// <param name="Value">The value, in the unit of the property that holds it.</param>
/// <param name="StandardUncertainty">Standard uncertainty (k = 1), same unit.</param>
public readonly record struct Measured(double Value, double StandardUncertainty);

/// <summary>Carrier frequency and offset.</summary>
public sealed record CarrierResult
{
    /// <summary>Carrier frequency: absolute RF in Hz when the centre is known, else relative to the centre (audio
    /// frequency for real input).</summary>
    public required Measured FrequencyHz { get; init; }

    /// <summary>Offset from the nominal frequency (or from the centre when no nominal is given), Hz.</summary>
    public required double OffsetHz { get; init; }

    /// <summary>Offset in parts per million of the RF frequency, null when the RF frequency is unknown.</summary>
    public double? OffsetPpm { get; init; }

    /// <summary>The frequency the offset is taken from.</summary>
    public required string OffsetReference { get; init; }

    /// <summary>Estimator used.</summary>
    public required string Method { get; init; }
}

/// <summary>AM measurements from the envelope (A(t) = Ac (1 + m cos wt) in the single-tone case).</summary>
public sealed record AmResult
{
    /// <summary>Depth m = (Amax - Amin) / (Amax + Amin), percent.</summary>
    public required Measured DepthPercent { get; init; }

    /// <summary>Positive-peak modulation (Amax - Ac) / Ac, percent.</summary>
    public required double PositivePeakPercent { get; init; }

    /// <summary>Negative-peak modulation (Ac - Amin) / Ac, percent.</summary>
    public required double NegativePeakPercent { get; init; }

    /// <summary>Depth from the first sideband pair: m = 2 sqrt(P_sideband / P_carrier), percent; null when no sideband
    /// was found.</summary>
    public double? SidebandDepthPercent { get; init; }
}

/// <summary>FM measurements from the post-detection instantaneous frequency.</summary>
public sealed record FmResult
{
    /// <summary>Peak deviation: the larger of the positive and negative peaks, Hz.</summary>
    public required Measured PeakDeviationHz { get; init; }

    /// <summary>Positive peak (99.9th percentile of the deviation), Hz.</summary>
    public required double PositivePeakHz { get; init; }

    /// <summary>Negative peak (0.1th percentile, as a positive number), Hz.</summary>
    public required double NegativePeakHz { get; init; }

    /// <summary>Half the peak-to-peak deviation, Hz.</summary>
    public required double HalfPeakToPeakHz { get; init; }

    /// <summary>RMS deviation about the carrier, Hz.</summary>
    public required double RmsDeviationHz { get; init; }

    /// <summary>Modulation index D / fm, null without a modulating frequency.</summary>
    public double? ModulationIndex { get; init; }
}

/// <summary>PM measurements from the phase about the fitted carrier.</summary>
public sealed record PmResult
{
    /// <summary>Peak phase deviation: half the peak-to-peak phase (0.1th to 99.9th percentile), rad.</summary>
    public required Measured PeakDeviationRad { get; init; }

    /// <summary>Positive peak phase, rad.</summary>
    public required double PositivePeakRad { get; init; }

    /// <summary>Negative peak phase (as a positive number), rad.</summary>
    public required double NegativePeakRad { get; init; }
}

/// <summary>FSK measurements.</summary>
public sealed record FskResult
{
    /// <summary>Tone frequencies, ascending (same axis as the carrier frequency), Hz.</summary>
    public required IReadOnlyList<double> ToneFrequenciesHz { get; init; }

    /// <summary>Shift between the outer tones, Hz.</summary>
    public required Measured ShiftHz { get; init; }

    /// <summary>Peak deviation: half the shift, Hz.</summary>
    public required double DeviationHz { get; init; }

    /// <summary>Symbol rate, baud; null when no symbol-rate line was found.</summary>
    public Measured? SymbolRateBd { get; init; }

    /// <summary>Modulation index h = shift / symbol rate; null without a symbol rate.</summary>
    public double? ModulationIndex { get; init; }
}

/// <summary>Classification for triage.</summary>
/// <param name="Kind">The modulation used for the measurements (the --expect kind when given).</param>
/// <param name="Detected">What the classifier found.</param>
/// <param name="Confidence">Confidence of the classifier, 0 to 1.</param>
/// <param name="Expected">True when --expect chose the kind.</param>
/// <param name="Reason">One line on why.</param>
public sealed record Classification(
    ModulationKind Kind,
    ModulationKind Detected,
    double Confidence,
    bool Expected,
    string Reason
);

/// <summary>The filters and settings used, for the method section and reproducibility.</summary>
public sealed record MethodRecord
{
    /// <summary>Spectrum settings of the bandwidth pass.</summary>
    public required SpectrumSettings Spectrum { get; init; }

    /// <summary>Resolution bandwidth of that spectrum, Hz.</summary>
    public required double RbwHz { get; init; }

    /// <summary>Channel filter: shift, cutoff, taps, decimation.</summary>
    public required string ChannelFilter { get; init; }

    /// <summary>Rate after decimation, Hz.</summary>
    public required double DemodRateHz { get; init; }

    /// <summary>Post-detection low-pass cutoff, Hz.</summary>
    public required double PostLowPassHz { get; init; }

    /// <summary>Post-detection high-pass corner, Hz, null when off.</summary>
    public double? PostHighPassHz { get; init; }

    /// <summary>De-emphasis time constant, us, null when off.</summary>
    public double? DeEmphasisUs { get; init; }

    /// <summary>Statistic for peaks.</summary>
    public required string PeakStatistic { get; init; }

    /// <summary>Noise-floor treatment for the occupied bandwidth.</summary>
    public required NoiseFloorTreatment ObwNoise { get; init; }
}

/// <summary>Everything one analysis found: the model that JSON and PDF writers render.</summary>
public sealed record AnalysisResult
{
    /// <summary>What was read.</summary>
    public required CaptureInfo Capture { get; init; }

    /// <summary>SHA-256 of the file holding the samples, lower-case hex.</summary>
    public required string Sha256 { get; init; }

    /// <summary>First analysed sample and the number analysed.</summary>
    public required (long First, long Count) Window { get; init; }

    /// <summary>Classification.</summary>
    public required Classification Classification { get; init; }

    /// <summary>Estimated signal-to-noise ratio inside the occupied bandwidth, dB.</summary>
    public required double ChannelSnrDb { get; init; }

    /// <summary>Carrier; null for noise.</summary>
    public CarrierResult? Carrier { get; init; }

    /// <summary>Bandwidths; axis as the spectrum (offsets or audio frequency) plus absolute copies in the
    /// JSON.</summary>
    public required BandwidthResult Bandwidth { get; init; }

    /// <summary>Standard uncertainty of the occupied bandwidth, Hz.</summary>
    public required double OccupiedUncertaintyHz { get; init; }

    /// <summary>AM results when the kind is AM.</summary>
    public AmResult? Am { get; init; }

    /// <summary>FM results when the kind is FM.</summary>
    public FmResult? Fm { get; init; }

    /// <summary>PM results when the kind is PM.</summary>
    public PmResult? Pm { get; init; }

    /// <summary>FSK results when the kind is FSK.</summary>
    public FskResult? Fsk { get; init; }

    /// <summary>Modulating frequency, Hz (AM, FM, PM); null otherwise.</summary>
    public Measured? ModulatingFrequencyHz { get; init; }

    /// <summary>Necessary bandwidth by the 47 CFR 2.202 formulas, Hz; null when none applies.</summary>
    public double? NecessaryBandwidthHz { get; init; }

    /// <summary>Emission designator; null for noise.</summary>
    public string? EmissionDesignator { get; init; }

    /// <summary>The mean spectrum of the bandwidth pass (for plots).</summary>
    public required SpectrumResult Spectrum { get; init; }

    /// <summary>Filters and settings.</summary>
    public required MethodRecord Method { get; init; }

    /// <summary>Warnings that protect the reader from a wrong number, one line each.</summary>
    public required IReadOnlyList<string> Warnings { get; init; }

    /// <summary>A short stretch of the demodulated signal for plots: time (s) and value (envelope, Hz or
    /// rad).</summary>
    public required IReadOnlyList<(double TimeS, double Value)> Waveform { get; init; }

    /// <summary>Highest value per 5 ms over the first 16384 demodulated samples, for the time plot.</summary>
    public IReadOnlyList<(double TimeS, double Value)> TrendHigh { get; init; } = [];

    /// <summary>Lowest value per 5 ms, same times as <see cref="TrendHigh"/>.</summary>
    public IReadOnlyList<(double TimeS, double Value)> TrendLow { get; init; } = [];

    /// <summary>What the waveform shows (e.g. "instantaneous frequency (Hz)").</summary>
    public required string WaveformLabel { get; init; }
}
