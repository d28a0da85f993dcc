using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// Real audio recorded at a receiver's FM discriminator (a sound card on the discriminator tap): each sample is the
/// instantaneous frequency's deviation, <see cref="AnalysisOptions.DiscriminatorHzPerFullScale"/> Hz per full scale
/// (from a calibration with a known deviation). Measured from it: peak, positive, negative and rms deviation, the
/// modulating components and tone, and the transmissions (the squelch closing between calls leaves near-silence). Not
/// measurable from it: the carrier's frequency and offset (a sound card cuts the discriminator's DC) and the
/// occupied bandwidth (the audio holds no RF spectrum); those checks are NOT TESTED. The stream's mean is taken off
/// (the AC coupling), then the optional post-detection filters of the options (high-pass, de-emphasis, low-pass).
/// </summary>
internal static class DiscriminatorAnalysis
{
    /// <summary>A 1 ms block is silent (squelch closed) below this power relative to the median block, dB: the
    /// discriminator's own noise with the squelch open is far louder than the quieted audio of a call, and a closed
    /// squelch is near digital silence.</summary>
    public const double SilenceBelowDb = -30;

    /// <summary>Why the RF figures are absent: the limits' NOT TESTED reason and the report's note.</summary>
    public const string NoRf =
        "discriminator audio holds no carrier frequency and no RF spectrum (a sound card cuts the discriminator's DC)";

    public static AnalysisResult Analyze(
        CaptureSource source,
        AnalysisOptions o,
        Action<long>? progress,
        Task<string> hash,
        CancellationToken cancel
    )
    {
        CaptureInfo info = source.Info;
        double scale = o.DiscriminatorHzPerFullScale!.Value;
        if (info.IsComplex)
            throw new SettingException(
                nameof(AnalysisOptions.DiscriminatorHzPerFullScale),
                scale,
                "reads real audio (a receiver's discriminator output); this capture is complex I/Q, which is measured "
                    + "without it",
                info.Path
            );
        double fs = info.SampleRateHz;
        long first = Math.Min(info.SampleCount, (long)Math.Round(o.StartS * fs));
        long count = Math.Min(
            info.SampleCount - first,
            o.DurationS is { } d ? (long)Math.Round(d * fs) : long.MaxValue
        );
        SpectrumSettings spec = Analyzer.SpectrumSettingsFor(o, count, fs);
        SpectrumResult sp = WelchEstimator.Estimate(source, spec, first, count, progress, cancel);

        // Transmissions: 1 ms blocks of the audio's power; near-silence between calls.
        double[] blocks = BlockPowers(source, first, count, (int)Math.Max(1, Math.Round(fs / 1000)), cancel);
        double[] sorted = [.. blocks.Order()];
        double median = sorted.Length > 0 ? sorted[sorted.Length / 2] : 0;
        double quiet = sorted.Length > 0 ? sorted[sorted.Length / 10] : 0;
        IReadOnlyList<Transmission> found = [];
        if (quiet < median * Math.Pow(10, SilenceBelowDb / 10))
            found = TransmissionFinder.Find(
                blocks,
                1000.0 * Math.Round(fs / 1000) / fs / 1000,
                first / fs,
                (first + count) / fs,
                Math.Max(quiet, median * 1e-6)
            );
        AnalysisResult whole = Measure(source, o, info, sp, first, count, hash, cancel);
        if (!TransmissionFinder.Splits(found, count / fs))
            return whole with { Transmissions = found };
        var measured = new List<Transmission>();
        foreach (Transmission t in found)
        {
            var (from, to) = TransmissionFinder.Steady(t);
            long a = (long)Math.Round(from * fs),
                n = Math.Max(1, (long)Math.Round(to * fs) - a);
            measured.Add(t with { Result = Measure(source, o, info, sp, a, n, hash, cancel) });
        }
        int longest = TransmissionFinder.Longest(measured);
        AnalysisResult top = measured[longest].Result!;
        string note = string.Create(
            CultureInfo.InvariantCulture,
            $"{measured.Count} transmission(s) found by the squelch's silence between them; the figures here are "
                + $"transmission {longest + 1}'s, the longest; limits are judged on every one"
        );
        return top with
        {
            Spectrum = sp,
            Transmissions = measured,
            MeasuredTransmission = longest,
            Notes = [.. top.Notes, note],
        };
    }

