using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>What was selected for measuring: the emission, the spectrum of it alone, and the others.</summary>
/// <param name="Measured">The emission measured, or null when none stands out of the noise.</param>
/// <param name="Spectrum">The mean spectrum with everything but that emission (or the channel asked for) set to
/// the noise floor: every spectral measurement (bandwidths, carrier, channel) reads this.</param>
/// <param name="Others">The other emissions, strongest first.</param>
/// <param name="NoiseFloorDensity">The noise density of the capture.</param>
/// <param name="Reference">The reference carrier (one of <paramref name="Others"/>), never the measured emission;
/// null without one.</param>
internal sealed record Selection(
    Emission? Measured,
    PowerSpectrum Spectrum,
    IReadOnlyList<Emission> Others,
    double NoiseFloorDensity,
    Emission? Reference = null
);

/// <summary>
/// Chooses the emission to measure: by default the strongest; with a <see cref="SignalSelection"/> the one
/// at its frequency, or the channel of its width there. Other emissions, spurs and an IQ image never
/// widen the measured one: their bins are set to the noise floor in the spectrum the measurements read.
/// </summary>
internal static class EmissionSelection
{
    /// <summary>Bins kept either side of the selected emission, as a share of its width (its weak outer sidebands
    /// may fall below the detection threshold), at least <see cref="MarginBins"/>. Not more: every noise bin kept
    /// adds the positive part of its fluctuation to the occupied bandwidth's sum, which widens a weak
    /// emission.</summary>
    public const double MarginShare = 0.25;

    /// <summary>Least margin either side of the selected emission, bins (the window's main lobe and more).</summary>
    public const int MarginBins = 8;

    /// <summary>How the warning naming another emission of the capture begins (a survey, which lists them all,
    /// leaves these out of each emission's warnings).</summary>
    internal const string OtherEmission = "another emission at ";

    /// <summary>An emission mirrored about 0 Hz within this share of the measured one's width is taken as the
    /// receiver's IQ image.</summary>
    public const double ImageTolerance = 0.1;

    /// <summary>The narrowest emission (the nearest among equals) whose centre lies within <paramref name="searchHz"/>
    /// of <paramref name="axisHz"/>; null when none does.</summary>
    public static Emission? Narrowest(PowerSpectrum psd, double axisHz, double searchHz) =>
        EmissionFinder
            .Find(psd, NoiseFloor.Estimate(psd))
            .Where(e => Math.Abs(e.CentreHz - axisHz) <= searchHz)
            .OrderBy(e => e.WidthHz)
            .ThenBy(e => Math.Abs(e.CentreHz - axisHz))
            .FirstOrDefault();

    /// <exception cref="SettingException">The frequency asked for is outside the band, the width wider than it, no
    /// emission stands at the frequency, or the one there is the reference carrier.</exception>
    /// <param name="info">The capture.</param>
    /// <param name="psd">Its mean spectrum.</param>
    /// <param name="asked">The emission or channel asked for; null for the strongest.</param>
    /// <param name="excludeAxisHz">Where a reference carrier stands (the capture's axis): the emission there is never
    /// the one measured; null for none.</param>
    public static Selection Select(
        CaptureInfo info,
        PowerSpectrum psd,
        SignalSelection? asked,
        double? excludeAxisHz = null
    )
    {
        double floor = NoiseFloor.Estimate(psd);
        IReadOnlyList<Emission> all = EmissionFinder.Find(psd, floor);
        Emission? reference = excludeAxisHz is { } x
            ? all.Where(e => x >= e.LowHz - 2 * psd.BinWidthHz && x <= e.HighHz + 2 * psd.BinWidthHz)
                .OrderBy(e => Math.Abs(e.CentreHz - x))
                .FirstOrDefault()
            : null;
        IReadOnlyList<Emission> candidates = [.. all.Where(e => e != reference)];
        double lowest = psd.FrequenciesHz[0],
            highest = psd.FrequenciesHz[^1];
        if (asked is { } s)
        {
            double f = FrequencyAxis.Of(info).ToAxis(s.FrequencyHz);
            string where = string.Create(CultureInfo.InvariantCulture, $"{s.FrequencyHz:0.###} Hz");
            if (!(f >= lowest && f <= highest))
                throw new SettingException(
                    nameof(AnalysisOptions.Signal),
                    where,
                    string.Create(
                        CultureInfo.InvariantCulture,
                        $"lies outside the sampled band ({FrequencyAxis.Of(info).ToReported(lowest):0.###} to "
                    )
                        + string.Create(
                            CultureInfo.InvariantCulture,
                            $"{FrequencyAxis.Of(info).ToReported(highest):0.###} Hz)"
                        ),
                    info.Path
                );
            if (s.WidthHz is { } w)
            {
                if (!(w > 0) || f - w / 2 < lowest || f + w / 2 > highest)
                    throw new SettingException(
                        nameof(AnalysisOptions.Signal),
                        w,
                        "the channel width must be positive and fit inside the sampled band",
                        info.Path
                    );
                int a = psd.BinOf(f - w / 2),
                    b = psd.BinOf(f + w / 2);
                Emission? inside = candidates.FirstOrDefault(e => e.LastBin >= a && e.FirstBin <= b);
                IReadOnlyList<(int, int)> cut = reference is { } rf ? [(rf.FirstBin, rf.LastBin)] : [];
                return new Selection(
                    inside,
                    psd.Only(a, b, cut, floor),
                    [.. all.Where(e => e.LastBin < a || e.FirstBin > b || e == reference)],
                    floor,
                    reference
                );
            }
            Emission? at = all.Where(e => f >= e.LowHz - 2 * psd.BinWidthHz && f <= e.HighHz + 2 * psd.BinWidthHz)
                .FirstOrDefault();
            if (at is null)
                throw new SettingException(
                    nameof(AnalysisOptions.Signal),
                    where,
                    "no emission stands out of the noise there (give a width to measure the channel anyway)",
                    info.Path
                );
            if (at == reference)
                throw new SettingException(
                    nameof(AnalysisOptions.Signal),
                    where,
                    "is the reference carrier: it corrects the frequencies and is not the emission measured",
                    info.Path
                );
            return Around(psd, at, all, floor, reference);
        }
        return candidates.Count == 0
            ? new Selection(null, psd, all, floor, reference)
            : Around(psd, candidates[0], all, floor, reference);
    }

