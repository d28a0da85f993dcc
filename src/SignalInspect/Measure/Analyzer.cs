using System.Diagnostics;
using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Demodulation;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// The measurement pipeline: one Welch pass for the spectrum and bandwidths, then one pass that
/// shifts the signal to 0 Hz, channel-filters and decimates it and demodulates it (envelope,
/// instantaneous frequency, phase), with a third pass only for the phase of PM. Memory does not
/// grow with the capture: every statistic is a running sum, a fixed histogram or a Welch accumulator.
/// </summary>
public static class Analyzer
{
    private const double PeakUpper = 0.999,
        PeakLower = 0.001;

    /// <summary>Analyses a capture.</summary>
    /// <exception cref="CaptureException">The capture is too short or cannot be read.</exception>
    /// <exception cref="ArgumentOutOfRangeException">An option is out of range (named).</exception>
    public static AnalysisResult Analyze(
        CaptureSource source,
        AnalysisOptions? options = null,
        Action<long>? progress = null,
        CancellationToken cancel = default
    )
    {
        options ??= new AnalysisOptions();
        options.Validate();
        CaptureInfo info = source.Info;
        double fs = info.SampleRateHz;
        if (info.SampleCount == 0)
            throw CaptureException.ForFile(info.Path, "holds no samples: there is nothing to measure");
        var (first, count) = source.WindowSamples(options.StartS, options.DurationS);
        Profile.Note($"start: {Profile.Memory()}");
        var clock = Stopwatch.StartNew();
        var started = Stopwatch.StartNew();
        double hashDoneS = 0;
        Task<string> hash = Task.Run(
            () =>
            {
                string h = FileHash.Sha256(info.DataPath ?? info.Path);
                hashDoneS = started.Elapsed.TotalSeconds;
                return h;
            },
            cancel
        );
        var warnings = new List<string>(info.Warnings);

        // Pass A: the spectrum, the bandwidths and a first carrier estimate.
        int fft = options.FftSize ?? 4096;
        if (options.FftSize is null)
            while (fft > 64 && count < 8L * fft)
                fft /= 2;
        var spectrumSettings = new SpectrumSettings
        {
            FftSize = fft,
            Window = options.Window,
            SuppressDc = options.SuppressDc,
            Threads = options.Threads,
            KeepSpectrogram = options.KeepSpectrogram,
        };
        SpectrumResult spectrum = WelchEstimator.Estimate(source, spectrumSettings, first, count, progress, cancel);
        Profile.Stage("spectrum pass", clock);
        PowerSpectrum psd = spectrum.Mean;
        if (!(psd.TotalPower() > 1e-30))
            throw CaptureException.ForFile(
                info.Path,
                spectrum.NonFiniteSegments > 0
                    ? "holds only NaN, infinite or zero samples: there is nothing to measure"
                    : "holds only zero samples (a silent or empty recording): there is nothing to measure"
            );
        BandwidthResult bw = BandwidthMeasurement.Measure(
            psd,
            1 - options.ObwPercent / 100,
            options.Xdb,
            options.ObwNoise
        );
        double bin = psd.BinWidthHz;
        double noiseInBand = bw.NoiseFloorDensity * Math.Max(bw.OccupiedHz, psd.RbwHz);
        double snrDb =
            noiseInBand > 0 ? Math.Min(200, 10 * Math.Log10(Math.Max(bw.SignalPower, 1e-300) / noiseInBand)) : 200;
        (double lineHz, double lineFraction) = StrongestLine(psd, bw);
        double coarse = lineFraction >= 0.3 ? lineHz : bw.CentroidHz;
        if (!info.IsComplex && coarse <= bin)
            throw CaptureException.ForFile(
                info.Path,
                "the real signal has its power at 0 Hz: there is no carrier in the audio band to analyse"
            );

        // Channel filter around the signal: flat over every part of the spectrum that stands out of
        // the noise (to 60 dB below the peak), so the weak outer sidebands that shape the peaks of
        // an angle-modulated signal pass; at least 1.2 x the occupied bandwidth. Then decimated.
        double reach = Math.Max(Math.Max(bw.UpperEdgeHz - coarse, coarse - bw.LowerEdgeHz), 0) * 1.2;
        reach = Math.Max(reach, SpectralReach(psd, coarse, bw.NoiseFloorDensity));
        double passEdge = Math.Max(reach + 4 * bin, 25 * bin);
        double nyquist = fs / 2;
        double usable = info.IsComplex ? nyquist : Math.Min(coarse, nyquist - coarse);
        bool filter = 1.25 * passEdge < 0.9 * usable;
        if (!info.IsComplex && !filter)
            warnings.Add(
                "the carrier sits close to 0 Hz or to half the sample rate for its bandwidth: the analytic signal keeps some of the mirror image"
            );
        double transition = filter ? Math.Min(0.5 * passEdge, 0.9 * usable - passEdge) : 0;
        double half = passEdge + transition / 2;
        int decimation = filter ? Math.Max(1, (int)Math.Floor(fs / (2.5 * (half + transition / 2)))) : 1;
        double fsd = fs / decimation;
        // An even decimation of 4 or more starts with a half-band stage (flat to the low-pass's stop
        // edge, 80 dB down where the halved rate folds onto it): the same band kept, the long
        // low-pass then runs at half the rate.
        double stopEdge = passEdge + transition;
        bool twoStage = filter && decimation % 2 == 0 && decimation >= 4 && stopEdge < fs / 4;
        double[]? halfBand = twoStage ? FirDesign.HalfBand(stopEdge, fs, 80) : null;
        double[] taps = filter ? FirDesign.LowPass(half, twoStage ? fs / 2 : fs, transition, 80, 4095) : [1.0];
        if (!filter)
            half = usable;
        string channel =
            !filter
                ? string.Create(
                    CultureInfo.InvariantCulture,
                    $"shift {-coarse:0.###} Hz, no channel filter (the signal fills the band)"
                )
            : twoStage
                ? string.Create(
                    CultureInfo.InvariantCulture,
                    $"shift {-coarse:0.###} Hz, half-band to {fs / 2:0.###} Hz ({halfBand!.Length} taps, 80 dB from {fs / 2 - stopEdge:0.#} Hz), Kaiser-windowed sinc low-pass {half:0.#} Hz ({taps.Length} taps, 80 dB), decimation {decimation} to {fsd:0.###} Hz"
                )
            : string.Create(
                CultureInfo.InvariantCulture,
                $"shift {-coarse:0.###} Hz, Kaiser-windowed sinc low-pass {half:0.#} Hz ({taps.Length} taps, 80 dB), decimation {decimation} to {fsd:0.###} Hz"
            );
        // Default post-detection bandwidth: the channel's, so that every modulating frequency the
        // occupied bandwidth allows passes (a fixed 15 kHz would halve a 15 kHz broadcast tone).
        double postLp = options.PostLowPassHz ?? 0.9 * Math.Min(half, fsd / 2);
        postLp = Math.Min(postLp, 0.45 * fsd);
        var plan = new PassPlan(
            source,
            first,
            count,
            taps,
            decimation,
            -coarse,
            fs,
            fsd,
            half,
            postLp,
            options.PostHighPassHz,
            options.DeEmphasisUs,
            info.IsComplex,
            Math.Max(1, options.Threads ?? Environment.ProcessorCount),
            halfBand
        );

        // Pass B: demodulation.
        PassResult b = DemodulationPass.Run(plan, fit: null, offsets: null, cancel);
        Profile.Stage("demodulation pass", clock);
        if (b.Samples < 16)
            throw CaptureException.ForFile(info.Path, "too few samples remain after the channel filter to demodulate");
        double slope = b.Slope; // rad per decimated sample
        double residualHz = slope * fsd / (2 * Math.PI);
        double carrierAxisHz = coarse + residualHz;
        bool fskCarrier = false;

        // Features and classification.
        double sigmaPhase = Math.Sqrt(Math.Max(b.PhaseResidualVariance, 0));
        double aMax = b.Envelope.Percentile(PeakUpper),
            aMin = b.Envelope.Percentile(PeakLower),
            aMean = b.EnvelopeMean;
        double mEnv = aMax + aMin > 0 ? (aMax - aMin) / (aMax + aMin) : 0;
        double meanDev = b.FreqMean;
        double pPos = b.Freq.Percentile(PeakUpper) - meanDev,
            pNeg = meanDev - b.Freq.Percentile(PeakLower);
        var fsk = FindFskTones(b.Freq);
        Classification cls = Classify(snrDb, mEnv, sigmaPhase, fsk.Dwell, options.Expect);
        ModulationKind kind = cls.Kind;
        if (snrDb < 10 && kind != ModulationKind.Noise)
            warnings.Add(
                string.Create(
                    CultureInfo.InvariantCulture,
                    $"SNR in the occupied bandwidth is about {snrDb:0.#} dB: readings are unreliable and the classification uncertain"
                )
            );

        // Modulating frequency from the demodulated spectra.
        double minTone = Math.Max(3 * b.ToneSpectrum.BinWidthHz, 2 * fs / Math.Max(count, 1));
        Measured? tone = null;
        LineSpectrum? toneSource = kind switch
        {
            ModulationKind.Am => b.EnvelopeSpectrum,
            ModulationKind.Fm or ModulationKind.Pm => b.ToneSpectrum,
            _ => null,
        };
        // The envelope is not post-detection filtered (only the instantaneous frequency is): its
        // lines are searched over the channel's width, so a narrow --post-lowpass cannot hide an AM tone.
        double envelopeTop = Math.Min(half, 0.45 * fsd);
        double toneTop = kind == ModulationKind.Am ? envelopeTop : postLp;
        if (toneSource?.Peak(minTone, toneTop) is { } tp)
            tone = new Measured(tp.FrequencyHz, Math.Max(toneSource.BinWidthHz / 10, 1e-6 * tp.FrequencyHz));
        if (tone is { } t0 && count / fs < 10 / t0.Value)
            warnings.Add(
                string.Create(
                    CultureInfo.InvariantCulture,
                    $"the capture holds fewer than 10 periods of the {t0.Value:0.#} Hz modulating frequency"
                )
            );

        string peakNote = "raw percentiles";
        double snrLin = Math.Pow(10, Math.Min(snrDb, 60) / 10);
        double noiseGrowth = Math.Max(1, Math.Sqrt(1000 / snrLin)); // type-B terms grow below 30 dB
        AmResult? am = null;
        FmResult? fm = null;
        PmResult? pm = null;
        FskResult? fskResult = null;
        double? necessary = null;
        switch (kind)
        {
            case ModulationKind.Am:
                {
                    if (tone is { } tA)
                    {
                        var (tv, nv) = b.EnvelopeSpectrum.Split(tA.Value, minTone, envelopeTop);
                        double sigma = Math.Sqrt(nv);
                        if (tv >= 0.8 * (tv + nv))
                        {
                            var (dUp, dDown) = SinePeak.FromPercentiles(aMax - aMean, aMean - aMin, sigma);
                            aMax = aMean + dUp;
                            aMin = aMean - dDown;
                            mEnv = (aMax - aMin) / (aMax + aMin);
                            peakNote = "tone peaks corrected for the measured noise (sine-plus-Gaussian model)";
                        }
                    }
                    double? sb = tone is { } tn ? SidebandDepth(psd, carrierAxisHz, tn.Value) : null;
                    am = new AmResult
                    {
                        DepthPercent = new Measured(100 * mEnv, 0.3 * noiseGrowth),
                        PositivePeakPercent = 100 * (aMax - aMean) / aMean,
                        NegativePeakPercent = 100 * (aMean - aMin) / aMean,
                        SidebandDepthPercent = sb is { } s ? 100 * s : null,
                    };
                    if (tone is { } m)
                        necessary = EmissionDesignator.AmBandwidthHz(m.Value);
                    break;
                }
            case ModulationKind.Fm:
                {
                    if (tone is { } tF)
                    {
                        var (tv, nv) = b.ToneSpectrum.Split(tF.Value, minTone, postLp);
                        if (tv >= 0.8 * (tv + nv))
                        {
                            double sigma = Math.Sqrt(nv);
                            (pPos, pNeg) = SinePeak.FromPercentiles(pPos, pNeg, sigma);
                            peakNote = "tone peaks corrected for the measured noise (sine-plus-Gaussian model)";
                        }
                    }
                    double peak = Math.Max(pPos, pNeg);
                    fm = new FmResult
                    {
                        PeakDeviationHz = new Measured(
                            peak,
                            Math.Sqrt(Math.Pow(0.002 * peak * noiseGrowth, 2) + Math.Pow(b.Freq.BinWidth, 2))
                        ),
                        PositivePeakHz = pPos,
                        NegativePeakHz = pNeg,
                        HalfPeakToPeakHz = (pPos + pNeg) / 2,
                        RmsDeviationHz = b.FreqRms,
                        ModulationIndex = tone is { } m ? peak / m.Value : null,
                    };
                    if (tone is { } mm)
                        necessary = EmissionDesignator.AngleModulationBandwidthHz(mm.Value, peak);
                    break;
                }
            case ModulationKind.Pm:
                {
                    PassResult c = DemodulationPass.Run(
                        plan,
                        fit: (b.Intercept, slope),
                        offsets: b.ChunkPhaseOffsets,
                        cancel
                    );
                    Profile.Stage("phase pass", clock);
                    double up = c.Phase!.Percentile(PeakUpper),
                        lo = c.Phase.Percentile(PeakLower);
                    if (tone is not null && aMean > 0)
                    {
                        // Additive noise moves the phase by sigma_a / A (its quadrature part), read from the envelope's
                        // noise.
                        var (_, nv) = b.EnvelopeSpectrum.Split(0, minTone, 0.45 * fsd);
                        double sigmaPhi = Math.Sqrt(nv) / aMean;
                        (up, double down) = SinePeak.FromPercentiles(up, -lo, sigmaPhi);
                        lo = -down;
                        peakNote = "tone peaks corrected for the measured noise (sine-plus-Gaussian model)";
                    }
                    double p = (up - lo) / 2;
                    pm = new PmResult
                    {
                        PeakDeviationRad = new Measured(p, 0.003 * p * noiseGrowth),
                        PositivePeakRad = up,
                        NegativePeakRad = -lo,
                    };
                    if (tone is { } m)
                        necessary = EmissionDesignator.AngleModulationBandwidthHz(m.Value, p * m.Value);
                    break;
                }
            case ModulationKind.Fsk:
                {
                    double[] tones = [.. fsk.Tones.Select(x => x + coarse)];
                    if (tones.Length >= 2)
                    {
                        // The carrier of FSK is the centre of its tones (the mean frequency depends on the data).
                        carrierAxisHz = (tones[0] + tones[^1]) / 2;
                        fskCarrier = true;
                    }
                    double shift = tones.Length >= 2 ? tones[^1] - tones[0] : 2 * Math.Max(pPos, pNeg);
                    Measured? rate = null;
                    if (
                        b.TransitionSpectrum.Peaks(Math.Max(minTone, 0.02 * shift), Math.Min(postLp, 4 * shift), 0.5) is
                        { Count: > 0 } peaks
                    )
                        rate = new Measured(
                            peaks[0].FrequencyHz,
                            Math.Max(b.TransitionSpectrum.BinWidthHz / 5, 1e-4 * peaks[0].FrequencyHz)
                        );
                    fskResult = new FskResult
                    {
                        ToneFrequenciesHz = [.. tones.Select(x => AxisToReport(info, x))],
                        ShiftHz = new Measured(
                            shift,
                            Math.Sqrt(Math.Pow(0.003 * shift * noiseGrowth, 2) + Math.Pow(b.Freq.BinWidth, 2))
                        ),
                        DeviationHz = shift / 2,
                        SymbolRateBd = rate,
                        ModulationIndex = rate is { } r ? shift / r.Value : null,
                    };
                    if (rate is { } rr)
                        necessary = EmissionDesignator.FskBandwidthHz(rr.Value, shift);
                    break;
                }
        }

        // Carrier: frequency on the capture's axis, then absolute and offset.
        double seSlope = Math.Sqrt(Math.Max(b.SlopeVariance, 0)) * fsd / (2 * Math.PI);
        double carrierU = Math.Sqrt(
            seSlope * seSlope + Math.Pow(0.05 * bin * (kind is ModulationKind.Noise ? 10 : 0), 2) + 1e-6
        );
        if (fskCarrier)
            carrierU = Math.Sqrt(carrierU * carrierU + Math.Pow(0.002 * (fskResult?.ShiftHz.Value ?? 0), 2));
        CarrierResult? carrier =
            kind == ModulationKind.Noise ? null : MakeCarrier(info, options, carrierAxisHz, carrierU, kind);
        string? designator = EmissionDesignator.Format(kind, necessary);

        // Warnings that protect the reader.
        if (
            kind != ModulationKind.Noise
            && (
                info.IsComplex
                    ? Math.Max(Math.Abs(bw.LowerEdgeHz), Math.Abs(bw.UpperEdgeHz)) > 0.9 * nyquist
                    : bw.UpperEdgeHz > 0.9 * nyquist
            )
        )
            warnings.Add(
                "the signal reaches the edge of the sampled band: the sample rate may be too low for its bandwidth, and the bandwidth reads low"
            );
        if (kind != ModulationKind.Noise && bw.OccupiedHz > 0.8 * (info.IsComplex ? fs : nyquist))
            warnings.Add(
                "the occupied bandwidth fills most of the sampled band: the sample rate is too low for this signal, or it is noise"
            );
        if (b.NearFullScale > Math.Max(3, 1e-5 * count))
            warnings.Add(
                string.Create(
                    CultureInfo.InvariantCulture,
                    $"{b.NearFullScale} sample value(s) at full scale: the capture is probably clipped, and levels, depth and bandwidth read wrong"
                )
            );
        if (info.IsComplex && !options.SuppressDc && HasDcSpike(psd, carrierAxisHz, bw.NoiseFloorDensity))
            warnings.Add(
                "a narrow spike sits at 0 Hz apart from the carrier (the receiver's DC offset or LO leakage): it can bias bandwidth and classification; --suppress-dc removes it"
            );
        if (spectrum.NonFiniteSegments > 0)
            warnings.Add($"{spectrum.NonFiniteSegments} spectrum segment(s) held NaN or infinite samples (taken as 0)");

        var method = new MethodRecord
        {
            Spectrum = spectrumSettings,
            RbwHz = psd.RbwHz,
            ChannelFilter = channel,
            DemodRateHz = fsd,
            PostLowPassHz = postLp,
            PostHighPassHz = options.PostHighPassHz,
            DeEmphasisUs = options.DeEmphasisUs,
            PeakStatistic = PeakStatistic(kind, b) + peakNote,
            ObwNoise = options.ObwNoise,
        };
        string sha = hash.Result;
        Profile.Stage("results, hash wait", clock);
        Profile.Note($"hash done at {hashDoneS:0.000} s, analysis at {started.Elapsed.TotalSeconds:0.000} s");
        var (waveT, waveV, waveLabel) = Waveform(b, kind, tone?.Value, fsd, meanDev);
        var (longT, longHigh, longLow) = Trend(b, kind, fsd, meanDev);
        return new AnalysisResult
        {
            Capture = info,
            Sha256 = sha,
            Window = (first, count),
            Classification = cls,
            ChannelSnrDb = snrDb,
            Carrier = carrier,
            Bandwidth = bw,
            OccupiedUncertaintyHz = Math.Max(psd.RbwHz / Math.Sqrt(3), 0.005 * bw.OccupiedHz),
            Am = am,
            Fm = fm,
            Pm = pm,
            Fsk = fskResult,
            ModulatingFrequencyHz = kind is ModulationKind.Am or ModulationKind.Fm or ModulationKind.Pm ? tone : null,
            NecessaryBandwidthHz = necessary,
            EmissionDesignator = designator,
            Spectrum = spectrum,
            Method = method,
            Warnings = warnings,
            Waveform = [.. waveT.Zip(waveV)],
            TrendHigh = [.. longT.Zip(longHigh)],
            TrendLow = [.. longT.Zip(longLow)],
            WaveformLabel = waveLabel,
        };
    }

