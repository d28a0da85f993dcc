using MathNet.Numerics.Distributions;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Survey;

/// <summary>
/// Every emission of a wideband capture, when each was on, what it is, and how busy given channels are. One Welch
/// pass keeps the spectrogram (<see cref="SurveySettings.Rows"/> time steps); emissions are found in the per-bin
/// maximum over the time steps (so a transmitter on for a tenth of the capture stands out as strongly as one on
/// throughout) against a threshold set for that maximum: for noise of density N0 a time step's bin is
/// N0 chi-square(nu) / nu (nu the step's equivalent degrees of freedom, <see cref="NoiseFloor.EquivalentDof"/>), its
/// maximum over R steps exceeds the (1 - Pfa)^(1/R) quantile with probability Pfa (constant false-alarm rate per bin,
/// Pfa = <see cref="EmissionFinder.FalseAlarm"/>). An emission is on in a time step when the power in its band
/// stands over both the noise's own detection threshold and half its on-level above the noise (its median over the
/// steps it is detected in; a step half keyed counts half the time: the edge errors of several bursts average out).
/// A weaker emission mirrored about 0 Hz from a stronger one is named as the receiver's suspected IQ image. Each
/// emission is then measured by the same analysis as <c>analyze</c>, with it selected.
/// </summary>
public static class BandSurvey
{
    /// <summary>Surveys <paramref name="source"/>.</summary>
    /// <param name="source">The capture.</param>
    /// <param name="settings">What to look for and how to measure.</param>
    /// <param name="stage">Told what is being done (one short phrase), e.g. for a progress line.</param>
    /// <param name="progress">Samples processed by the spectrum pass so far.</param>
    /// <param name="cancel">Stops the work between passes and blocks.</param>
    /// <exception cref="SettingException">A setting is out of range, or a channel lies outside the sampled
    /// band.</exception>
    public static SurveyResult Run(
        CaptureSource source,
        SurveySettings settings,
        Action<string>? stage = null,
        Action<long>? progress = null,
        CancellationToken cancel = default
    )
    {
        settings.Validate();
        CaptureInfo info = source.Info;
        AnalysisOptions a = settings.Analysis;
        FrequencyAxis axis = FrequencyAxis.Of(info);
        double fs = info.SampleRateHz;
        long first = Math.Min(info.SampleCount, (long)Math.Round(a.StartS * fs));
        long count = Math.Min(
            info.SampleCount - first,
            a.DurationS is { } d ? (long)Math.Round(d * fs) : long.MaxValue
        );
        if (settings.ChannelGrid is { } cg)
            CheckGrid(cg, info, axis);
        int fft = FftSize(fs, a, count);
        int bins = info.IsComplex ? fft : fft / 2 + 1;
        SpectrumSettings spec = a.SpectrumBase with
        {
            FftSize = fft,
            KeepSpectrogram = true,
            SpectrogramRows = settings.Rows,
            SpectrogramColumns = bins,
            SpectrogramAveraging = SpectrumAveraging.Mean,
            Threads = a.Threads,
        };
        // One hash of the file serves every emission's analysis.
        Task<string> hash = Analyzer.HashOf(source, cancel);
        stage?.Invoke("spectrum");
        SpectrumResult sp = WelchEstimator.Estimate(source, spec, first, count, progress, cancel);
        PowerSpectrum mean = sp.Mean;
        Spectrogram g = sp.Spectrogram!;
        double floor = NoiseFloor.Estimate(mean);
        double bw = mean.BinWidthHz;
        double cal = spec.CalibrationDb;
        var steps = Steps(g, mean.Segments, spec.StepSamples, fs, first);

        // The per-bin maximum over the time steps and its noise statistics.
        double[] hold = new double[mean.Count];
        for (int r = 0; r < g.Rows; r++)
        {
            ReadOnlySpan<double> row = g.Row(r);
            for (int k = 0; k < hold.Length; k++)
                hold[k] = Math.Max(hold[k], row[k]);
        }
        var held = new PowerSpectrum(
            mean.FrequenciesHz.ToArray(),
            hold,
            mean.Scaling,
            SpectrumAveraging.MaxHold,
            mean.Settings,
            mean.Window,
            mean.SampleRateHz,
            mean.CenterFrequencyHz,
            mean.IsOneSided,
            g.SegmentsPerRow
        );
        double nu = NoiseFloor.EquivalentDof(held);
        double quantile = Math.Pow(1 - EmissionFinder.FalseAlarm, 1.0 / g.Rows);
        double threshold = floor * ChiSquared.InvCDF(nu, quantile) / nu;
        double heldFloor = floor * ExpectedMaximum(nu, g.Rows);
        IReadOnlyList<Emission> found =
            floor > 0 ? EmissionFinder.Find(held, heldFloor, threshold, settings.MinSnrDb) : [];

        var emissions = new List<SurveyEmission>();
        for (int i = 0; i < found.Count; i++)
        {
            cancel.ThrowIfCancellationRequested();
            Emission e = found[i];
            var band = BandPower(g, e.FirstBin, e.LastBin, bw);
            int nb = e.LastBin - e.FirstBin + 1;
            double noise = floor * nb * bw;
            double nuBand = nu * Math.Max(1, nb / 2.0);
            double detect = noise * ChiSquared.InvCDF(nuBand, 1 - EmissionFinder.FalseAlarm) / nuBand;
            double top = band.Max();
            // Its on-level: the median of the steps it is detected in (the highest step would set the bar by the
            // luckiest step of a keyed signal whose power wanders from step to step, as random on-off data does).
            double[] detected = [.. band.Where(p => p > detect).Order()];
            double level = detected.Length > 0 ? detected[detected.Length / 2] : top;
            double half = noise + 0.5 * (level - noise);
            bool[] on = [.. band.Select(p => p > detect && p > half)];
            double onShare = steps.Share(on);
            double meanOn = Enumerable
                .Range(0, band.Length)
                .Where(r => on[r])
                .Select(r => band[r])
                .DefaultIfEmpty(top)
                .Average();
            int firstOn = Array.IndexOf(on, true),
                lastOn = Array.LastIndexOf(on, true);
            var row = new SurveyEmission
            {
                Number = i + 1,
                ImageOf = info.IsComplex ? ImageOf(found, i, bw) : null,
                LowHz = axis.ToReported(e.LowHz),
                HighHz = axis.ToReported(e.HighHz),
                CentreHz = axis.ToReported(e.CentreHz),
                PeakPowerDb = Db(top) + cal,
                MeanPowerDb = Db(meanOn) + cal,
                SnrDb = Db(Math.Max(meanOn - noise, 1e-300) / noise),
                OnAirPercent = 100 * onShare,
                FirstSeenS = firstOn >= 0 ? steps.Start(firstOn) : double.NaN,
                LastSeenS = lastOn >= 0 ? steps.End(lastOn) : double.NaN,
            };
            if (!settings.MeasureEach || i >= settings.MaxMeasured)
            {
                emissions.Add(
                    row with
                    {
                        NotMeasuredReason = settings.MeasureEach
                            ? $"only the {settings.MaxMeasured} strongest emissions are measured"
                            : "listing only (measurement not asked for)",
                    }
                );
                continue;
            }
            stage?.Invoke($"emission {i + 1} of {found.Count}");
            emissions.Add(Measure(source, a, row, e, bw, hash, cancel));
        }

        var channels = settings.ChannelGrid is { } grid ? Occupancy(g, mean, grid, floor, settings, steps, axis) : [];
        var notes = new List<string>
        {
            Inv($"spectrum: {fft}-point {spec.Window} window, RBW {mean.RbwHz:0.##} Hz, {g.Rows} time steps of ")
                + Inv($"{steps.StepS * 1000:0.###} ms; emissions detected in the per-bin maximum over the time steps ")
                + Inv($"at {Db(threshold / floor):0.0} dB over the noise floor (false-alarm probability ")
                + Inv($"{EmissionFinder.FalseAlarm:0.####} per bin), at least {settings.MinSnrDb:0.#} dB SNR in ")
                + "their own bins",
            "on air: the time steps whose power in the emission's band exceeds the noise's detection threshold and "
                + "half its on-level above the noise",
        };
        if (settings.ChannelGrid is not null)
            notes.Add(
                Inv($"channel occupancy (ITU-R SM.1880 practice): share of the {g.Rows} time steps of ")
                    + Inv($"{steps.StepS * 1000:0.###} ms whose channel power exceeds the channel's noise by ")
                    + Inv($"{settings.OccupancyThresholdDb:0.#} dB")
            );
        var warnings = new List<string>();
        if (emissions.Count == 0)
            warnings.Add(
                Inv($"no emission stands out of the noise (threshold {Db(threshold / floor):0.0} dB over the floor, ")
                    + Inv($"at least {settings.MinSnrDb:0.#} dB SNR)")
            );
        if (found.Count > settings.MaxMeasured && settings.MeasureEach)
            warnings.Add(
                $"{found.Count} emissions found: only the {settings.MaxMeasured} strongest were measured, the rest "
                    + "listed"
            );
        return new SurveyResult
        {
            Capture = info,
            Window = (first, count),
            Spectrum = sp,
            NoiseFloorDensity = floor,
            DetectionThresholdDb = Db(threshold / floor),
            TimeStepS = steps.StepS,
            Settings = settings,
            Emissions = emissions,
            Channels = channels,
            Notes = notes,
            Warnings = warnings,
        };
    }

