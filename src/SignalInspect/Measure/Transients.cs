using System.Numerics;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>The carrier's frequency at a key-up or key-down, against time.</summary>
/// <param name="InstantS">The key instant, seconds from the capture's first sample: where the channel's power
/// crosses 6 dB over its noise (rising at key-up, falling at key-down), read to the trace's resolution.</param>
/// <param name="SettledHz">The settled carrier the differences are taken from (the transmission's carrier, on the
/// axis the reports use).</param>
/// <param name="PeakExcursionHz">The largest difference from the settled carrier (signed) over the trace.</param>
/// <param name="PeakAtS">When it happened, seconds from the key instant (negative before a key-down).</param>
/// <param name="SettlingS">Key-up: time from the instant until the difference stays within
/// <paramref name="SettleBandHz"/>; null at key-down.</param>
/// <param name="SettleBandHz">The band the settled carrier wanders in (four times the spread of the trace's last
/// part, at least 50 Hz).</param>
/// <param name="StandardUncertaintyHz">Standard uncertainty of one reading of the trace (type A: the spread of the
/// readings of the settled carrier, modulation included).</param>
/// <param name="VisibleHz">The trace shows differences up to this many Hz either side (the capture's band about the
/// carrier); a larger excursion is not seen.</param>
/// <param name="Trace">(seconds from the key instant, Hz from the settled carrier), about every 0.25 ms, where the
/// carrier stands 10 dB over the noise.</param>
public sealed record KeyTransient(
    double InstantS,
    double SettledHz,
    double PeakExcursionHz,
    double PeakAtS,
    double? SettlingS,
    double SettleBandHz,
    double StandardUncertaintyHz,
    double VisibleHz,
    IReadOnlyList<(double T, double DfHz)> Trace
);

/// <summary>
/// Key-up and key-down frequency behaviour: the samples around the key instant (10 ms before, up to 80 ms inside
/// the transmission) are read again, shifted by the transmission's carrier, low-passed to the widest band the
/// capture shows about it (at most 40 kHz either side, so that excursions far beyond the channel are seen) and
/// decimated; the instantaneous frequency is the phase step, averaged over 0.25 ms. Only the few tens of
/// milliseconds around each key instant are read, not the capture.
/// </summary>
public static class TransientMeasurement
{
    /// <summary>Widest difference followed, Hz (beyond the 25 kHz of the widest 90.214 interval).</summary>
    public const double MaxVisibleHz = 40_000;

    /// <summary>Read before a key-up (after a key-down), s.</summary>
    public const double OutsideS = 0.010;

    /// <summary>Read inside the transmission from the key instant, s.</summary>
    public const double InsideS = 0.080;

    /// <summary>The trace's averaging and step, s.</summary>
    public const double StepS = 0.00025;

