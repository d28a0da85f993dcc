using MathNet.Numerics.Statistics;
using SignalInspect.Capture;

namespace SignalInspect.Measure;

/// <summary>One pulse: its start (seconds from the capture's first sample), width and mean amplitude (full-scale
/// units, as |z| of the capture).</summary>
public readonly record struct Pulse(double StartS, double WidthS, double Amplitude);

/// <summary>The pulses of a keyed or pulsed carrier and their statistics.</summary>
public sealed record PulseResult
{
    /// <summary>Complete pulses found (cut ones at the window's ends left out).</summary>
    public required int Count { get; init; }

    /// <summary>Mean width (50 % amplitude points), s, with its standard uncertainty.</summary>
    public required Measured WidthS { get; init; }

    /// <summary>Mean period (start to start), s.</summary>
    public required Measured PeriodS { get; init; }

    /// <summary>Pulse repetition frequency, 1 / period, Hz.</summary>
    public double PrfHz => 1 / PeriodS.Value;

    /// <summary>Duty cycle, mean width / mean period, %.</summary>
    public required Measured DutyCyclePercent { get; init; }

    /// <summary>Standard deviation of the periods, s (jitter; position modulation shows here too).</summary>
    public required double PeriodJitterS { get; init; }

    /// <summary>Amplitude spread (max - min) / (max + min) of the pulses, % (pulse amplitude modulation
    /// depth).</summary>
    public required double AmplitudeSpreadPercent { get; init; }

    /// <summary>Largest distance of a pulse's start from the line through the starts (least squares against the
    /// pulse's number), s (pulse position modulation's peak shift).</summary>
    public required double PositionSpreadS { get; init; }

    /// <summary>The 0.1 s with the most on-time (47 CFR 15.35(c)): its duty cycle, %.</summary>
    public required double WorstDutyPercent { get; init; }

    /// <summary>The averaging correction of 47 CFR 15.35(c): 20 log10 of <see cref="WorstDutyPercent"/> / 100, dB
    /// (applied to a peak reading to give the average).</summary>
    public double AveragingCorrectionDb => 20 * Math.Log10(WorstDutyPercent / 100);

    /// <summary>Keyed data: the bit rate when the on and off durations are whole multiples of one unit, Bd; null for a
    /// regular train (one width, one gap) or no such unit.</summary>
    public double? BitRateBd { get; init; }

    /// <summary>The first pulses (at most <see cref="PulseMeasurement.MaxListed"/>).</summary>
    public required IReadOnlyList<Pulse> Pulses { get; init; }
}

/// <summary>
/// Pulses of a keyed carrier, from the capture read again (only for captures classed as keyed): the samples are
/// shifted by the carrier and averaged over M samples (a low-pass about four times the occupied bandwidth wide);
/// a pulse runs between the 50 % amplitude crossings (interpolated between samples) of the on-level, with 45 / 55 %
/// hysteresis. The on-level is the median amplitude of the samples standing 12 dB over the noise (a first read).
/// Widths and periods are type-A means with their standard errors plus the timing resolution (1 / (fs sqrt 12)
/// per edge).
/// </summary>
public static class PulseMeasurement
{
    /// <summary>Pulses listed in the result, at most.</summary>
    public const int MaxListed = 1000;

    /// <summary>The 47 CFR 15.35(c) averaging window, s.</summary>
    public const double AveragingWindowS = 0.1;