    private static string PeakStatistic(ModulationKind kind, PassResult b)
    {
        bool freq = kind is ModulationKind.Fm or ModulationKind.Fsk;
        bool jitter = freq ? b.JitterFrequency : b.JitterEnvelope;
        string cutoff = freq ? "the post-detection cutoff" : "the channel filter's cutoff";
        return "positive peak = 99.9th percentile, negative peak = 0.1th percentile of the post-detection signal, "
            + (
                jitter
                    ? $"read at a pseudo-random instant in each sample interval (64-phase band-limited interpolation; fewer than 30 samples per period at {cutoff}); "
                    : $"taken at the samples (30 or more per period at {cutoff}); "
            );
    }

    /// <summary>A frequency on the capture's axis as reported: absolute RF when the centre is known (complex
    /// input).</summary>
    public static double AxisToReport(CaptureInfo info, double axisHz) =>
        info.IsComplex && info.CenterFrequencyHz is { } c ? c + axisHz : axisHz;

    private static CarrierResult MakeCarrier(
        CaptureInfo info,
        AnalysisOptions o,
        double axisHz,
        double u,
        ModulationKind kind
    )
    {
        double reported = AxisToReport(info, axisHz);
        bool absolute = info.IsComplex && info.CenterFrequencyHz is not null;
        double offset;
        string reference;
        double? rf = absolute ? reported : null;
        if (o.NominalHz is { } nominal)
        {
            offset = reported - nominal;
            reference = string.Create(CultureInfo.InvariantCulture, $"nominal {nominal:0.###} Hz (--nominal)");
            rf ??= absolute || nominal > 0 ? nominal : null;
            if (!absolute && !info.IsComplex)
                rf = null;
        }
        else if (info.IsComplex)
        {
            offset = axisHz;
            reference = info.CenterFrequencyHz is { } c
                ? string.Create(CultureInfo.InvariantCulture, $"capture centre {c:0.###} Hz")
                : "capture centre (RF unknown)";
        }
        else
        {
            offset = axisHz;
            reference = "0 Hz of the audio band (real input; give --nominal for an offset)";
        }
        string method = kind switch
        {
            ModulationKind.Cw or ModulationKind.Am =>
                "envelope-weighted least-squares fit of the unwrapped carrier phase (Tretter 1985; efficient at high SNR, Rife and Boorstyn 1974 bound)",
            ModulationKind.Fsk => "centre of the two tones (the most frequent instantaneous frequencies)",
            _ => "mean instantaneous frequency: least-squares slope of the unwrapped phase over the whole window",
        };
        return new CarrierResult
        {
            FrequencyHz = new Measured(reported, u),
            OffsetHz = offset,
            OffsetPpm = rf is { } r && r != 0 ? offset / r * 1e6 : null,
            OffsetReference = reference,
            Method = method,
        };
    }