    private static double[] BlockPowers(CaptureSource source, long first, long count, int block, CancellationToken c)
    {
        var powers = new List<double>();
        using CaptureReader reader = source.OpenReader(first, count);
        var buf = new double[block * 256];
        double sum = 0;
        int inBlock = 0;
        int got;
        while ((got = reader.Read(buf)) > 0)
        {
            c.ThrowIfCancellationRequested();
            for (int i = 0; i < got; i++)
            {
                sum += buf[i] * buf[i];
                if (++inBlock == block)
                {
                    powers.Add(sum / block);
                    sum = 0;
                    inBlock = 0;
                }
            }
        }
        return [.. powers];
    }

    /// <summary>Measures the window [first, first + count) of the audio.</summary>
    private static AnalysisResult Measure(
        CaptureSource source,
        AnalysisOptions o,
        CaptureInfo info,
        SpectrumResult sp,
        long first,
        long count,
        Task<string> hash,
        CancellationToken cancel
    )
    {
        double fs = info.SampleRateHz;
        double k = o.DiscriminatorHzPerFullScale!.Value;
        double top = o.PostLowPassHz is { } lpHz ? Math.Min(lpHz, 0.45 * fs) : 0.45 * fs;
        // The mean first (the AC coupling is taken off before the filters).
        double mean = 0;
        long seen = 0;
        var buf = new double[1 << 16];
        using (CaptureReader r = source.OpenReader(first, count))
        {
            int got;
            while ((got = r.Read(buf)) > 0)
            {
                for (int i = 0; i < got; i++)
                    mean += buf[i];
                seen += got;
            }
        }
        mean = seen > 0 ? mean / seen : 0;
        OnePole? hp = o.PostHighPassHz is { } h ? OnePole.HighPass(h, fs) : null;
        OnePole? de = o.DeEmphasisUs is { } us ? OnePole.DeEmphasis(us * 1e-6, fs) : null;
        double[]? taps =
            o.PostLowPassHz is { } lp && lp < 0.45 * fs
                ? FirDesign.LowPass(lp, fs, Math.Max(0.1 * lp, 4 * fs / 4095.0))
                : null;
        var fir = taps is null ? null : new BlockFir(taps);
        int settle = (taps?.Length ?? 0) + (hp is null && de is null ? 0 : (int)Math.Min(count / 10, fs / 10));
        int n = 256;
        while (n < 65_536 && 4L * n * 2 <= count)
            n *= 2;
        var lines = new LineSpectrum(n, fs);
        var ws = new LineSpectrum.Workspace(n);
        var seg = new double[n];
        int filled = 0;
        double span = Math.Abs(k) * 2.2;
        var hist = new Histogram(-span, span, 1 << 18);
        double sum = 0,
            sum2 = 0;
        long used = 0,
            index = 0;
        var y = new double[buf.Length];
        // 1 ms block means of the deviation (NaN where the filters settle): the code squelch word and the reverse
        // burst are read from them, as from a pass's blocks.
        int blockLen = (int)Math.Max(1, Math.Round(fs / 1000));
        var means = new List<double>();
        double bSum = 0;
        int bN = 0,
            bAt = 0;
        using (CaptureReader r = source.OpenReader(first, count))
        {
            int got;
            while ((got = r.Read(buf)) > 0)
            {
                cancel.ThrowIfCancellationRequested();
                for (int i = 0; i < got; i++)
                {
                    double v = k * (buf[i] - mean);
                    if (hp is not null)
                        v = hp.Next(v);
                    if (de is not null)
                        v = de.Next(v);
                    y[i] = v;
                }
                if (fir is not null)
                    fir.Process(y.AsSpan(0, got), y.AsSpan(0, got));
                for (int i = 0; i < got; i++, index++)
                {
                    if (index >= settle)
                        (bSum, bN) = (bSum + y[i], bN + 1);
                    if (++bAt == blockLen)
                    {
                        means.Add(bN == blockLen ? bSum / bN : double.NaN);
                        (bSum, bN, bAt) = (0, 0, 0);
                    }
                    if (index < settle)
                        continue;
                    double v = y[i];
                    hist.Add(v);
                    sum += v;
                    sum2 += v * v;
                    used++;
                    seg[filled++] = v;
                    if (filled == n)
                    {
                        lines.AddSegment(seg, ws);
                        Array.Copy(seg, n / 2, seg, 0, n / 2);
                        filled = n / 2;
                    }
                }
            }
        }
        double[] freq = [.. means];
        double blockS = blockLen / fs;
        double avg = used > 0 ? sum / used : 0;
        double rms = used > 0 ? Math.Sqrt(Math.Max(0, sum2 / used - avg * avg)) : 0;
        double minTone = Math.Max(3 * lines.BinWidthHz, 2 * fs / Math.Max(count, 1));
        IReadOnlyList<ModulatingComponent> components = ModulatingComponents.Find(lines, minTone, top, 1);
        Measured? tone = ModulatingTone.Find(lines, minTone, top);
        double noiseHz = tone is { } tn ? TonePeaks.RawPeakNoise(lines, components, tn.Value, minTone, top, 1) : rms;
        double signal = components.Sum(c => c.PeakAmount * c.PeakAmount / 2);
        double snr = noiseHz > 0 && signal > 0 ? 10 * Math.Log10(signal / (noiseHz * noiseHz)) : 0;
        double uScale = o.DiscriminatorUncertaintyPercent ?? 0;
        var stream = new FmStream(
            lines,
            components,
            tone,
            minTone,
            top,
            hist,
            hist.Percentile(DemodulatedFeatures.Upper) - avg,
            avg - hist.Percentile(DemodulatedFeatures.Lower),
            avg,
            rms,
            used,
            noiseHz,
            fs,
            TypeB.NoiseGrowth(snr),
            peak => new UncertaintyComponent(
                "discriminator scale",
                uScale / 100 * peak,
                o.DiscriminatorUncertaintyPercent is null
                    ? "the scale as declared, its uncertainty not stated (taken as 0)"
                    : "the scale's calibration, as declared (k = 1)"
            )
        );
        var (fm, extras) = FmMeasurement.Measure(stream);
        CultureInfo c = CultureInfo.InvariantCulture;
        var method = new MethodRecord
        {
            Spectrum = sp.Mean.Settings,
            RbwHz = sp.Mean.RbwHz,
            ChannelFilter = string.Create(c, $"none: discriminator audio at {k:0.###} Hz per full scale"),
            DemodRateHz = fs,
            PostLowPassHz = top,
            PostHighPassHz = o.PostHighPassHz,
            DeEmphasisUs = o.DeEmphasisUs,
            PeakStatistic = TonePeaks.Describe(ModulationKind.Fm, null, extras.PeaksCorrected, components),
            ObwNoise = o.ObwNoise,
        };
        return new AnalysisResult
        {
            Capture = info,
            Sha256 = hash.Result,
            Window = (first, count),
            Classification = new Classification(
                ModulationKind.Fm,
                ModulationKind.Fm,
                1,
                true,
                "discriminator audio (the input is the instantaneous frequency): FM by the recording's nature, not "
                    + "classified"
            ),
            ChannelSnrDb = snr,
            Bandwidth = BandwidthMeasurement.Measure(sp.Mean, 1 - o.ObwPercent / 100, o.Xdb, o.ObwNoise),
            OccupiedUncertaintyHz = 0,
            Fm = fm,
            ModulatingFrequencyHz = tone,
            ModulatingComponents = components,
            Audio = AudioQuality.Measure(
                ModulationKind.Fm,
                lines,
                lines,
                0,
                tone,
                components,
                top,
                o.ReferenceDeviationHz,
                DcsDecoder.Decode(
                    new Demodulation.BlockStats(blockLen, freq, freq, freq, freq, freq, freq, []),
                    blockS,
                    first / fs,
                    []
                ),
                o.Weighting,
                (freq, blockS)
            ),
            Spectrum = sp,
            Method = method,
            Warnings = [],
            Waveform = [],
            WaveformLabel = "instantaneous frequency (Hz)",
            DiscriminatorHzPerFullScale = k,
            Notes =
            [
                string.Create(c, $"discriminator audio, {k:0.###} Hz per full scale: ")
                    + NoRf
                    + "; the SNR given is "
                    + "the demodulated one (the modulating components' power over the rest of the audio band)",
            ],
        };
    }
}
