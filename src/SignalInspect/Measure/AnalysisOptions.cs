using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>What to measure and how. Every value has a default that suits a first look.</summary>
public sealed record AnalysisOptions
{
    /// <summary>Nominal (assigned) carrier frequency, Hz: absolute RF when the capture's centre is known, else on the
    /// capture's own axis. Null: offsets are taken from the centre.</summary>
    public double? NominalHz { get; init; }

    /// <summary>The emission to measure: its frequency (absolute RF when the capture's centre is known, else on
    /// the capture's own axis) and optionally the channel width; null for the strongest emission.</summary>
    public SignalSelection? Signal { get; init; }

    /// <summary>Modulation to measure as, overriding the classifier; null to classify.</summary>
    public ModulationKind? Expect { get; init; }

    /// <summary>Occupied-bandwidth percentage (99 by default: beta = 1 %).</summary>
    public double ObwPercent { get; init; } = 99;

    /// <summary>The x of the x-dB bandwidth, dB (26 by default).</summary>
    public double Xdb { get; init; } = 26;

    /// <summary>Noise-floor treatment for the occupied bandwidth.</summary>
    public NoiseFloorTreatment ObwNoise { get; init; } = NoiseFloorTreatment.Subtract;

    /// <summary>FFT size of the bandwidth spectrum; null to choose (4096, smaller for short captures).</summary>
    public int? FftSize { get; init; }

    /// <summary>Resolution bandwidth wanted, Hz: the FFT size is the power of two nearest to it (per capture, from
    /// its sample rate); null for <see cref="FftSize"/> or the default. <see cref="FftSize"/> wins.</summary>
    public double? RbwHz { get; init; }

    /// <summary>The Welch pass's window (and Kaiser beta), overlap, level calibration and DC suppression; its FFT
    /// size, threads and spectrogram are set per analysis (<see cref="FftSize"/>, <see cref="RbwHz"/>,
    /// <see cref="Threads"/>, <see cref="KeepSpectrogram"/>).</summary>
    public SpectrumSettings SpectrumBase { get; init; } = new();

    /// <summary>Post-detection low-pass cutoff, Hz; null for the default (the channel filter's width).</summary>
    public double? PostLowPassHz { get; init; }

    /// <summary>Post-detection high-pass corner, Hz; null for none.</summary>
    public double? PostHighPassHz { get; init; }

    /// <summary>De-emphasis time constant in microseconds (e.g. 50 or 75), null for none.</summary>
    public double? DeEmphasisUs { get; init; }

    /// <summary>Start of the analysed window, s.</summary>
    public double StartS { get; init; }

    /// <summary>Length of the analysed window, s; null to the end.</summary>
    public double? DurationS { get; init; }

    /// <summary>Whether to keep the spectrogram, which only the PDF report draws (true by default; the command line
    /// turns it off when no report is written).</summary>
    public bool KeepSpectrogram { get; init; } = true;

    /// <summary>Length of the windows the carrier, deviation or depth and level are followed in (the timeline), s;
    /// null for the default (about 100 ms, a whole number of modulating-tone periods when one is found).</summary>
    public double? TrackIntervalS { get; init; }

    /// <summary>The receiver reads RF frequencies this many ppm high, as measured against a standard (negative: low);
    /// null when not declared. Needs <see cref="ReceiverErrorUncertaintyPpm"/>.</summary>
    public double? ReceiverErrorPpm { get; init; }

    /// <summary>Standard uncertainty (k = 1) of <see cref="ReceiverErrorPpm"/>, ppm.</summary>
    public double? ReceiverErrorUncertaintyPpm { get; init; }

    /// <summary>A carrier in the capture known to be at this RF frequency, Hz: its apparent error corrects every
    /// frequency; null for none.</summary>
    public double? ReferenceCarrierHz { get; init; }

    /// <summary>The capture is real audio from a receiver's FM discriminator, this many Hz of deviation per full scale
    /// (from a calibration with a known deviation); null for a capture of the signal itself.</summary>
    public double? DiscriminatorHzPerFullScale { get; init; }

    /// <summary>Standard uncertainty (k = 1) of <see cref="DiscriminatorHzPerFullScale"/>, percent; null when not
    /// stated (taken as 0, and said so).</summary>
    public double? DiscriminatorUncertaintyPercent { get; init; }

    /// <summary>The hum-and-noise ratio's reference deviation, Hz (e.g. 60 % of the channel's maximum); null for no
    /// ratio.</summary>
    public double? ReferenceDeviationHz { get; init; }

    /// <summary>The noise weighting of the audio figures (SINAD, THD+N, residual FM and AM); null for none.</summary>
    public NoiseWeighting? Weighting { get; init; }

    /// <summary>A tone series the capture holds (the audio response is read from it); empty for none.</summary>
    public IReadOnlyList<ToneStep> ToneSteps { get; init; } = [];

    /// <summary>Take the capture's transmissions (carrier-off gaps between them) as the tone series' steps, when
    /// <see cref="ToneSteps"/> is empty.</summary>
    public bool StepsFromTransmissions { get; init; }

    /// <summary>Worker threads for the spectrum; null for one per core.</summary>
    public int? Threads { get; init; }

    /// <summary>Largest receiver error accepted, ppm (a receiver further off needs retuning, not a
    /// correction).</summary>
    public const double MaxReceiverErrorPpm = 1000;