    private static Selection Around(
        PowerSpectrum psd,
        Emission e,
        IReadOnlyList<Emission> all,
        double floor,
        Emission? reference
    )
    {
        double margin = Math.Max(MarginBins * psd.BinWidthHz, MarginShare * e.WidthHz);
        int a = psd.BinOf(e.LowHz - margin),
            b = psd.BinOf(e.HighHz + margin);
        IReadOnlyList<Emission> others = [.. all.Where(x => x != e)];
        return new Selection(
            e,
            psd.Only(a, b, others.Select(x => (x.FirstBin, x.LastBin)), floor),
            others,
            floor,
            reference
        );
    }

    /// <summary>Whether <paramref name="offsetHz"/> is n1 f1 + n2 f2 + n3 f3 of the three strongest components (of
    /// order |n1| + |n2| + |n3| at most <see cref="ProductOrder"/>) to within <paramref name="toleranceHz"/>.</summary>
    internal static bool ModulationProduct(
        double offsetHz,
        IReadOnlyList<ModulatingComponent> components,
        double toleranceHz
    )
    {
        double[] f = [.. components.Take(3).Select(x => x.FrequencyHz), 0, 0, 0];
        for (int i = -ProductOrder; i <= ProductOrder; i++)
            for (int j = -ProductOrder; j <= ProductOrder; j++)
                for (int k = -ProductOrder; k <= ProductOrder; k++)
                    if (
                        Math.Abs(i) + Math.Abs(j) + Math.Abs(k) is > 0 and <= ProductOrder
                        && Math.Abs(i * f[0] + j * f[1] + k * f[2] - offsetHz) <= toleranceHz
                    )
                        return components.Count > 0;
        return false;
    }

    /// <summary>A line on a modulation product is left unnamed only this far below the emission (30 dB): the
    /// lopsidedness of FM by harmonically related tones is that weak, while a carrier strong enough to move a
    /// reading is named wherever it stands.</summary>
    public const double ProductBelow = 1e-3;

    /// <summary>Highest order of a modulation product (FM's sidebands of index up to about 10 reach it).</summary>
    public const int ProductOrder = 16;

    /// <summary>One warning per other emission: its frequency, width and level relative to the measured one, and
    /// whether it looks like the measured one's IQ image (a mirror about 0 Hz of an IQ capture).</summary>
    /// <param name="info">The capture.</param>
    /// <param name="s">The selection.</param>
    /// <param name="carrierAxisHz">The measured carrier on the capture's axis.</param>
    /// <param name="components">The modulating components found: a line at the carrier plus a sum of their
    /// multiples is a modulation product (harmonically related tones make an FM spectrum lopsided), not a
    /// spur.</param>
    public static IEnumerable<string> Warnings(
        CaptureInfo info,
        Selection s,
        double carrierAxisHz,
        IReadOnlyList<ModulatingComponent> components
    )
    {
        if (s.Measured is not { } m)
            yield break;
        var axis = FrequencyAxis.Of(info);
        CultureInfo c = CultureInfo.InvariantCulture;
        foreach (
            var (hz, power) in m.UnmirroredLines.Where(l =>
                l.Power > ProductBelow * m.Power
                || !ModulationProduct(l.Hz - carrierAxisHz, components, 2 * s.Spectrum.BinWidthHz)
            )
        )
            yield return string.Create(c, $"a line at {axis.ToReported(hz):0.#} Hz inside the measured emission ")
                + string.Create(c, $"({10 * Math.Log10(power / m.Power):+0.0;-0.0} dB relative to it) has no mirror ")
                + "about its centre: a spur or another carrier within the channel, which no filter takes out; "
                + "deviation, depth and modulating components may read wrong";
        foreach (Emission o in s.Others)
        {
            double db = 10 * Math.Log10(o.Power / m.Power);
            if (o == s.Reference)
            {
                yield return string.Create(c, $"the reference carrier at {axis.ToReported(o.CentreHz):0.#} Hz ")
                    + string.Create(c, $"({db:+0.0;-0.0} dB relative to the measured emission, as read) corrects the ")
                    + "frequencies and is not part of the measured emission";
                continue;
            }
            bool image =
                info.IsComplex
                && Math.Abs(m.CentreHz) > m.WidthHz / 2
                && Math.Abs(o.CentreHz + m.CentreHz) <= Math.Max(ImageTolerance * m.WidthHz, o.WidthHz / 2)
                && db < 0;
            yield return image
                ? string.Create(c, $"a mirror of the measured emission at {axis.ToReported(o.CentreHz):0.#} Hz, ")
                    + string.Create(c, $"{db:0.0} dB relative to it: the receiver's IQ image (not measured, not a ")
                    + "second emission)"
                : OtherEmission
                    + string.Create(c, $"{axis.ToReported(o.CentreHz):0.#} Hz ")
                    + string.Create(c, $"({o.WidthHz:0} Hz wide, {db:+0.0;-0.0} dB relative to the measured one) ")
                    + "was not measured and did not widen the channel; select it to measure it";
        }
    }
}