    /// <summary>
    /// How far from <paramref name="centreHz"/> the spectrum stays above both 60 dB below its peak and
    /// 10 dB above the noise floor (the farthest such bin, on either side).
    /// </summary>
    private static double SpectralReach(PowerSpectrum psd, double centreHz, double floor)
    {
        ReadOnlySpan<double> v = psd.Values;
        double threshold = Math.Max(v[psd.PeakIndex()] * 1e-6, floor * 10);
        double reach = 0;
        for (int i = 0; i < v.Length; i++)
            if (v[i] > threshold)
                reach = Math.Max(reach, Math.Abs(psd.FrequenciesHz[i] - centreHz));
        return reach;
    }

    /// <summary>A line at exactly 0 Hz, 10 dB above its surroundings and the floor, away from the carrier: a receiver's
    /// DC spike.</summary>
    private static bool HasDcSpike(PowerSpectrum psd, double carrierAxisHz, double floor)
    {
        int centre = Array.IndexOf(psd.FrequenciesHz.ToArray(), 0.0);
        int hw = psd.Window.MainLobeHalfWidthBins;
        if (centre < 0 || Math.Abs(carrierAxisHz) < 4 * hw * psd.BinWidthHz)
            return false;
        var around = new List<double>();
        for (int k = 3 * hw; k <= 8 * hw; k++)
        {
            if (centre - k >= 0)
                around.Add(psd.Values[centre - k]);
            if (centre + k < psd.Count)
                around.Add(psd.Values[centre + k]);
        }
        if (around.Count == 0)
            return false;
        around.Sort();
        double med = around[around.Count / 2];
        return psd.Values[centre] > 10 * med && psd.Values[centre] > 10 * floor;
    }

