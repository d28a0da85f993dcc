using System.CommandLine;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Cli;

/// <summary>The measurement options of one capture, shared by analyze and batch (a folder is measured the way one
/// file is): the emission, the nominal, the class, the bandwidth and post-detection settings, the timeline, the
/// receiver's reference and the spectrum.</summary>
internal sealed class MeasurementOptionSet
{
    private readonly Option<double?> nominal;
    private readonly Option<string?> signal;
    private readonly Option<string?> expect;
    private readonly Option<double> obw;
    private readonly Option<double> xdb;
    private readonly Option<string> obwNoise;
    private readonly Option<double?> lp;
    private readonly Option<double?> hp;
    private readonly Option<double?> deemph;
    private readonly Option<double?> interval;
    private readonly Option<double?> discriminator;
    private readonly Option<double?> discriminatorU;
    private readonly Option<double?> referenceDeviation;
    private readonly Option<string> weighting;
    private readonly ReferenceOptionSet _reference = new();
    private readonly SpectrumCommand.SpectrumOptionSet _spectrum = new();

    public MeasurementOptionSet()
    {
        nominal = Units.SiOption(
            "--nominal",
            "Nominal (assigned) carrier frequency in Hz: offsets and ppm are taken from it (absolute RF when the "
                + "centre is known)."
        );
        signal = new Option<string?>("--signal")
        {
            Description =
                "The emission to measure, FREQ[:WIDTH] (default: the strongest): FREQ in Hz, absolute RF when the "
                + "capture's centre is known, else an offset from the centre (audio frequency for real input); "
                + "WIDTH sets the channel the measurement sees. SI suffixes: --signal 459.9875M:12.5k.",
            HelpName = "FREQ[:WIDTH]",
        };
        expect = new Option<string?>("--expect")
        {
            Description = "Measure as this modulation instead of classifying: am, fm, pm, fsk, cw, noise.",
            HelpName = "KIND",
        };
        obw = new Option<double>("--obw-percent")
        {
            Description = "Occupied-bandwidth percentage (ITU-R SM.328).",
            DefaultValueFactory = _ => 99,
            HelpName = "PERCENT",
        };
        xdb = new Option<double>("--xdb")
        {
            Description = "The x of the x-dB bandwidth, dB.",
            DefaultValueFactory = _ => 26,
            HelpName = "DB",
        };
        obwNoise = new Option<string>("--obw-noise")
        {
            Description = "Noise floor in the occupied bandwidth: subtract or keep.",
            DefaultValueFactory = _ => "subtract",
            HelpName = "subtract|keep",
        };
        obwNoise.AcceptOnlyFromAmong("subtract", "keep");
        lp = Units.SiOption(
            "--post-lowpass",
            "Post-detection low-pass cutoff in Hz (default: the channel filter's width, so every modulating frequency "
                + "the occupied bandwidth allows passes)."
        );
        hp = Units.SiOption("--post-highpass", "Post-detection high-pass corner in Hz (default off).");
        deemph = new Option<double?>("--deemphasis")
        {
            Description = "De-emphasis time constant in microseconds (e.g. 50 or 75; default off).",
            HelpName = "US",
        };
        interval = new Option<double?>("--track-interval")
        {
            Description =
                "Length in seconds of the windows the carrier, deviation or depth and level are followed in (default "
                + "about 0.1 s, a whole number of periods of the modulating tone); the frequency tolerance is judged "
                + "on the worst window.",
            HelpName = "S",
        };
        discriminator = Units.SiOption(
            "--discriminator",
            "The capture is real audio from a receiver's FM discriminator, HZ of deviation per full scale (from a "
                + "calibration with a known deviation): deviation, modulating tones and transmissions are read from "
                + "it; carrier and occupied bandwidth are not measurable and their limits NOT TESTED.",
            "HZ"
        );
        referenceDeviation = Units.SiOption(
            "--reference-deviation",
            "Reference deviation in Hz for the hum-and-noise ratio of an unmodulated carrier (its rms over the "
                + "residual FM), e.g. 60 % of the channel's maximum."
        );
        weighting = new Option<string>("--weighting")
        {
            Description =
                "Noise weighting of SINAD, THD+N and the residual FM/AM: none (flat within 300-3000 Hz), c-message "
                + "(IEEE 743 table) or psophometric (ITU-T O.41 table); a weighting replaces the 300-3000 Hz band.",
            HelpName = "none|c-message|psophometric",
            DefaultValueFactory = _ => "none",
        };
        weighting.AcceptOnlyFromAmong([.. NoiseWeighting.All.Select(w => w.Name)]);
        discriminatorU = new Option<double?>("--discriminator-uncertainty")
        {
            Description =
                "Standard uncertainty (k = 1) of the --discriminator scale, percent (default: not stated, 0).",
            HelpName = "PERCENT",
        };
    }

