using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

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

    /// <summary>The components <see cref="OccupiedUncertaintyHz"/> is combined from; empty where none was
    /// measured.</summary>
    public IReadOnlyList<UncertaintyComponent> OccupiedBudget { get; init; } = [];

    /// <summary>AM results when the kind is AM.</summary>
    public AmResult? Am { get; init; }

    /// <summary>FM results when the kind is FM.</summary>
    public FmResult? Fm { get; init; }

    /// <summary>PM results when the kind is PM.</summary>
    public PmResult? Pm { get; init; }

    /// <summary>FSK results when the kind is FSK.</summary>
    public FskResult? Fsk { get; init; }

    /// <summary>On-off keying results when the kind is OOK.</summary>
    public OokResult? Ook { get; init; }

    /// <summary>Modulating frequency, Hz (AM, FM, PM); null otherwise.</summary>
    public Measured? ModulatingFrequencyHz { get; init; }

    /// <summary>The modulating components (tones) of AM, FM and PM, strongest first; empty otherwise.</summary>
    public IReadOnlyList<ModulatingComponent> ModulatingComponents { get; init; } = [];

    /// <summary>The demodulated audio's quality (distortion, SINAD, residual modulation, sub-audible tone); null for
    /// classes without demodulated audio.</summary>
    public AudioQualityResult? Audio { get; init; }

    /// <summary>The audio response read from a tone series (analysis options' tone steps); null without one.</summary>
    public AudioResponseResult? Response { get; init; }

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

    /// <summary>Highest value per step (<see cref="TrendStepS"/>) over the whole window, for the time plot (times from
    /// the capture's first sample).</summary>
    public IReadOnlyList<(double TimeS, double Value)> TrendHigh { get; init; } = [];

    /// <summary>Lowest value per step, same times as <see cref="TrendHigh"/>.</summary>
    public IReadOnlyList<(double TimeS, double Value)> TrendLow { get; init; } = [];

    /// <summary>The time each trend point covers, s.</summary>
    public double TrendStepS { get; init; }

    /// <summary>What the waveform shows (e.g. "instantaneous frequency (Hz)").</summary>
    public required string WaveformLabel { get; init; }

    /// <summary>The transmissions found (carrier-on intervals); each with its own result when the capture was measured
    /// transmission by transmission.</summary>
    public IReadOnlyList<Transmission> Transmissions { get; init; } = [];

    /// <summary>Which of <see cref="Transmissions"/> the figures of this result are (0-based); null when the
    /// analysis is of the whole window.</summary>
    public int? MeasuredTransmission { get; init; }

    /// <summary>The carrier, modulation and level against time (null without a carrier).</summary>
    public Timeline? Timeline { get; init; }

    /// <summary>The receiver's frequency reference correction applied to every frequency; null when none was (the
    /// frequencies are as the receiver read them).</summary>
    public FrequencyReference? FrequencyReference { get; init; }

    /// <summary>The carrier on the capture's own axis (where the spectrum shows it: before any reference
    /// correction); null without a carrier.</summary>
    public double? CarrierAxisHz =>
        Carrier is { } c
            ? FrequencyAxis
                .Of(Capture)
                .ToAxis(FrequencyReference is { } f ? f.Read(c.FrequencyHz.Value) : c.FrequencyHz.Value)
            : null;

    /// <summary>The scale of discriminator audio, Hz per full scale, when the capture was one (the deviation read from
    /// it; no carrier, and <see cref="Bandwidth"/> is the audio's, not an RF occupied bandwidth); null for a capture
    /// of the signal itself.</summary>
    public double? DiscriminatorHzPerFullScale { get; init; }

    /// <summary>How the figures were obtained, beyond the method record (one line each).</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];
}

/// <summary>On-off keying: how much of the time the carrier is on, and its level then.</summary>
public sealed record OokResult
{
    /// <summary>Share of the time the envelope stands above the noise's level, percent.</summary>
    public required double OnSharePercent { get; init; }

    /// <summary>Mean envelope while on, full scale.</summary>
    public required double OnLevel { get; init; }

    /// <summary>The pulses and their statistics; null when fewer than three complete ones were found.</summary>
    public PulseResult? Pulses { get; init; }
}