    /// <summary>The strongest narrow line: its interpolated frequency and its share of the signal power (floor
    /// removed).</summary>
    private static (double Hz, double Fraction) StrongestLine(PowerSpectrum psd, BandwidthResult bw)
    {
        int k = psd.PeakIndex();
        ReadOnlySpan<double> v = psd.Values;
        double line = 0;
        int hw = psd.Window.MainLobeHalfWidthBins + 1;
        for (int i = Math.Max(0, k - hw); i <= Math.Min(v.Length - 1, k + hw); i++)
            line += Math.Max(0, v[i] - bw.NoiseFloorDensity) * psd.BinWidthHz;
        double hz = psd.FrequenciesHz[k];
        if (k > 0 && k < v.Length - 1)
            hz += PeakInterpolation.LogParabolic(v[k - 1], v[k], v[k + 1]) * psd.BinWidthHz;
        return (hz, bw.SignalPower > 0 ? Math.Min(1, line / bw.SignalPower) : 0);
    }

    /// <summary>m = 2 sqrt(mean sideband power / carrier power) from the first sideband pair (AM, 20 log10(m/2) dBc per
    /// sideband).</summary>
    private static double? SidebandDepth(PowerSpectrum psd, double carrierHz, double toneHz)
    {
        double Line(double f)
        {
            int k = (int)Math.Round((f - psd.FrequenciesHz[0]) / psd.BinWidthHz);
            int hw = psd.Window.MainLobeHalfWidthBins + 1;
            if (k - hw < 0 || k + hw >= psd.Count)
                return double.NaN;
            double s = 0;
            for (int i = k - hw; i <= k + hw; i++)
                s += psd.Values[i];
            return s;
        }
        if (toneHz < 4 * psd.Window.MainLobeHalfWidthBins * psd.BinWidthHz)
            return null;
        double pc = Line(carrierHz),
            pl = Line(carrierHz - toneHz),
            pu = Line(carrierHz + toneHz);
        if (double.IsNaN(pc))
            return null;
        double ps =
            double.IsNaN(pl) ? pu
            : double.IsNaN(pu) ? pl
            : (pl + pu) / 2;
        return double.IsNaN(ps) || pc <= 0 ? null : 2 * Math.Sqrt(ps / pc);
    }

