using SignalInspect.Demodulation;

namespace SignalInspect.Measure;

/// <summary>The stretches of the demodulated signal that the report plots: a short waveform and a trend.</summary>
internal static class PlotTraces
{
    /// <summary>A few periods of the tone (20 ms of FSK) of the envelope or the deviation, at most 2000
    /// points.</summary>
    public static (double[] T, double[] V, string Label) Waveform(
        PassResult b,
        ModulationKind kind,
        double? toneHz,
        double fsd,
        double meanDev
    )
    {
        bool am = kind is ModulationKind.Am or ModulationKind.Cw;
        double[] src = am ? b.WaveEnvelope : b.WaveFreq;
        int n = src.Length;
        if (toneHz is { } f && f > 0)
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
    public static (double[] T, double[] High, double[] Low) Trend(
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