    /// <summary>Adds the options to a command.</summary>
    public void AddTo(Command cmd)
    {
        foreach (
            Option o in new Option[]
            {
                signal,
                nominal,
                expect,
                obw,
                xdb,
                obwNoise,
                lp,
                hp,
                deemph,
                interval,
                discriminator,
                discriminatorU,
                referenceDeviation,
                weighting,
            }
        )
            cmd.Options.Add(o);
        _reference.AddTo(cmd);
        _spectrum.AddTo(cmd);
    }

    /// <summary>The analysis options of the command line; <paramref name="info"/> (when one capture is known) turns
    /// --rbw into an FFT size at once, else each capture's own rate does.</summary>
    public AnalysisOptions Read(ParseResult r, CaptureInfo? info)
    {
        var (kind, beta) = _spectrum.WindowKindOf(r);
        var options = new AnalysisOptions
        {
            NominalHz = r.GetValue(nominal),
            Expect = r.GetValue(expect) is { } e ? ModulationKindNames.Parse(e) : null,
            Signal = r.GetValue(signal) is { } sig ? ParseSignal(sig) : null,
            ObwPercent = r.GetValue(obw),
            Xdb = r.GetValue(xdb),
            ObwNoise = r.GetValue(obwNoise) == "keep" ? NoiseFloorTreatment.Keep : NoiseFloorTreatment.Subtract,
            FftSize = r.GetValue(_spectrum.Fft)
                ?? (
                    r.GetValue(_spectrum.Rbw) is { } rbw && info is not null
                        ? SpectrumSettings.FftSizeForRbw(rbw, info.SampleRateHz, kind, beta)
                        : null
                ),
            RbwHz = r.GetValue(_spectrum.Rbw),
            SpectrumBase = new SpectrumSettings
            {
                Window = kind,
                KaiserBeta = beta,
                OverlapFraction = r.GetValue(_spectrum.Overlap) / 100.0,
                CalibrationDb = r.GetValue(_spectrum.Calibration),
                SuppressDc = r.GetValue(_spectrum.SuppressDc),
            },
            PostLowPassHz = r.GetValue(lp),
            PostHighPassHz = r.GetValue(hp),
            DeEmphasisUs = r.GetValue(deemph),
            TrackIntervalS = r.GetValue(interval),
            StartS = r.GetValue(_spectrum.Start) ?? 0,
            DurationS = r.GetValue(_spectrum.Duration),
            Threads = r.GetValue(_spectrum.Threads),
            DiscriminatorHzPerFullScale = r.GetValue(discriminator),
            DiscriminatorUncertaintyPercent = r.GetValue(discriminatorU),
            ReferenceDeviationHz = r.GetValue(referenceDeviation),
            Weighting = NoiseWeighting.Named(r.GetValue(weighting) ?? "none"),
        };
        return _reference.Apply(r, options);
    }

    /// <summary>Parses FREQ[:WIDTH], each a number with an optional SI suffix.</summary>
    private static SignalSelection ParseSignal(string text)
    {
        string[] p = text.Split(':');
        if (p.Length is 1 or 2 && Units.TryParseSi(p[0], out double f))
        {
            if (p.Length == 1)
                return new SignalSelection(f);
            if (Units.TryParseSi(p[1], out double w))
                return new SignalSelection(f, w);
        }
        throw new UsageException($"--signal: '{text}' is not FREQ or FREQ:WIDTH in Hz (e.g. 459.9875M:12.5k)");
    }
}