    /// <summary>Measures the pulses in samples [<paramref name="first"/>, first + <paramref name="count"/>).</summary>
    public static PulseResult? Measure(
        CaptureSource source,
        long first,
        long count,
        double carrierAxisHz,
        double occupiedHz,
        double noiseDensity,
        CancellationToken cancel
    )
    {
        CaptureInfo info = source.Info;
        double fs = info.SampleRateHz;
        int m = Math.Max(1, (int)Math.Round(fs / (4 * Math.Max(occupiedHz, 1))));
        // The noise's rms amplitude after the average: density x fs / M (a real capture's one-sided density over
        // fs / 2, doubled with its amplitude).
        double noiseAmp = Math.Sqrt(noiseDensity * (info.IsComplex ? 1 : 2) * fs / m);
        // First read: the on-level.
        const int bins = 4096;
        const double top = 2.0;
        var hist = new long[bins];
        Scan(source, first, count, carrierAxisHz, m, cancel, (_, a) =>
            hist[Math.Min(bins - 1, (int)(a / top * bins))]++
        );
        int lowBin = Math.Min(bins - 1, (int)(4 * noiseAmp / top * bins) + 1);
        long above = 0;
        for (int b = lowBin; b < bins; b++)
            above += hist[b];
        if (above == 0)
            return null;
        double on = 0;
        for (long seen = 0, b = lowBin; b < bins; b++)
            if ((seen += hist[b]) >= above / 2)
            {
                on = (b + 0.5) * top / bins;
                break;
            }
        // Second read: the pulses.
        double half = 0.5 * on,
            upper = 0.55 * on,
            lower = 0.45 * on;
        double delay = (m - 1) / 2.0;
        var starts = new List<double>();
        var widths = new List<double>();
        var amps = new List<double>();
        bool high = false,
            sawLow = false;
        double prev = 0,
            lastUp = double.NaN,
            lastDown,
            start = 0,
            sum = 0;
        long n0 = -1,
            sumN = 0;
        Scan(source, first, count, carrierAxisHz, m, cancel, (n, a) =>
        {
            if (n0 < 0)
                n0 = n;
            if (prev < half && a >= half)
                lastUp = n - 1 + (half - prev) / (a - prev);
            if (!high && a > upper && sawLow && !double.IsNaN(lastUp))
            {
                high = true;
                start = lastUp;
                sum = 0;
                sumN = 0;
            }
            else if (high && a < lower)
            {
                high = false;
                lastDown = n - 1 + (prev - half) / (prev - a);
                starts.Add((first + start - delay) / fs);
                widths.Add((lastDown - start) / fs);
                amps.Add(sumN > 0 ? sum / sumN : half);
            }
            if (high && n - start >= m)
            {
                sum += a;
                sumN++;
            }
            if (a < lower && n >= m)
                sawLow = true; // off after the average has filled: a pulse cut by the window's start is not one
            prev = a;
        });
        int k = starts.Count;
        if (k < 3)
            return null;
        double[] periods = [.. starts.Zip(starts.Skip(1), (x, y) => y - x)];
        double resolution = 1 / (fs * Math.Sqrt(12)) * Math.Sqrt(2); // two edges
        Measured width = MeanWithError(widths, resolution);
        Measured period = MeanWithError(periods, resolution);
        double duty = width.Value / period.Value;
        double dutyU =
            duty
            * Math.Sqrt(
                Math.Pow(width.StandardUncertainty / width.Value, 2)
                    + Math.Pow(period.StandardUncertainty / period.Value, 2)
            );
        return new PulseResult
        {
            Count = k,
            WidthS = width,
            PeriodS = period,
            DutyCyclePercent = new Measured(100 * duty, 100 * dutyU),
            PeriodJitterS = Statistics.StandardDeviation(periods),
            AmplitudeSpreadPercent = 100 * (amps.Max() - amps.Min()) / (amps.Max() + amps.Min()),
            PositionSpreadS = PositionSpread(starts, period.Value),
            WorstDutyPercent = 100 * WorstDuty(starts, widths, AveragingWindowS),
            BitRateBd = BitRate(starts, widths),
            Pulses =
            [
                .. Enumerable.Range(0, Math.Min(k, MaxListed)).Select(i => new Pulse(starts[i], widths[i], amps[i])),
            ],
        };
    }

