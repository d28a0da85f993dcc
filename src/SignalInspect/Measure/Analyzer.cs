using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Demodulation;
using SignalInspect.Diagnostics;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// Runs the measurements of one capture: one Welch pass for the spectrum and bandwidths, then one
/// pass that shifts the signal to 0 Hz, channel-filters and decimates it and demodulates it
/// (envelope, instantaneous frequency, phase; <see cref="DemodulationPass"/>), with a third pass
/// only for the phase of PM. Then each measurement reads what the passes gathered: the carrier
/// (<see cref="CarrierMeasurement"/>), the class (<see cref="ModulationClassifier"/>), the modulating
/// tone, and the kind's own (AM, FM, PM, FSK). Memory does not grow with the capture: every
/// statistic is a running sum, a fixed histogram or a Welch accumulator.
/// </summary>
public static class Analyzer
{
    /// <summary>FFT size of the spectrum when none is asked for; halved for short windows down to 64.</summary>
    public const int DefaultFftSize = 4096;

    /// <summary>Analyses a capture.</summary>
    /// <param name="source">The capture.</param>
    /// <param name="options">What to measure and how; null for the defaults.</param>
    /// <param name="progress">Called with the samples read so far by the spectrum pass.</param>
    /// <param name="cancel">Stops the passes.</param>
    /// <param name="timer">Stage timings for profiling; null for none.</param>
    /// <param name="knownHash">The file's SHA-256 already under way (<see cref="HashOf"/>), so that a caller analysing
    /// one capture several times (a survey's emissions, a tone series' steps) reads the file for it once; null to
    /// start it here.</param>
    /// <exception cref="CaptureException">The capture is too short or cannot be read.</exception>
    /// <exception cref="SettingException">A setting is out of range (named by its property).</exception>
    public static AnalysisResult Analyze(
        CaptureSource source,
        AnalysisOptions? options = null,
        Action<long>? progress = null,
        CancellationToken cancel = default,
        StageTimer? timer = null,
        Task<string>? knownHash = null
    )
    {
        options ??= new AnalysisOptions();
        options.Validate();
        Task<string> hash = knownHash ?? HashOf(source, cancel);
        if (options.ToneSteps.Count > 0 || options.StepsFromTransmissions)
        {
            AnalysisOptions one = options with { ToneSteps = [], StepsFromTransmissions = false };
            AnalysisResult whole = Analyze(source, one, progress, cancel, timer, hash);
            return whole with { Response = AudioResponse.Measure(source, one, options.ToneSteps, whole, hash, cancel) };
        }
        if (options.DiscriminatorHzPerFullScale is not null)
            return DiscriminatorAnalysis.Analyze(source, options, progress, hash, cancel);
        CaptureInfo info = source.Info;
        FrequencyReference? reference = null;
        double? referenceAxisHz = null;
        if (options.ReceiverErrorPpm is { } e)
        {
            ReferenceCarrierMeasurement.RequireRf(info, nameof(AnalysisOptions.ReceiverErrorPpm), e);
            reference = new FrequencyReference
            {
                Source = FrequencyReference.Declared,
                ErrorPpm = e,
                StandardUncertaintyPpm = options.ReceiverErrorUncertaintyPpm ?? 0,
            };
        }
        else if (options.ReferenceCarrierHz is { } known)
            (reference, referenceAxisHz) = ReferenceCarrierMeasurement.Measure(source, options, known, hash, cancel);
        // With a correction every frequency given is a true one: the emission asked for is sought where the
        // receiver shows it.
        AnalysisOptions asRead =
            reference is not null && options.Signal is { } sig
                ? options with
                {
                    Signal = sig with { FrequencyHz = reference.Read(sig.FrequencyHz) },
                }
                : options;
        AnalysisResult r = Run(source, asRead, progress, cancel, timer, hash, split: true, referenceAxisHz);
        if (reference is null)
            return r;
        r = FrequencyCorrection.Apply(r, reference, options.NominalHz);
        return
            reference.Source == FrequencyReference.ByReferenceCarrier
            && Math.Abs(reference.ErrorPpm) > ReferenceCarrierMeasurement.UnusualErrorPpm
            ? r with
            {
                Warnings =
                [
                    .. r.Warnings,
                    string.Create(
                        CultureInfo.InvariantCulture,
                        $"the reference carrier reads {reference.ErrorPpm:+0.##;-0.##} ppm from its stated frequency, "
                    ) + "more than a receiver's reference usually errs: make sure it is the carrier meant",
                ],
            }
            : r;
    }

