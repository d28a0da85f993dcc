using MathNet.Numerics.Statistics;
using SignalInspect.Demodulation;

namespace SignalInspect.Measure;

/// <summary>One window of the timeline.</summary>
/// <param name="StartS">Start, seconds from the capture's first sample.</param>
/// <param name="EndS">End, seconds.</param>
/// <param name="CarrierFrequencyHz">The carrier in the window, on the axis of
/// <see cref="CarrierResult.FrequencyHz"/>.</param>
/// <param name="CarrierOffsetHz">Its offset, from the reference of <see cref="CarrierResult.OffsetHz"/>.</param>
/// <param name="OffsetPpm">The offset in ppm of the RF frequency, null when that is unknown.</param>
/// <param name="StandardUncertaintyHz">Standard uncertainty of the window's carrier (type A: the scatter of its 1 ms
/// means about their own line).</param>
/// <param name="LevelDbfs">Mean channel power, dB relative to full scale.</param>
/// <param name="RawPeakDeviationHz">FM: the largest excursion of the instantaneous frequency from the window's
/// carrier, as sampled (noise not removed: an upper reading), Hz; null for other classes.</param>
/// <param name="RawDepthPercent">AM: (max - min) / (max + min) of the envelope in the window, as sampled (noise not
/// removed), %; null for other classes.</param>
public sealed record TrackWindow(
    double StartS,
    double EndS,
    double CarrierFrequencyHz,
    double CarrierOffsetHz,
    double? OffsetPpm,
    double StandardUncertaintyHz,
    double LevelDbfs,
    double? RawPeakDeviationHz,
    double? RawDepthPercent
);

/// <summary>The carrier, the modulation and the level against time, in windows of <paramref name="WindowS"/>.</summary>
/// <param name="WindowS">Window length, s.</param>
/// <param name="Windows">The windows with a carrier on (at least half their 1 ms blocks 3 dB over the noise).</param>
/// <param name="DriftHzPerS">Least-squares slope of the windows' carrier against time (weights 1 / u^2), with its
/// standard error.</param>
/// <param name="Detrended">Whether the deviation was measured about this local carrier (a second demodulation pass,
/// taken when the carrier moved by more than its noise allows).</param>
public sealed record Timeline(
    double WindowS,
    IReadOnlyList<TrackWindow> Windows,
    Measured? DriftHzPerS,
    bool Detrended = false
)
{
    /// <summary>Largest window offset, Hz.</summary>
    public double MaxOffsetHz => Windows.Max(w => w.CarrierOffsetHz);

    /// <summary>Smallest window offset, Hz.</summary>
    public double MinOffsetHz => Windows.Min(w => w.CarrierOffsetHz);

    /// <summary>Mean of the windows' offsets, Hz.</summary>
    public double MeanOffsetHz => Windows.Average(w => w.CarrierOffsetHz);

    /// <summary>Spread of the windows' carrier (max - min), Hz.</summary>
    public double SpanHz => MaxOffsetHz - MinOffsetHz;
}

/// <summary>Builds the <see cref="Timeline"/> from the demodulation pass's 1 ms blocks.</summary>
internal static class TimelineMeasurement
{
    /// <summary>Default window length, s (common practice for frequency-against-time readings of a key-up: long
    /// enough to average a voice-band tone, short enough to follow a drift).</summary>
    public const double DefaultWindowS = 0.1;

    /// <summary>
    /// The window length: <paramref name="asked"/>, else about <see cref="DefaultWindowS"/> made a whole number of
    /// periods of <paramref name="toneHz"/> (so the tone averages out of the window's mean frequency), in whole
    /// blocks of <paramref name="blockS"/>.
    /// </summary>
    public static double WindowS(double? asked, double? toneHz, double blockS)
    {
        double w = asked ?? DefaultWindowS;
        if (asked is null && toneHz is { } f && f > 0)
            w = Math.Max(1, Math.Round(DefaultWindowS * f)) / f;
        return Math.Max(1, Math.Round(w / blockS)) * blockS;
    }