    /// <summary>Reads the window, shifts it by the carrier and calls <paramref name="each"/> with each sample's index
    /// (from the window's start) and the amplitude of the mean over the last <paramref name="m"/> samples.</summary>
    private static void Scan(
        CaptureSource source,
        long first,
        long count,
        double fc,
        int m,
        CancellationToken cancel,
        Action<long, double> each
    )
    {
        using CaptureReader reader = source.OpenReader(first, count);
        int vps = reader.ValuesPerSample;
        const int block = 1 << 16;
        var buf = new double[block * vps];
        var ringRe = new double[m];
        var ringIm = new double[m];
        double sre = 0,
            sim = 0;
        long n = 0;
        int got;
        double fs = source.Info.SampleRateHz;
        while ((got = reader.Read(buf)) > 0)
        {
            cancel.ThrowIfCancellationRequested();
            // The oscillator restarts exactly at each block (no phase drift).
            double a0 = -2 * Math.PI * (fc * ((first + n) / fs) % 1.0),
                step = -2 * Math.PI * fc / fs;
            double cr = Math.Cos(a0),
                ci = Math.Sin(a0),
                dr = Math.Cos(step),
                di = Math.Sin(step);
            for (int i = 0; i < got; i++, n++)
            {
                double xr = buf[i * vps],
                    xi = vps == 2 ? buf[i * vps + 1] : 0;
                double re = xr * cr - xi * ci,
                    im = xr * ci + xi * cr;
                (cr, ci) = (cr * dr - ci * di, cr * di + ci * dr);
                int slot = (int)(n % m);
                sre += re - ringRe[slot];
                sim += im - ringIm[slot];
                ringRe[slot] = re;
                ringIm[slot] = im;
                double amp = Math.Sqrt(sre * sre + sim * sim) / m * (vps == 2 ? 1 : 2);
                each(n, amp);
            }
        }
    }

    private static Measured MeanWithError(IReadOnlyList<double> v, double resolution)
    {
        double mean = v.Average();
        double se = Statistics.StandardDeviation(v) / Math.Sqrt(v.Count);
        return new Measured(mean, Math.Sqrt(se * se + resolution * resolution));
    }

    /// <summary>Largest distance of a start from start_0 + i T fitted by least squares (i counted in periods, so a
    /// missing pulse keeps its place).</summary>
    private static double PositionSpread(IReadOnlyList<double> starts, double period)
    {
        double[] i = [.. starts.Select(s => Math.Round((s - starts[0]) / period))];
        double mi = i.Average(),
            ms = starts.Average();
        double sii = 0,
            sis = 0;
        for (int k = 0; k < i.Length; k++)
        {
            sii += (i[k] - mi) * (i[k] - mi);
            sis += (i[k] - mi) * (starts[k] - ms);
        }
        double slope = sii > 0 ? sis / sii : period;
        return Enumerable.Range(0, i.Length).Max(k => Math.Abs(starts[k] - ms - slope * (i[k] - mi)));
    }

    /// <summary>The largest share of on-time in any window of <paramref name="windowS"/> starting at a pulse.</summary>
    private static double WorstDuty(IReadOnlyList<double> starts, IReadOnlyList<double> widths, double windowS)
    {
        double worst = 0;
        int j = 0;
        double on = 0;
        for (int i = 0; i < starts.Count; i++)
        {
            // Window [starts[i], starts[i] + windowS): pulses i..j-1 wholly or partly inside.
            if (j < i)
            {
                j = i;
                on = 0;
            }
            while (j < starts.Count && starts[j] < starts[i] + windowS)
                on += widths[j++];
            double last = j > 0 ? Math.Max(0, starts[j - 1] + widths[j - 1] - (starts[i] + windowS)) : 0;
            worst = Math.Max(worst, (on - last) / windowS);
            on -= widths[i];
        }
        return Math.Min(1, worst);
    }

    /// <summary>The unit the on and off durations are whole multiples of (within 10 % of a unit each), when they
    /// come in at least two sizes; null otherwise.</summary>
    private static double? BitRate(IReadOnlyList<double> starts, IReadOnlyList<double> widths)
    {
        var d = new List<double>(widths);
        for (int i = 0; i + 1 < starts.Count; i++)
            d.Add(starts[i + 1] - starts[i] - widths[i]);
        double[] sorted = [.. d.Order()];
        double unit = sorted[(int)(0.05 * sorted.Length)];
        if (!(unit > 0))
            return null;
        double sumD = 0,
            sumN = 0,
            largest = 0;
        foreach (double x in d)
        {
            double k = Math.Round(x / unit);
            if (k < 1 || Math.Abs(x / unit - k) > 0.1 * Math.Max(1, k))
                return null;
            sumD += x;
            sumN += k;
            largest = Math.Max(largest, k);
        }
        return largest >= 2 ? sumN / sumD : null;
    }
}
