using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>FSK measurements.</summary>
public sealed record FskResult
{
    /// <summary>Tone frequencies, ascending (same axis as the carrier frequency), Hz.</summary>
    public required IReadOnlyList<double> ToneFrequenciesHz { get; init; }

    /// <summary>Shift between the outer tones, Hz.</summary>
    public required Measured ShiftHz { get; init; }

    /// <summary>Peak deviation: half the shift, Hz.</summary>
    public required double DeviationHz { get; init; }

    /// <summary>Symbol rate, baud; null when no symbol-rate line was found.</summary>
    public Measured? SymbolRateBd { get; init; }

    /// <summary>Modulation index h = shift / symbol rate; null without a symbol rate.</summary>
    public double? ModulationIndex { get; init; }
}

/// <summary>
/// FSK: the tones are the two most frequent instantaneous frequencies (the deviation histogram's
/// modes), the shift their distance, the carrier their centre; the symbol rate is the strongest
/// line of the transition stream's spectrum.
/// </summary>
internal static class FskMeasurement
{
    /// <summary>Measures an FSK signal; <paramref name="tones"/> are the histogram's tones (<see cref="FindTones"/>)
    /// on the channel's axis.</summary>
    /// <returns>The result (tone frequencies as reported), the tones' centre on the capture's axis (null with
    /// fewer than two tones), and the extras.</returns>
    public static (FskResult Result, double? CentreAxisHz, MeasurementExtras Extras) Measure(
        MeasurementInputs m,
        double[] tones,
        Spectrum.FrequencyAxis axis
    )
    {
        double coarse = m.Channel.CarrierHz;
        double[] onAxis = [.. tones.Select(x => x + coarse)];
        // The carrier of FSK is the centre of its tones (the mean frequency depends on the data).
        double? centre = onAxis.Length >= 2 ? (onAxis[0] + onAxis[^1]) / 2 : null;
        double shift =
            onAxis.Length >= 2
                ? onAxis[^1] - onAxis[0]
                : 2 * Math.Max(m.Features.PositivePeakHz, m.Features.NegativePeakHz);
        Measured? rate = null;
        var transitions = m.Pass.TransitionSpectrum;
        double postLp = m.Channel.PostLowPassHz;
        if (
            transitions.Peaks(Math.Max(m.MinToneHz, 0.02 * shift), Math.Min(postLp, 4 * shift), 0.5) is { Count: > 0 } p
        )
            rate = Measured.FromBudget(
                p[0].FrequencyHz,
                new UncertaintyComponent(
                    "resolution (interpolated line)",
                    Math.Max(
                        transitions.BinWidthHz / TypeB.SymbolRateBinDivisor,
                        TypeB.SymbolRateFraction * p[0].FrequencyHz
                    ),
                    "TypeB.SymbolRateBinDivisor, SymbolRateFraction"
                )
            );
        var result = new FskResult
        {
            ToneFrequenciesHz = [.. onAxis.Select(axis.ToReported)],
            ShiftHz = Measured.FromBudget(
                shift,
                [
                    .. PeakBudget.Of(shift, TypeB.FskShiftFraction, 1, m.Pass.Freq.BinWidth, "TypeB.FskShiftFraction"),
                    new UncertaintyComponent(
                        "noise",
                        shift * TypeB.FskNoiseShare * Math.Pow(TypeB.CappedSnr(m.SnrDb), -TypeB.FskNoisePower),
                        "TypeB.FskNoiseShare x reading x SNR^-TypeB.FskNoisePower (SNR in the occupied band)"
                    ),
                ]
            ),
            DeviationHz = shift / 2,
            SymbolRateBd = rate,
            ModulationIndex = rate is { } r ? shift / r.Value : null,
        };
        double? necessary = rate is { } rr ? EmissionDesignator.FskBandwidthHz(rr.Value, shift) : null;
        return (result, centre, new MeasurementExtras(necessary, false));
    }

    /// <summary>FSK tones from the deviation histogram: the two strongest modes, refined to the mean of their
    /// neighbourhoods; dwell = share of time near them.</summary>
    public static (double[] Tones, double Dwell) FindTones(Histogram h)
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
}