    private static Classification Classify(
        double snrDb,
        double mEnv,
        double sigmaPhase,
        double dwell,
        ModulationKind? expect
    )
    {
        ModulationKind detected;
        double conf;
        string why;
        CultureInfo c = CultureInfo.InvariantCulture;
        if (snrDb < 3)
        {
            detected = ModulationKind.Noise;
            conf = Math.Clamp(0.6 + (3 - snrDb) / 10, 0.5, 0.95);
            why = string.Create(c, $"no signal stands above the noise floor (SNR in band {snrDb:0.#} dB)");
        }
        else if (sigmaPhase < 0.15)
        {
            if (mEnv > 0.03)
            {
                detected = ModulationKind.Am;
                conf = Math.Clamp(0.6 + 4 * (mEnv - 0.03) + (0.15 - sigmaPhase), 0.5, 0.99);
                why = string.Create(
                    c,
                    $"steady phase (rms {sigmaPhase:0.###} rad) with an envelope that varies (depth {100 * mEnv:0.#} %)"
                );
            }
            else
            {
                detected = ModulationKind.Cw;
                conf = Math.Clamp(0.7 + (0.03 - mEnv) * 5 + (0.15 - sigmaPhase), 0.5, 0.99);
                why = string.Create(
                    c,
                    $"steady phase (rms {sigmaPhase:0.###} rad) and envelope (depth {100 * mEnv:0.##} %): an unmodulated carrier"
                );
            }
        }
        else if (dwell > 0.6)
        {
            detected = ModulationKind.Fsk;
            conf = Math.Clamp(0.5 + (dwell - 0.6) * 1.5, 0.5, 0.99);
            why = string.Create(
                c,
                $"the instantaneous frequency dwells on discrete tones ({100 * dwell:0} % of the time)"
            );
        }
        else if (sigmaPhase * Math.Sqrt(2) <= Math.PI / 2)
        {
            detected = ModulationKind.Pm;
            conf = 0.55;
            why = string.Create(
                c,
                $"angle modulation of small peak phase (about {sigmaPhase * Math.Sqrt(2):0.##} rad): read as PM; a tone cannot tell PM from FM, give --expect fm if it is FM"
            );
        }
        else
        {
            detected = ModulationKind.Fm;
            conf = Math.Clamp(0.6 + (sigmaPhase * Math.Sqrt(2) - Math.PI / 2) / 4 + (0.6 - dwell) / 2, 0.5, 0.97);
            why = string.Create(
                c,
                $"angle modulation (peak phase about {sigmaPhase * Math.Sqrt(2):0.#} rad) with a continuous instantaneous frequency"
            );
        }
        if (snrDb < 15 && detected != ModulationKind.Noise)
            conf *= Math.Clamp((snrDb - 3) / 12, 0.3, 1);
        return expect is { } e
            ? new Classification(
                e,
                detected,
                conf,
                true,
                $"measured as {e.Name()} (--expect); the classifier found {detected.Name()}: {why}"
            )
            : new Classification(detected, detected, conf, false, why);
    }