    /// <summary>
    /// The timeline: <paramref name="blocks"/> (of <paramref name="blockS"/> s from <paramref name="startS"/>) cut
    /// into windows of <paramref name="windowS"/>; a block counts when its power is 3 dB over
    /// <paramref name="noisePower"/>. Each window's carrier is <paramref name="car"/> moved by its mean frequency
    /// minus the mean over every block counted (the on-air time the whole capture's carrier is measured over);
    /// without <paramref name="car"/> the windows hold that difference alone. Null when no window holds a carrier.
    /// </summary>
    public static Timeline? Measure(
        BlockStats blocks,
        double blockS,
        double startS,
        double windowS,
        double noisePower,
        CarrierResult? car,
        ModulationKind kind
    )
    {
        // A keyed carrier's blocks hold its edges and the noise between its keyings: their mean frequency is not
        // the carrier's (which comes from the spectrum's line); no timeline.
        if (kind is ModulationKind.Ook or ModulationKind.Noise)
            return null;
        int per = Math.Max(1, (int)Math.Round(windowS / blockS));
        int n = blocks.Power.Length;
        var raw =
            new List<(int W0, int W1, double Mean, double U, double Level, int Blocks, double? Dev, double? Depth)>();
        var x = new List<double>(per);
        // FSK: a window's mean frequency leans to whichever tone its bits favour; the carrier is the centre of the
        // two tones, each read from the blocks' extremes.
        (double Split, double Quarter)? tones = kind == ModulationKind.Fsk ? TwoTones(blocks, noisePower) : null;
        double floor = 2 * noisePower;
        for (int w0 = 0; w0 < n; w0 += per)
        {
            int w1 = Math.Min(n, w0 + per);
            x.Clear();
            double p = 0,
                fMax = double.NegativeInfinity,
                fMin = double.PositiveInfinity,
                aMax = double.NegativeInfinity,
                aMin = double.PositiveInfinity;
            var idx = new List<int>(per);
            for (int b = w0; b < w1; b++)
            {
                // Whole blocks only: a part of one holds a part of a tone period, whose mean is not the carrier.
                if (blocks.Count[b] < blocks.BlockLength || !(blocks.Power[b] > floor))
                    continue;
                x.Add(blocks.Freq[b]);
                idx.Add(b);
                p += blocks.Power[b];
                fMax = Math.Max(fMax, blocks.FreqMax[b]);
                fMin = Math.Min(fMin, blocks.FreqMin[b]);
                aMax = Math.Max(aMax, blocks.EnvelopeMax[b]);
                aMin = Math.Min(aMin, blocks.EnvelopeMin[b]);
            }
            if (x.Count < Math.Max(3, per / 2))
                continue;
            double mean,
                u;
            if (tones is { } tt)
            {
                // Each block's extremes: the highest frequency of a block that reached the upper tone is that tone,
                // the lowest of one that reached the lower tone is that one (a block straddling a bit transition
                // holds both; noise raises the one and lowers the other alike, so their centre keeps).
                var hi = idx.Select(b => blocks.FreqMax[b]).Where(v => v > tt.Split + tt.Quarter).ToList();
                var lo = idx.Select(b => blocks.FreqMin[b]).Where(v => v < tt.Split - tt.Quarter).ToList();
                if (hi.Count < 3 || lo.Count < 3)
                    continue;
                mean = (hi.Median() + lo.Median()) / 2;
                u = 0.5 * 1.2533 * Math.Sqrt(hi.Variance() / hi.Count + lo.Variance() / lo.Count);
            }
            else
            {
                mean = x.Average();
                u = DetrendedStandardError(idx, x);
            }
            raw.Add(
                (
                    w0,
                    w1,
                    mean,
                    u,
                    10 * Math.Log10(p / x.Count),
                    x.Count,
                    kind == ModulationKind.Fm ? Math.Max(fMax - mean, mean - fMin) : null,
                    kind == ModulationKind.Am && aMax + aMin > 0 ? 100 * (aMax - aMin) / (aMax + aMin) : null
                )
            );
        }
        if (raw.Count == 0)
            return null;
        double reference = raw.Sum(r => r.Mean * r.Blocks) / raw.Sum(r => r.Blocks);
        var windows = new List<TrackWindow>(raw.Count);
        foreach (var r in raw)
        {
            double delta = r.Mean - reference;
            double offset = (car?.OffsetHz ?? 0) + delta;
            windows.Add(
                new TrackWindow(
                    startS + r.W0 * blockS,
                    startS + r.W1 * blockS,
                    (car?.FrequencyHz.Value ?? 0) + delta,
                    offset,
                    car?.PpmReferenceHz is { } rf ? offset / rf * 1e6 : null,
                    r.U,
                    r.Level,
                    r.Dev,
                    r.Depth
                )
            );
        }
        return new Timeline(windowS, windows, Drift(windows));
    }