    /// <summary>An emission mirrored about 0 Hz from a stronger one (within a tenth of that one's width, at least two
    /// bins), of like width and at least <see cref="ImageBelowDb"/> weaker: the receiver's IQ image of it, named by
    /// its number (from 1); null otherwise.</summary>
    internal static int? ImageOf(IReadOnlyList<Emission> found, int i, double binHz)
    {
        Emission e = found[i];
        for (int k = 0; k < i; k++)
        {
            Emission s = found[k];
            bool mirrored = Math.Abs(e.CentreHz + s.CentreHz) <= Math.Max(0.1 * s.WidthHz, 2 * binHz);
            bool alike = e.WidthHz <= 2 * s.WidthHz && s.WidthHz <= 2 * e.WidthHz;
            if (mirrored && alike && 10 * Math.Log10(s.Power / e.Power) >= ImageBelowDb && Math.Abs(s.CentreHz) > binHz)
                return k + 1;
        }
        return null;
    }

    /// <summary>A suspected IQ image is at least this much weaker than its emission, dB (a receiver's image
    /// rejection is some 25 to 60 dB: common practice).</summary>
    public const double ImageBelowDb = 10;

    /// <summary>Measures one emission with the analysis of <c>analyze</c>, selected by its centre (the analysis
    /// finds its extent); when the analysis's own spectrum does not show it (a short burst in a long capture), by
    /// its detected band as the channel.</summary>
    private static SurveyEmission Measure(
        CaptureSource source,
        AnalysisOptions a,
        SurveyEmission row,
        Emission e,
        double binHz,
        Task<string> hash,
        CancellationToken cancel
    )
    {
        AnalysisOptions asked = a with { Signal = new SignalSelection(row.CentreHz), KeepSpectrogram = false };
        AnalysisResult? r = null;
        string? reason = null;
        try
        {
            r = Analyzer.Analyze(source, asked, cancel: cancel, knownHash: hash);
        }
        catch (SettingException ex) when (ex.Setting == nameof(AnalysisOptions.Signal))
        {
            double width = e.WidthHz + 8 * binHz;
            double centre = (row.LowHz + row.HighHz) / 2;
            try
            {
                r = Analyzer.Analyze(
                    source,
                    asked with
                    {
                        Signal = new SignalSelection(centre, width),
                    },
                    cancel: cancel,
                    knownHash: hash
                );
            }
            catch (UserInputException inner)
            {
                reason = inner.Message;
            }
        }
        catch (UserInputException ex)
        {
            reason = ex.Message;
        }
        if (r is null)
            return row with { NotMeasuredReason = reason ?? "the analysis gave no result" };
        double centreHz =
            r.Carrier is { } c ? c.FrequencyHz.Value
            : r.Classification.Kind != ModulationKind.Noise
                ? FrequencyAxis.Of(r.Capture).ToReported((r.Bandwidth.LowerEdgeHz + r.Bandwidth.UpperEdgeHz) / 2)
            : row.CentreHz;
        // The survey lists every emission: each one's warnings need not name the others.
        r = r with
        {
            Warnings =
            [
                .. r.Warnings.Where(w => !w.StartsWith(EmissionSelection.OtherEmission, StringComparison.Ordinal)),
            ],
        };
        return row with { Analysis = r, CentreHz = centreHz };
    }