    /// <summary>The file's SHA-256, read on another thread while the passes run.</summary>
    internal static Task<string> HashOf(CaptureSource source, CancellationToken cancel) =>
        Task.Run(() => FileHash.Sha256(source.Info.DataPath ?? source.Info.Path), cancel);

    /// <summary>The analysis of <see cref="Analyze"/>; <paramref name="split"/>: a capture of several transmissions (or
    /// one with silence around it) is measured transmission by transmission (each a call without it), sharing the
    /// file's <paramref name="hash"/>.</summary>
    internal static AnalysisResult Run(
        CaptureSource source,
        AnalysisOptions options,
        Action<long>? progress,
        CancellationToken cancel,
        StageTimer? timer,
        Task<string> hash,
        bool split,
        double? excludeAxisHz
    )
    {
        timer ??= StageTimer.Off;
        CaptureInfo info = source.Info;
        double fs = info.SampleRateHz;
        if (info.SampleCount == 0)
            throw CaptureException.ForFile(info.Path, "holds no samples: there is nothing to measure");
        var (first, count) = source.WindowSamples(options.StartS, options.DurationS);
        if (split && options.TrackIntervalS is { } interval && interval > count / info.SampleRateHz)
            throw new SettingException(
                nameof(options.TrackIntervalS),
                interval,
                string.Create(
                    CultureInfo.InvariantCulture,
                    $"must not be longer than the analysed window ({count / info.SampleRateHz:0.###} s)"
                )
            );
        timer.Note($"start: {StageTimer.Memory()}");
        var warnings = new List<string>(info.Warnings);

        // Pass A: the spectrum, the bandwidths and a first carrier estimate.
        SpectrumSettings spectrumSettings = SpectrumSettingsFor(options, count, fs);
        SpectrumResult spectrum = WelchEstimator.Estimate(source, spectrumSettings, first, count, progress, cancel);
        timer.Stage("spectrum pass");
        if (!(spectrum.Mean.TotalPower() > 1e-30))
            throw CaptureException.ForFile(
                info.Path,
                spectrum.NonFiniteSegments > 0
                    ? "holds only NaN, infinite or zero samples: there is nothing to measure"
                    : "holds only zero samples (a silent or empty recording): there is nothing to measure"
            );
        // The emission to measure, alone: other emissions, spurs and an IQ image are set to the floor.
        Selection selection = EmissionSelection.Select(info, spectrum.Mean, options.Signal, excludeAxisHz);
        BandwidthResult bw = Bandwidths(selection, options);
        // A narrow emission in a wide capture: the spectrum again, with enough bins across the emission.
        if (
            options.FftSize is null
            && options.RbwHz is null
            && selection.Measured is { } seen
            && Finer(spectrumSettings, spectrum.Mean.BinWidthHz, bw, count) is { } finer
        )
        {
            SpectrumResult again = WelchEstimator.Estimate(source, finer, first, count, null, cancel);
            timer.Stage("finer spectrum pass");
            var at = new SignalSelection(FrequencyAxis.Of(info).ToReported(seen.CentreHz), options.Signal?.WidthHz);
            Selection refined = EmissionSelection.Select(info, again.Mean, options.Signal ?? at, excludeAxisHz);
            CultureInfo ci = CultureInfo.InvariantCulture;
            warnings.Add(
                string.Create(ci, $"the emission spans {bw.OccupiedHz / spectrum.Mean.BinWidthHz:0.#} bins of the ")
                    + string.Create(ci, $"default {spectrumSettings.FftSize}-point spectrum: measured again with ")
                    + string.Create(
                        ci,
                        $"{finer.FftSize} points (RBW {again.Mean.RbwHz:0.##} Hz); --fft or --rbw sets it"
                    )
            );
            (spectrumSettings, spectrum, selection) = (finer, again, refined);
            bw = Bandwidths(selection, options);
        }
        PowerSpectrum psd = selection.Spectrum;
        var notes = new List<string>();
        if (NoiseFloor.Passband(spectrum.Mean) is { } pass)
            notes.Add(PassbandNote(info, spectrum.Mean, pass));
        double snrDb = BandwidthMeasurement.SnrDb(psd, bw);
        double coarse = CarrierMeasurement.Coarse(psd, bw);
        if (!info.IsComplex && coarse <= psd.BinWidthHz)
            throw CaptureException.ForFile(
                info.Path,
                "the real signal has its power at 0 Hz: there is no carrier in the audio band to analyse"
            );
        // The channel is centred on the occupied band (an FM signal's strongest line may be a sideband) and ends
        // before the nearest other emission.
        ChannelPlan channel = ChannelPlan.Design(
            psd,
            info.IsComplex,
            ChannelCentre(coarse, bw, psd.BinWidthHz),
            bw.LowerEdgeHz,
            bw.UpperEdgeHz,
            bw.NoiseFloorDensity,
            options.PostLowPassHz,
            [.. selection.Others.Select(o => (o.LowHz, o.HighHz))]
        );
        if (channel.MirrorKept)
            warnings.Add(MeasurementWarnings.MirrorKept);
        if (channel.Crowded)
            warnings.Add(MeasurementWarnings.Crowded);
        int threads = Math.Max(1, options.Threads ?? Environment.ProcessorCount);
        PassPlan plan = channel.ForPass(source, first, count, options.PostHighPassHz, options.DeEmphasisUs, threads);

        // Pass B: demodulation.
        PassResult b = DemodulationPass.Run(plan, fit: null, offsets: null, cancel, timer);
        timer.Stage("demodulation pass");
        if (b.Samples < 16)
            throw CaptureException.ForFile(info.Path, "too few samples remain after the channel filter to demodulate");
        double fsd = channel.DecimatedRateHz;
        // The slope is in rad per decimated sample, about the channel's centre.
        double carrierAxisHz = channel.CarrierHz + b.Slope * fsd / (2 * Math.PI);

        // Transmissions: the channel's power against time. Silence must not read as modulation: a capture with
        // carrier-off time is measured again, transmission by transmission.
        double blockS = b.Blocks.BlockLength * channel.Decimation / fs,
            channelNoise = bw.NoiseFloorDensity * (info.IsComplex ? 2 : 1) * channel.HalfWidthHz;
        IReadOnlyList<Transmission> transmissions = TransmissionFinder.Find(
            b.Blocks.Power,
            blockS,
            first / fs,
            (first + count) / fs,
            channelNoise
        );
        if (split && TransmissionFinder.Splits(transmissions, count / fs))
            return ByTransmission(source, options, cancel, hash, transmissions, selection, info, excludeAxisHz);

        // Classification, then the modulating frequency from the demodulated spectra.
        var features = DemodulatedFeatures.From(b, bw.NoiseFloorDensity * 2 * channel.HalfWidthHz);
        var fskTones = FskMeasurement.FindTones(b.Freq);
        Classification cls = ModulationClassifier.Classify(snrDb, features, fskTones.Dwell, options.Expect);
        ModulationKind kind = cls.Kind;
        if (MeasurementWarnings.LowSnr(snrDb, kind) is { } lowSnr)
            warnings.Add(lowSnr);
        if (MeasurementWarnings.Overmodulation(kind, features) is { } overmodulation)
            warnings.Add(overmodulation);
        double minTone = Math.Max(3 * b.ToneSpectrum.BinWidthHz, 2 * fs / Math.Max(count, 1));
        var inputs = new MeasurementInputs
        {
            Info = info,
            Psd = psd,
            Bandwidth = bw,
            Channel = channel,
            Pass = b,
            Features = features,
            SnrDb = snrDb,
            MinToneHz = minTone,
        };
        Measured? tone = ModulatingTone.Find(kind, b, minTone, inputs.EnvelopeTopHz, channel.PostLowPassHz);
        inputs = inputs with
        {
            Tone = tone,
            Components = ModulatingComponents.ForKind(
                kind,
                b,
                features,
                minTone,
                inputs.EnvelopeTopHz,
                channel.PostLowPassHz
            ),
        };
        if (MeasurementWarnings.FewTonePeriods(tone, count / fs) is { } fewPeriods)
            warnings.Add(fewPeriods);
        warnings.AddRange(EmissionSelection.Warnings(info, selection, carrierAxisHz, inputs.Components));

        // The carrier against time; a drifting FM carrier's deviation is measured about the local carrier (a second
        // demodulation pass: the drift would otherwise widen the deviation's percentiles).
        BlockStats track = b.Blocks;
        // A code squelch word is read before any detrending (its slow bits would pass for a wandering carrier).
        DigitalCode? code = kind is ModulationKind.Fm or ModulationKind.Fsk
            ? DcsDecoder.Decode(track, blockS, first / fs, transmissions)
            : null;
        if (code?.MeanShiftNote() is { } shift)
            warnings.Add(shift);
        double windowS = TimelineMeasurement.WindowS(
            options.TrackIntervalS,
            code is null ? tone?.Value : Dsp.DcsCode.WordRateHz,
            blockS
        );
        bool detrended = false;
        if (
            kind == ModulationKind.Fm
            && code is null
            && TimelineMeasurement.Measure(track, blockS, first / fs, windowS, channelNoise, null, kind) is { } rough
            && TimelineMeasurement.Drifts(rough, channel.HalfWidthHz)
        )
        {
            var knots = rough
                .Windows.Select(w =>
                    ((long)Math.Round(((w.StartS + w.EndS) / 2 - first / fs) * fsd), w.CarrierOffsetHz)
                )
                .ToList();
            b = DemodulationPass.Run(plan, null, null, cancel, timer, new CarrierTrack(knots));
            timer.Stage("demodulation pass about the local carrier");
            features = DemodulatedFeatures.From(b, bw.NoiseFloorDensity * 2 * channel.HalfWidthHz);
            inputs = inputs with { Pass = b, Features = features };
            detrended = true;
        }

        // The kind's own measurements.
        AmResult? am = null;
        FmResult? fm = null;
        PmResult? pm = null;
        FskResult? fsk = null;
        OokResult? ook = null;
        MeasurementExtras extras = default;
        List<UncertaintyComponent> carrierBudget =
        [
            .. CarrierMeasurement.SlopeBudget(b, fsd, kind, inputs.Components, count / fs),
        ];
        switch (kind)
        {
            case ModulationKind.Am:
                (am, extras) = AmMeasurement.Measure(inputs, carrierAxisHz);
                break;
            case ModulationKind.Fm:
                (fm, extras) = FmMeasurement.Measure(inputs);
                break;
            case ModulationKind.Pm:
                PassResult phase = DemodulationPass.Run(
                    plan,
                    (b.Intercept, b.Slope),
                    b.ChunkPhaseOffsets,
                    cancel,
                    timer
                );
                timer.Stage("phase pass");
                (pm, extras) = PmMeasurement.Measure(inputs, phase);
                break;
            case ModulationKind.Ook:
                // The phase is noise while the carrier is off: the carrier is the spectrum's line.
                carrierAxisHz = coarse;
                carrierBudget =
                [
                    new(
                        "resolution (interpolated spectral line)",
                        psd.BinWidthHz / TypeB.SpectralLineBinDivisor,
                        "TypeB.SpectralLineBinDivisor of the Welch bin"
                    ),
                ];
                ook = new OokResult
                {
                    OnSharePercent = 100 * (1 - features.OffShare),
                    OnLevel = features.OnLevel,
                    Pulses = PulseMeasurement.Measure(
                        source,
                        first,
                        count,
                        coarse,
                        bw.OccupiedHz,
                        bw.NoiseFloorDensity,
                        cancel
                    ),
                };
                timer.Stage("pulse passes");
                break;
            case ModulationKind.Fsk:
                (fsk, double? centre, extras) = FskMeasurement.Measure(inputs, fskTones.Tones, FrequencyAxis.Of(info));
                if (centre is { } c)
                {
                    carrierAxisHz = c;
                    carrierBudget.Add(
                        new(
                            "FSK tone centre",
                            TypeB.FskCarrierFractionOfShift * fsk.ShiftHz.Value,
                            "TypeB.FskCarrierFractionOfShift"
                        )
                    );
                }
                break;
        }

        CarrierResult? carrier = kind is ModulationKind.Noise or ModulationKind.Unknown
            ? null
            : CarrierMeasurement.Make(info, options.NominalHz, carrierAxisHz, [.. carrierBudget], kind);
        Timeline? timeline =
            carrier is null ? null
            : TimelineMeasurement.Measure(track, blockS, first / fs, windowS, channelNoise, carrier, kind) is { } tl
                ? tl with
                {
                    Detrended = detrended,
                }
            : null;
        warnings.AddRange(
            MeasurementWarnings.AfterMeasuring(
                info,
                kind,
                bw,
                spectrum.Mean,
                carrierAxisHz,
                b.NearFullScale,
                count,
                options.SpectrumBase.SuppressDc,
                spectrum.NonFiniteSegments,
                snrDb
            )
        );
        var method = new MethodRecord
        {
            Spectrum = spectrumSettings,
            RbwHz = psd.RbwHz,
            ChannelFilter = channel.Description,
            DemodRateHz = fsd,
            PostLowPassHz = channel.PostLowPassHz,
            PostHighPassHz = options.PostHighPassHz,
            DeEmphasisUs = options.DeEmphasisUs,
            PeakStatistic = TonePeaks.Describe(kind, b, extras.PeaksCorrected, inputs.Components),
            ObwNoise = options.ObwNoise,
        };
        string sha = hash.Result;
        timer.Stage("results, hash wait");
        var (waveT, waveV, waveLabel) = PlotTraces.Waveform(b, kind, tone?.Value, fsd, features.MeanDeviationHz);
        var (longT, longHigh, longLow, trendStep) = PlotTraces.Trend(b, kind, blockS, first / fs, b.FreqMean);
        return new AnalysisResult
        {
            Capture = info,
            Sha256 = sha,
            Window = (first, count),
            Classification = cls,
            ChannelSnrDb = snrDb,
            Carrier = carrier,
            Bandwidth = bw,
            OccupiedUncertaintyHz = BandwidthMeasurement.OccupiedUncertaintyHz(psd, bw),
            OccupiedBudget = BandwidthMeasurement.OccupiedBudget(psd, bw),
            Am = am,
            Fm = fm,
            Pm = pm,
            Fsk = fsk,
            Ook = ook,
            ModulatingFrequencyHz = kind is ModulationKind.Am or ModulationKind.Fm or ModulationKind.Pm ? tone : null,
            ModulatingComponents = inputs.Components,
            Audio = AudioQuality.Measure(
                kind,
                b.ToneSpectrum,
                b.EnvelopeSpectrum,
                features.EnvelopeMean,
                tone,
                inputs.Components,
                channel.PostLowPassHz,
                options.ReferenceDeviationHz,
                code,
                options.Weighting,
                (track.Freq, blockS)
            ),
            NecessaryBandwidthHz = extras.NecessaryBandwidthHz,
            EmissionDesignator = EmissionDesignator.Format(kind, extras.NecessaryBandwidthHz),
            Spectrum = spectrum,
            Method = method,
            Warnings = warnings,
            Waveform = [.. waveT.Zip(waveV)],
            TrendHigh = [.. longT.Zip(longHigh)],
            TrendLow = [.. longT.Zip(longLow)],
            TrendStepS = trendStep,
            WaveformLabel = waveLabel,
            Transmissions = transmissions,
            Timeline = timeline,
            Notes = notes,
        };
    }