    /// <summary>FSK tones from the deviation histogram: the two strongest modes, refined to the mean of their
    /// neighbourhoods; dwell = share of time near them.</summary>
    private static (double[] Tones, double Dwell) FindFskTones(Histogram h)
    {
        double lo = h.Percentile(0.005),
            hi = h.Percentile(0.995);
        if (!(hi > lo))
            return ([], 0);
        const int bins = 200;
        double w = (hi - lo) / bins;
        var coarse = new double[bins];
        for (int i = 0; i < h.Bins; i++)
        {
            double x = h.Centre(i);
            if (x < lo || x >= hi || h[i] == 0)
                continue;
            coarse[Math.Min(bins - 1, (int)((x - lo) / w))] += h[i];
        }
        int p1 = Array.IndexOf(coarse, coarse.Max());
        int p2 = -1;
        for (int i = 0; i < bins; i++)
            if (Math.Abs(i - p1) > bins / 5 && (p2 < 0 || coarse[i] > coarse[p2]))
                p2 = i;
        if (p2 < 0)
            return ([], 0);
        double f1 = lo + (p1 + 0.5) * w,
            f2 = lo + (p2 + 0.5) * w;
        double sep = Math.Abs(f2 - f1);
        double t1 = Mode(h, Math.Min(f1, f2), 0.15 * sep),
            t2 = Mode(h, Math.Max(f1, f2), 0.15 * sep);
        double dwell =
            h.FractionBetween(t1 - 0.1 * sep, t1 + 0.1 * sep) + h.FractionBetween(t2 - 0.1 * sep, t2 + 0.1 * sep);
        return ([t1, t2], dwell);
    }