    /// <summary>The survey's FFT size: the analysis options' when given (size, or the RBW wanted), else the power of
    /// two giving bins of at most 300 Hz (a narrowband channel of 6.25 kHz spans 20 or more), at most 65 536
    /// points, halved (down to 16) until the window holds sixteen of them.</summary>
    internal static int FftSize(double fs, AnalysisOptions a, long count)
    {
        if (a.FftSize is { } n)
            return n;
        double binHz = a.RbwHz is { } rbw ? rbw / 1.5 : 300;
        int size = 256;
        while (size < 65_536 && fs / size > binHz)
            size *= 2;
        while (size > 16 && size * 16L > count)
            size /= 2;
        return size;
    }

    /// <summary>E[max of <paramref name="rows"/> independent chi-square(nu) / nu], by integrating 1 - F(x)^R
    /// (the mean of a non-negative variable is the integral of its survival function).</summary>
    internal static double ExpectedMaximum(double nu, int rows)
    {
        double top = ChiSquared.InvCDF(nu, 1 - 1e-12) / nu;
        const int steps = 4000;
        double h = top / steps,
            sum = 0;
        for (int i = 0; i <= steps; i++)
        {
            double x = i * h;
            double s = 1 - Math.Pow(ChiSquared.CDF(nu, x * nu), rows);
            sum += (i == 0 || i == steps ? 0.5 : 1) * s;
        }
        return sum * h;
    }