    /// <summary>What the analysis says of a receiver's passband found in the spectrum.</summary>
    private static string PassbandNote(CaptureInfo info, PowerSpectrum mean, (int First, int Last) pass)
    {
        var axis = FrequencyAxis.Of(info);
        CultureInfo c = CultureInfo.InvariantCulture;
        return string.Create(c, $"the noise falls off outside {axis.ToReported(mean.FrequenciesHz[pass.First]):0} to ")
            + string.Create(c, $"{axis.ToReported(mean.FrequenciesHz[pass.Last]):0} Hz (the receiver's filter): the ")
            + "noise floor and every SNR are taken within that passband (a flat emission over that band, centred in "
            + "the capture, would be taken for noise)";
    }

    /// <summary>Each transmission measured on its own (the emission found in the whole capture pinned); the result
    /// is the longest one's, with every transmission's in <see cref="AnalysisResult.Transmissions"/>.</summary>
    private static AnalysisResult ByTransmission(
        CaptureSource source,
        AnalysisOptions options,
        CancellationToken cancel,
        Task<string> hash,
        IReadOnlyList<Transmission> found,
        Selection selection,
        CaptureInfo info,
        double? excludeAxisHz
    )
    {
        SignalSelection? pinned = options.Signal
            ?? (
                selection.Measured is { } e
                    ? new SignalSelection(FrequencyAxis.Of(info).ToReported(e.CentreHz), null)
                    : null
            );
        var measured = new List<Transmission>();
        foreach (Transmission t in found)
        {
            var (from, to) = TransmissionFinder.Steady(t);
            AnalysisOptions one = options with { StartS = from, DurationS = to - from, Signal = pinned };
            AnalysisResult result = Run(source, one, null, cancel, null, hash, split: false, excludeAxisHz);
            measured.Add(
                t with
                {
                    Result = result,
                    KeyUp = TransientMeasurement.Measure(source, t, result, keyUp: true),
                    KeyDown = TransientMeasurement.Measure(source, t, result, keyUp: false),
                }
            );
        }
        int longest = TransmissionFinder.Longest(measured);
        AnalysisResult top = measured[longest].Result!;
        CultureInfo c = CultureInfo.InvariantCulture;
        Transmission l = measured[longest];
        double onAir = measured.Sum(t => t.DurationS);
        string note =
            string.Create(c, $"{measured.Count} transmission(s) found, {onAir:0.###} s on air: each is measured on ")
            + string.Create(c, $"its own (transmissions[]) and the figures here are transmission {longest + 1}'s, ")
            + string.Create(c, $"the longest ({l.StartS:0.###}-{l.EndS:0.###} s); limits are judged on every one. ")
            + string.Create(
                c,
                $"Each one's figures leave out {1000 * TransmissionFinder.SteadyAfterKeyUpS:0} ms after its key-up "
            )
            + string.Create(
                c,
                $"and {1000 * TransmissionFinder.SteadyBeforeKeyDownS:0} ms before its key-down (measured apart as "
            )
            + "transients)";
        return top with { Transmissions = measured, MeasuredTransmission = longest, Notes = [.. top.Notes, note] };
    }