    /// <summary>
    /// Whether the carrier moved by more than its noise allows: the span of the windows read as surely as most
    /// (u within three times the median) exceeds six times their median standard uncertainty and 0.25 % of the
    /// channel's half width (below that a drift widens the deviation's percentiles by under 0.1 % of a
    /// channel-filling deviation). The deviation is then measured again about the local carrier.
    /// </summary>
    public static bool Drifts(Timeline t, double channelHalfWidthHz)
    {
        if (t.Windows.Count < 3)
            return false;
        double[] u = [.. t.Windows.Select(w => w.StandardUncertaintyHz).Order()];
        double median = u[u.Length / 2];
        // Windows read far less surely than the rest (a part of a window, a fade) do not make a drift.
        var sure = t.Windows.Where(w => w.StandardUncertaintyHz <= 3 * median).Select(w => w.CarrierOffsetHz).ToList();
        return sure.Count >= 3 && sure.Max() - sure.Min() > Math.Max(6 * median, 0.0025 * channelHalfWidthHz);
    }

    /// <summary>The two tones of an FSK capture from its whole blocks' mean frequencies (two-means, from the
    /// extremes): the frequency between them and a quarter of their distance; null when they do not part.</summary>
    private static (double Split, double Quarter)? TwoTones(BlockStats blocks, double noisePower)
    {
        var f = new List<double>();
        for (int b = 0; b < blocks.Power.Length; b++)
            if (blocks.Count[b] >= blocks.BlockLength && blocks.Power[b] > 2 * noisePower)
                f.Add(blocks.Freq[b]);
        if (f.Count < 8)
            return null;
        double lo = f.Min(),
            hi = f.Max();
        for (int it = 0; it < 20; it++)
        {
            double mid = (lo + hi) / 2;
            var up = f.Where(v => v > mid).ToList();
            var down = f.Where(v => v <= mid).ToList();
            if (up.Count == 0 || down.Count == 0)
                return null;
            (lo, hi) = (down.Average(), up.Average());
        }
        return hi > lo ? ((lo + hi) / 2, (hi - lo) / 4) : null;
    }

    /// <summary>Standard error of the mean of <paramref name="x"/> about their least-squares line against
    /// <paramref name="t"/> (a drift within the window is not scatter).</summary>
    private static double DetrendedStandardError(IReadOnlyList<int> t, IReadOnlyList<double> x)
    {
        int m = x.Count;
        double mt = t.Average(),
            mx = x.Average();
        double stt = 0,
            stx = 0;
        for (int i = 0; i < m; i++)
        {
            stt += (t[i] - mt) * (t[i] - mt);
            stx += (t[i] - mt) * (x[i] - mx);
        }
        double slope = stt > 0 ? stx / stt : 0;
        double ss = 0;
        for (int i = 0; i < m; i++)
        {
            double r = x[i] - mx - slope * (t[i] - mt);
            ss += r * r;
        }
        return Math.Sqrt(ss / (m - 2) / m);
    }

    /// <summary>Weighted least-squares slope of the windows' carrier against their centre times, Hz/s, with its
    /// standard error scaled by the fit's reduced chi-square when that exceeds 1 (scatter the u do not explain).
    /// Null with fewer than three windows.</summary>
    private static Measured? Drift(IReadOnlyList<TrackWindow> w)
    {
        if (w.Count < 3)
            return null;
        double sw = 0,
            swt = 0,
            swf = 0,
            swtt = 0,
            swtf = 0;
        foreach (TrackWindow v in w)
        {
            double q = 1 / Math.Max(v.StandardUncertaintyHz * v.StandardUncertaintyHz, 1e-12);
            double t = (v.StartS + v.EndS) / 2;
            sw += q;
            swt += q * t;
            swf += q * v.CarrierOffsetHz;
            swtt += q * t * t;
            swtf += q * t * v.CarrierOffsetHz;
        }
        double det = sw * swtt - swt * swt;
        if (!(det > 0))
            return null;
        double slope = (sw * swtf - swt * swf) / det,
            icpt = (swf - slope * swt) / sw;
        double chi2 = 0;
        foreach (TrackWindow v in w)
        {
            double r = v.CarrierOffsetHz - icpt - slope * (v.StartS + v.EndS) / 2;
            chi2 += r * r / Math.Max(v.StandardUncertaintyHz * v.StandardUncertaintyHz, 1e-12);
        }
        double reduced = chi2 / (w.Count - 2);
        return new Measured(slope, Math.Sqrt(sw / det * Math.Max(1, reduced)));
    }
}