    /// <summary>Checks every option; the message names it.</summary>
    public void Validate()
    {
        if (!(ObwPercent > 0 && ObwPercent < 100))
            throw new SettingException(nameof(ObwPercent), ObwPercent, "must lie between 0 and 100");
        if (!(Xdb > 0 && Xdb < 200))
            throw new SettingException(nameof(Xdb), Xdb, "must lie between 0 and 200 dB");
        if (PostLowPassHz is { } lp && !(lp > 0))
            throw new SettingException(nameof(PostLowPassHz), lp, "must be a positive number of Hz");
        if (PostHighPassHz is { } hp && !(hp > 0))
            throw new SettingException(nameof(PostHighPassHz), hp, "must be a positive number of Hz");
        if (DeEmphasisUs is { } de && !(de > 0 && de < 1e6))
            throw new SettingException(nameof(DeEmphasisUs), de, "must be a positive number of microseconds");
        if (NominalHz is { } nom && !double.IsFinite(nom))
            throw new SettingException(nameof(NominalHz), nom, "must be a number of Hz");
        if (!(StartS >= 0 && double.IsFinite(StartS)))
            throw new SettingException(nameof(StartS), StartS, "must be 0 or more seconds");
        if (TrackIntervalS is { } ti && !(ti >= 0.002 && ti <= 3600))
            throw new SettingException(nameof(TrackIntervalS), ti, "must be from 0.002 to 3600 seconds");
        if (DurationS is { } d && !(d > 0 && double.IsFinite(d)))
            throw new SettingException(nameof(DurationS), d, "must be a positive number of seconds");
        if (ReceiverErrorPpm is { } e && !(Math.Abs(e) <= MaxReceiverErrorPpm))
            throw new SettingException(
                nameof(ReceiverErrorPpm),
                e,
                $"must be a number of ppm within +/-{MaxReceiverErrorPpm}"
            );
        if (ReceiverErrorUncertaintyPpm is { } ue && !(ue >= 0 && ue <= MaxReceiverErrorPpm))
            throw new SettingException(
                nameof(ReceiverErrorUncertaintyPpm),
                ue,
                $"must be a standard uncertainty of 0 to {MaxReceiverErrorPpm} ppm"
            );
        if (ReceiverErrorPpm is not null && ReceiverErrorUncertaintyPpm is null)
            throw new SettingException(
                nameof(ReceiverErrorUncertaintyPpm),
                null,
                "must be given with the declared receiver error (its standard uncertainty, k = 1; 0 to take it as "
                    + "exact)"
            );
        if (ReceiverErrorPpm is null && ReceiverErrorUncertaintyPpm is not null)
            throw new SettingException(
                nameof(ReceiverErrorUncertaintyPpm),
                ReceiverErrorUncertaintyPpm,
                "is the uncertainty of a declared receiver error, and none was declared"
            );
        if (ReferenceDeviationHz is { } rd && !(rd > 0 && rd <= 1e7))
            throw new SettingException(nameof(ReferenceDeviationHz), rd, "must be a positive deviation in Hz");
        if (DiscriminatorHzPerFullScale is { } dk && !(dk > 0 && dk <= 1e7))
            throw new SettingException(
                nameof(DiscriminatorHzPerFullScale),
                dk,
                "must be a positive number of Hz per full scale (at most 10 MHz)"
            );
        if (DiscriminatorUncertaintyPercent is { } du && !(du >= 0 && du <= 100))
            throw new SettingException(nameof(DiscriminatorUncertaintyPercent), du, "must be from 0 to 100 percent");
        if (DiscriminatorUncertaintyPercent is not null && DiscriminatorHzPerFullScale is null)
            throw new SettingException(
                nameof(DiscriminatorUncertaintyPercent),
                DiscriminatorUncertaintyPercent,
                "is the uncertainty of a discriminator's scale, and none was given"
            );
        if (
            DiscriminatorHzPerFullScale is not null
            && (
                ReferenceCarrierHz is not null
                || ReceiverErrorPpm is not null
                || Signal is not null
                || Expect is not null
            )
        )
            throw new SettingException(
                nameof(DiscriminatorHzPerFullScale),
                DiscriminatorHzPerFullScale,
                "reads discriminator audio: it has no carrier to correct or select and is FM by nature"
            );
        if (ReferenceCarrierHz is { } rc && !(rc > 0 && double.IsFinite(rc)))
            throw new SettingException(nameof(ReferenceCarrierHz), rc, "must be a positive RF frequency in Hz");
        if (ReferenceCarrierHz is not null && ReceiverErrorPpm is not null)
            throw new SettingException(
                nameof(ReferenceCarrierHz),
                ReferenceCarrierHz,
                "and a declared receiver error cannot both correct the frequencies (which would decide?)"
            );
    }
}

/// <summary>Which emission to measure.</summary>
/// <param name="FrequencyHz">Where it is: absolute RF when the capture's centre is known (IQ), else on the capture's
/// axis (offset from the centre, or audio frequency).</param>
/// <param name="WidthHz">The channel's width, Hz: the measurement sees only FREQ +/- WIDTH/2; null to take the
/// emission found there.</param>
public sealed record SignalSelection(double FrequencyHz, double? WidthHz = null);