    /// <summary>The channel's centre: the first carrier estimate when it lies near the middle of the occupied band
    /// (within a tenth of the band and two bins), else that middle (the strongest line of FM at an index near 2 is a
    /// first sideband, a modulating frequency away from the carrier).</summary>
    private static double ChannelCentre(double coarse, BandwidthResult bw, double binHz)
    {
        double middle = (bw.LowerEdgeHz + bw.UpperEdgeHz) / 2;
        return Math.Abs(coarse - middle) <= 0.1 * bw.OccupiedHz + 2 * binHz ? coarse : middle;
    }

    /// <summary>Bins across the occupied bandwidth the default spectrum should give (the emission's shape, not the
    /// window's, then sets its edges).</summary>
    public const int MinBinsAcross = 32;

    /// <summary>Largest FFT the finer spectrum takes.</summary>
    public const int MaxFinerFftSize = 1 << 18;

    private static BandwidthResult Bandwidths(Selection s, AnalysisOptions o) =>
        BandwidthMeasurement.Measure(s.Spectrum, 1 - o.ObwPercent / 100, o.Xdb, o.ObwNoise, s.NoiseFloorDensity);

    /// <summary>
    /// The settings of a finer spectrum when the occupied bandwidth spans fewer than <see cref="MinBinsAcross"/>
    /// bins of <paramref name="binWidthHz"/>: the power of two that gives that many, at most
    /// <see cref="MaxFinerFftSize"/> and a sixteenth of the window's samples; null when the spectrum is fine
    /// enough or cannot be made finer.
    /// </summary>
    private static SpectrumSettings? Finer(SpectrumSettings current, double binWidthHz, BandwidthResult bw, long count)
    {
        if (!(bw.OccupiedHz > 0) || bw.OccupiedHz >= MinBinsAcross * binWidthHz)
            return null;
        double wanted = current.FftSize * MinBinsAcross * binWidthHz / bw.OccupiedHz;
        int fft = current.FftSize;
        while (fft < wanted && 2L * fft <= MaxFinerFftSize && 16L * fft <= count)
            fft *= 2;
        return fft > current.FftSize ? current with { FftSize = fft } : null;
    }

    /// <summary>The spectrum pass's settings: the FFT size asked for, or <see cref="DefaultFftSize"/> halved until
    /// the window holds eight segments (down to 64).</summary>
    internal static SpectrumSettings SpectrumSettingsFor(AnalysisOptions options, long count, double sampleRateHz)
    {
        int? asked = options.FftSize
            ?? (
                options.RbwHz is { } rbw
                    ? SpectrumSettings.FftSizeForRbw(
                        rbw,
                        sampleRateHz,
                        options.SpectrumBase.Window,
                        options.SpectrumBase.KaiserBeta
                    )
                    : null
            );
        int fft = asked ?? DefaultFftSize;
        if (asked is null)
            while (fft > 64 && count < 8L * fft)
                fft /= 2;
        return options.SpectrumBase with
        {
            FftSize = fft,
            Threads = options.Threads,
            KeepSpectrogram = options.KeepSpectrogram,
        };
    }
}