    /// <summary>
    /// The transient at the key-up (<paramref name="keyUp"/>) or key-down of <paramref name="t"/>, measured about the
    /// carrier of <paramref name="r"/> (the transmission's own analysis); null when the key instant is not in the
    /// capture or the capture's band leaves less than 2 kHz about the carrier.
    /// </summary>
    public static KeyTransient? Measure(CaptureSource source, Transmission t, AnalysisResult r, bool keyUp)
    {
        if (r.Carrier is not { } car || (keyUp ? !t.KeyUpSeen : !t.KeyDownSeen))
            return null;
        CaptureInfo info = source.Info;
        double fs = info.SampleRateHz;
        double fc = FrequencyAxis.Of(info).ToAxis(car.FrequencyHz.Value);
        double room = info.IsComplex ? fs / 2 - Math.Abs(fc) : Math.Min(fc, fs / 2 - fc);
        double band = Math.Min(MaxVisibleHz, 0.9 * room);
        if (!(band >= 2000))
            return null;
        // A wide transition keeps the filter short (its own rise, about taps / fs, hides the first readings).
        double[] h = FirDesign.LowPass(band, fs, 0.4 * band, 60, 4095);
        int half = h.Length / 2;
        int d = Math.Max(1, (int)Math.Floor(fs / (2.5 * band)));
        double fsd = fs / d;
        double inside = Math.Min(InsideS, t.DurationS);
        double from = keyUp ? t.StartS - OutsideS : t.EndS - inside;
        double to = keyUp ? t.StartS + inside : t.EndS + OutsideS;
        long first = Math.Max(0, (long)Math.Floor(from * fs) - half);
        long last = Math.Min(info.SampleCount, (long)Math.Ceiling(to * fs) + half);
        int n = (int)(last - first);
        if (n <= h.Length + 8 * d)
            return null;
        // The channel decimator shifts, filters and decimates. Its output k has input (d - 1) + k d as its newest;
        // starting it s samples in makes the newest inputs L - 1 + m d, so that output m is centred on input
        // half + m d (the filter's delay taken out), the first whose window lies wholly inside the read.
        int s = (h.Length - d) % d;
        if (s < 0)
            s += d;
        int outputs = (n - h.Length) / d + 1,
            skip = (h.Length - 1 - s - (d - 1)) / d;
        Complex[] y = Decimate(source, first, n, s, new ChannelDecimator(h, d, -fc, fs, info.IsComplex), skip, outputs);
        outputs = y.Length;
        double TimeOf(double m) => (first + half + m * d) / fs;
        // Power and frequency averaged over StepS.
        int l = Math.Max(1, (int)Math.Round(StepS * fsd));
        double noise = r.Bandwidth.NoiseFloorDensity * (info.IsComplex ? 2 : 1) * band;
        var power = new double[outputs];
        var freq = new double[outputs];
        var step = new double[outputs];
        for (int m = 1; m < outputs; m++)
            step[m] = (y[m] * Complex.Conjugate(y[m - 1])).Phase * fsd / (2 * Math.PI);
        double sp = 0,
            sf = 0;
        for (int m = 0; m < outputs; m++)
        {
            sp += y[m].Real * y[m].Real + y[m].Imaginary * y[m].Imaginary;
            sf += step[m];
            if (m >= l)
            {
                sp -= y[m - l].Real * y[m - l].Real + y[m - l].Imaginary * y[m - l].Imaginary;
                sf -= step[m - l];
            }
            power[m] = sp / Math.Min(m + 1, l);
            freq[m] = sf / Math.Min(m + 1, l);
        }
        // The averages lag by (l - 1) / 2 outputs.
        double lag = (l - 1) / 2.0;
        int instant = -1;
        if (keyUp)
        {
            for (int m = l; m < outputs && instant < 0; m++)
                if (power[m] >= 4 * noise)
                    instant = m;
        }
        else
            for (int m = outputs - 1; m >= l && instant < 0; m--)
                if (power[m] >= 4 * noise)
                    instant = m;
        if (instant < 0)
            return null;
        double instantS = TimeOf(instant - lag);
        // Readings count where the carrier stands at its full level (within 3 dB: while the filters ramp up with an
        // abrupt switch-on the phase step is not the carrier's frequency) and 10 dB over the noise.
        var inWindow = new List<int>();
        for (int m = l; m < outputs; m += l)
        {
            double ts = TimeOf(m - lag) - instantS;
            if (keyUp ? ts >= 0 && ts <= inside : ts <= 0 && ts >= -inside)
                inWindow.Add(m);
        }
        if (inWindow.Count < 8)
            return null;
        double[] levels =
        [
            .. (keyUp ? inWindow.Skip(inWindow.Count / 2) : inWindow.Take(inWindow.Count / 2))
                .Select(m => power[m])
                .Order(),
        ];
        double full = levels[levels.Length / 2];
        var trace = new List<(double T, double DfHz)>();
        foreach (int m in inWindow)
            if (power[m] >= 0.5 * full && power[m] >= 10 * noise)
                trace.Add((TimeOf(m - lag) - instantS, freq[m]));
        if (trace.Count < 8)
            return null;
        // The settled part: the last quarter of the trace away from the key instant.
        var settled = (keyUp ? trace.Skip(3 * trace.Count / 4) : trace.Take(trace.Count / 4))
            .Select(p => p.DfHz)
            .ToList();
        double mean = settled.Average();
        double spread = Math.Sqrt(settled.Sum(v => (v - mean) * (v - mean)) / Math.Max(1, settled.Count - 1));
        double settleBand = Math.Max(4 * spread, 50);
        // Differences from the settled carrier (the transmission's mean carrier holds the transient too).
        trace = [.. trace.Select(p => (p.T, p.DfHz - mean))];
        var peak = trace.MaxBy(p => Math.Abs(p.DfHz));
        double? settling = null;
        if (keyUp)
        {
            settling = 0;
            foreach (var p in trace)
                if (Math.Abs(p.DfHz) > settleBand)
                    settling = p.T + StepS;
        }
        return new KeyTransient(
            instantS,
            car.FrequencyHz.Value + mean,
            peak.DfHz,
            peak.T,
            settling,
            settleBand,
            Math.Max(spread, 1e-9),
            band,
            trace
        );
    }

    /// <summary>Samples <paramref name="first"/> + <paramref name="start"/> to <paramref name="first"/> +
    /// <paramref name="n"/> through <paramref name="decimator"/>; its outputs from <paramref name="skip"/> on, at
    /// most <paramref name="outputs"/> (a real capture becomes complex: its mirror is removed by the
    /// low-pass).</summary>
    private static Complex[] Decimate(
        CaptureSource source,
        long first,
        int n,
        int start,
        ChannelDecimator decimator,
        int skip,
        int outputs
    )
    {
        using CaptureReader reader = source.OpenReader(first + start, n - start);
        int vps = reader.ValuesPerSample;
        var buf = new double[(n - start) * vps];
        int got = 0,
            r;
        while (got < n - start && (r = reader.Read(buf.AsSpan(got * vps))) > 0)
            got += r;
        decimator.Reset(first + start);
        var re = new double[got + 1];
        var im = new double[got + 1];
        int produced = decimator.Process(buf.AsSpan(0, got * vps), re, im);
        int count = Math.Max(0, Math.Min(outputs, produced - skip));
        var y = new Complex[count];
        for (int m = 0; m < count; m++)
            y[m] = new Complex(re[skip + m], im[skip + m]);
        return y;
    }
}