    private static double[] BandPower(Spectrogram g, int a, int b, double binHz)
    {
        var p = new double[g.Rows];
        for (int r = 0; r < g.Rows; r++)
        {
            ReadOnlySpan<double> row = g.Row(r);
            double s = 0;
            for (int k = a; k <= b; k++)
                s += row[k];
            p[r] = s * binHz;
        }
        return p;
    }

    private static IReadOnlyList<ChannelOccupancy> Occupancy(
        Spectrogram g,
        PowerSpectrum mean,
        ChannelGrid grid,
        double floor,
        SurveySettings settings,
        TimeSteps steps,
        FrequencyAxis axis
    )
    {
        double bw = mean.BinWidthHz;
        var list = new List<ChannelOccupancy>(grid.Count);
        for (int k = 0; k < grid.Count; k++)
        {
            double c = axis.ToAxis(grid.CentreHz(k));
            double lo = c - grid.StepHz / 2,
                hi = c + grid.StepHz / 2;
            int a = Math.Clamp((int)Math.Ceiling((lo - mean.FrequenciesHz[0]) / bw), 0, mean.Count - 1),
                b = Math.Clamp((int)Math.Floor((hi - mean.FrequenciesHz[0]) / bw - 1e-9), a, mean.Count - 1);
            double[] p = BandPower(g, a, b, bw);
            double noise = floor * (b - a + 1) * bw;
            double limit = noise * Math.Pow(10, settings.OccupancyThresholdDb / 10);
            double cal = mean.Settings.CalibrationDb;
            list.Add(
                new ChannelOccupancy(
                    grid.CentreHz(k),
                    grid.StepHz,
                    100 * steps.Share([.. p.Select(x => x > limit)]),
                    Db(steps.Mean(p)) + cal,
                    Db(p.Max()) + cal,
                    Db(noise) + cal
                )
            );
        }
        return list;
    }

    /// <summary>Refuses a grid with a channel outside the sampled band (before any pass).</summary>
    private static void CheckGrid(ChannelGrid grid, CaptureInfo info, FrequencyAxis axis)
    {
        double fs = info.SampleRateHz;
        double lowest = info.IsComplex ? -fs / 2 : 0,
            highest = fs / 2;
        for (int k = 0; k < grid.Count; k++)
        {
            double c = axis.ToAxis(grid.CentreHz(k));
            if (c - grid.StepHz / 2 >= lowest && c + grid.StepHz / 2 <= highest)
                continue;
            throw new SettingException(
                nameof(SurveySettings.ChannelGrid),
                grid.CentreHz(k),
                Inv($"channel {k + 1} ({grid.CentreHz(k):0.###} Hz, {grid.StepHz:0.###} Hz wide) lies outside the ")
                    + Inv($"sampled band ({axis.ToReported(lowest):0.###} to {axis.ToReported(highest):0.###} Hz)"),
                info.Path
            );
        }
    }

    private static string Inv(FormattableString s) => FormattableString.Invariant(s);

    private static double Db(double x) => x > 0 ? 10 * Math.Log10(x) : -400;

    private static TimeSteps Steps(Spectrogram g, long segments, int step, double fs, long first)
    {
        var weight = new double[g.Rows];
        for (int r = 0; r < g.Rows; r++)
            weight[r] = Math.Min(g.SegmentsPerRow, segments - (long)r * g.SegmentsPerRow);
        return new TimeSteps(weight, g.SegmentsPerRow * (double)step / fs, first / fs);
    }

    /// <summary>The time steps (spectrogram rows): each holds its segments (the last may hold fewer).</summary>
    private sealed record TimeSteps(double[] Weight, double StepS, double OriginS)
    {
        public double Share(bool[] on)
        {
            double w = 0,
                t = 0;
            for (int r = 0; r < Weight.Length; r++)
            {
                t += Weight[r];
                if (on[r])
                    w += Weight[r];
            }
            return t > 0 ? w / t : 0;
        }

        public double Mean(double[] p)
        {
            double w = 0,
                t = 0;
            for (int r = 0; r < Weight.Length; r++)
            {
                t += Weight[r];
                w += Weight[r] * p[r];
            }
            return t > 0 ? w / t : 0;
        }

        public double Start(int r) => OriginS + r * StepS;

        public double End(int r) => OriginS + r * StepS + StepS * Weight[r] / Weight[0];
    }
}
