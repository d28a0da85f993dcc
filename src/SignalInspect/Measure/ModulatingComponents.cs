using SignalInspect.Demodulation;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>One line of the demodulated signal's spectrum: a modulating tone.</summary>
/// <param name="FrequencyHz">Its frequency, Hz (interpolated).</param>
/// <param name="PeakAmount">Its peak: deviation in Hz (FM), phase in rad (PM) or envelope depth in percent (AM),
/// from its power: a sine of peak a has a variance a^2 / 2.</param>
/// <param name="PowerShare">Its share of the power of all the components found.</param>
public sealed record ModulatingComponent(double FrequencyHz, double PeakAmount, double PowerShare);

/// <summary>
/// The modulating components of a demodulated signal: the lines of its spectrum standing clear of the
/// noise (a sub-audible tone under a test tone, both tones of a two-tone test, a tone's distortion
/// products), strongest first. The peak statistic reads them to decide whether one tone carries the
/// modulation (<see cref="TonePeaks"/>).
/// </summary>
internal static class ModulatingComponents
{
    /// <summary>A line stands this far (power ratio, 20 dB) above the median bin of the band.</summary>
    public const double AboveFloor = 100;

    /// <summary>Lines more than this far (power ratio, 40 dB) below the strongest are left out.</summary>
    public const double BelowStrongest = 1e-4;

    /// <summary>Bins either side of a line that hold its power (the Blackman-Harris main lobe and first sidelobes,
    /// as <see cref="LineSpectrumVariance.Split"/>).</summary>
    public const int Guard = 6;

    /// <summary>
    /// The components between <paramref name="minHz"/> and <paramref name="maxHz"/>; <paramref name="scale"/>
    /// turns a sine's peak in the stream's unit into the reported one (1 for Hz and rad, 100 / mean envelope
    /// for AM depth in percent).
    /// </summary>
    public static IReadOnlyList<ModulatingComponent> Find(LineSpectrum s, double minHz, double maxHz, double scale)
    {
        int k0 = Math.Max(Math.Max(LineSpectrum.MinBin, Guard + 1), (int)Math.Ceiling(minHz / s.BinWidthHz)),
            k1 = Math.Min(s.FftSize / 2 - 2, (int)Math.Floor(maxHz / s.BinWidthHz));
        if (s.Segments == 0 || k1 - k0 < 4 * Guard)
            return [];
        var powers = new double[k1 - k0 + 1];
        for (int k = k0; k <= k1; k++)
            powers[k - k0] = s.Power(k);
        double floor = Median(powers);
        double strongest = powers.Max();
        var lines = new List<(int Bin, double Variance)>();
        double toVariance = s.VarianceScale;
        for (int k = k0 + 1; k < k1; k++)
        {
            double p = s.Power(k);
            if (
                !(
                    p >= s.Power(k - 1)
                    && p > s.Power(k + 1)
                    && p > AboveFloor * floor
                    && p >= BelowStrongest * strongest
                )
            )
                continue;
            if (lines.Count > 0 && k - lines[^1].Bin <= Guard)
            {
                if (p <= s.Power(lines[^1].Bin))
                    continue;
                lines.RemoveAt(lines.Count - 1);
            }
            double v = 0;
            for (int j = Math.Max(k0, k - Guard); j <= Math.Min(k1, k + Guard); j++)
                v += Math.Max(0, s.Power(j) - floor);
            lines.Add((k, v * toVariance));
        }
        double total = lines.Sum(l => l.Variance);
        return
        [
            .. lines
                .OrderByDescending(l => l.Variance)
                .Select(l => new ModulatingComponent(
                    (l.Bin + PeakInterpolation.LogParabolic(s.Power(l.Bin - 1), s.Power(l.Bin), s.Power(l.Bin + 1)))
                        * s.BinWidthHz,
                    Math.Sqrt(2 * l.Variance) * scale,
                    total > 0 ? l.Variance / total : 0
                )),
        ];
    }

    private static double Median(double[] v)
    {
        double[] sorted = [.. v.Order()];
        return sorted[sorted.Length / 2];
    }

    /// <summary>The modulating components of an AM (depth in %), FM (deviation in Hz) or PM (phase in rad)
    /// signal.</summary>
    internal static IReadOnlyList<ModulatingComponent> ForKind(
        ModulationKind kind,
        PassResult b,
        DemodulatedFeatures f,
        double minHz,
        double envelopeTopHz,
        double postLowPassHz
    ) =>
        kind switch
        {
            ModulationKind.Am when f.EnvelopeMean > 0 => Find(
                b.EnvelopeSpectrum,
                minHz,
                envelopeTopHz,
                100 / f.EnvelopeMean
            ),
            ModulationKind.Fm => Find(b.ToneSpectrum, minHz, postLowPassHz, 1),
            ModulationKind.Pm =>
            [
                .. Find(b.ToneSpectrum, minHz, postLowPassHz, 1)
                    .Select(c => c with { PeakAmount = c.PeakAmount / c.FrequencyHz }),
            ],
            _ => [],
        };
}