    /// <summary>
    /// The most frequent value near <paramref name="guess"/>: the dwell frequency of an FSK tone. The
    /// histogram is smoothed over 1 % of the search width and the peak refined by a parabola; unlike a
    /// mean it is not pulled outwards by the overshoot at symbol transitions.
    /// </summary>
    private static double Mode(Histogram h, double guess, double width)
    {
        int i0 = Math.Max(0, (int)((guess - width - h.Low) / h.BinWidth)),
            i1 = Math.Min(h.Bins - 1, (int)((guess + width - h.Low) / h.BinWidth));
        int k = Math.Max(1, (int)(0.01 * width / h.BinWidth));
        // Sums over bins [i - k, i + k] (clipped to the histogram), as a sliding window: counts are
        // integers, so the running sum is exact.
        var sm = new double[i1 - i0 + 1];
        long run = 0;
        for (int j = Math.Max(0, i0 - k); j <= Math.Min(h.Bins - 1, i0 + k); j++)
            run += h[j];
        for (int i = i0; i <= i1; i++)
        {
            sm[i - i0] = run;
            if (i + k + 1 <= h.Bins - 1)
                run += h[i + k + 1];
            if (i - k >= 0)
                run -= h[i - k];
        }
        int best = Array.IndexOf(sm, sm.Max());
        double delta =
            best > 0 && best < sm.Length - 1 ? PeakInterpolation.Parabolic(sm[best - 1], sm[best], sm[best + 1]) : 0;
        return h.Centre(i0 + best) + delta * h.BinWidth;
    }

