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
        bool am = kind is ModulationKind.Am or ModulationKind.Cw or ModulationKind.Ook;
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

    /// <summary>Points of the whole-capture trend, at most (one per pixel column of a report plot, about).</summary>
    public const int TrendPoints = 2000;

    /// <summary>
    /// The highest and the lowest value (deviation about the mean frequency, or envelope) over the whole window,
    /// from the pass's 1 ms blocks grouped to at most <see cref="TrendPoints"/> points; times in seconds from the
    /// capture's first sample. Shows drift, bursts and over-deviation at a glance.
    /// </summary>
    public static (double[] T, double[] High, double[] Low, double StepS) Trend(
        PassResult b,
        ModulationKind kind,
        double blockS,
        double startS,
        double meanDev
    )
    {
        bool am = kind is ModulationKind.Am or ModulationKind.Cw or ModulationKind.Ook;
        BlockStats k = b.Blocks;
        int n = k.Power.Length;
        int group = Math.Max(1, (n + TrendPoints - 1) / TrendPoints);
        var t = new List<double>();
        var hi = new List<double>();
        var lo = new List<double>();
        for (int g = 0; g < n; g += group)
        {
            double h = double.NegativeInfinity,
                l = double.PositiveInfinity;
            for (int j = g; j < Math.Min(n, g + group); j++)
            {
                if (k.Count[j] == 0)
                    continue;
                h = Math.Max(h, am ? k.EnvelopeMax[j] : k.FreqMax[j] - meanDev);
                l = Math.Min(l, am ? k.EnvelopeMin[j] : k.FreqMin[j] - meanDev);
            }
            if (h < l)
                continue;
            t.Add(startS + (g + Math.Min(group, n - g) / 2.0) * blockS);
            hi.Add(h);
            lo.Add(l);
        }
        return ([.. t], [.. hi], [.. lo], group * blockS);
    }
}