    private static (double[] T, double[] V, string Label) Waveform(
        PassResult b,
        ModulationKind kind,
        double? toneHz,
        double fsd,
        double meanDev,
        bool whole = false
    )
    {
        bool am = kind is ModulationKind.Am or ModulationKind.Cw;
        double[] src = am ? b.WaveEnvelope : b.WaveFreq;
        int n = src.Length;
        if (whole)
        { }
        else if (toneHz is { } f && f > 0)
            n = Math.Min(n, (int)Math.Ceiling(5 * fsd / f));
        else if (kind == ModulationKind.Fsk)
            n = Math.Min(n, (int)(0.02 * fsd) + 1);
        n = Math.Max(2, Math.Min(n, src.Length));
        int step = Math.Max(1, n / 2000);
        var t = new List<double>();
        var v = new List<double>();
        for (int i = 0; i < n; i += step)
        {
            t.Add(i / fsd);
            v.Add(am ? src[i] : src[i] - meanDev);
        }
        return ([.. t], [.. v], am ? "envelope (full scale)" : "instantaneous frequency deviation (Hz)");
    }

    /// <summary>The highest and the lowest value per 5 ms of the stored stretch (shows drift, bursts and over-deviation
    /// at a glance).</summary>
    private static (double[] T, double[] High, double[] Low) Trend(
        PassResult b,
        ModulationKind kind,
        double fsd,
        double meanDev
    )
    {
        bool am = kind is ModulationKind.Am or ModulationKind.Cw;
        double[] src = am ? b.WaveEnvelope : b.WaveFreq;
        int chunk = Math.Max(2, (int)(0.005 * fsd));
        var t = new List<double>();
        var v = new List<double>();
        var lows = new List<double>();
        for (int i = 0; i + chunk <= src.Length; i += chunk)
        {
            double hi = double.NegativeInfinity,
                lo = double.PositiveInfinity;
            for (int j = i; j < i + chunk; j++)
            {
                hi = Math.Max(hi, src[j]);
                lo = Math.Min(lo, src[j]);
            }
            double off = am ? 0 : meanDev;
            t.Add((i + chunk / 2) / fsd);
            v.Add(hi - off);
            lows.Add(lo - off);
        }
        return ([.. t], [.. v], [.. lows]);
    }
}
