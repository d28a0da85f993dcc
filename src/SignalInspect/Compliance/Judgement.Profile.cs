using System.Globalization;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Compliance;

/// <summary>The checks of the profile itself: the class it is for and the RF range its limits are for.</summary>
public static partial class Judgement
{
    /// <summary>The carrier against the RF range the profile is for: PASS inside, INCONCLUSIVE outside (its limits
    /// may not be this frequency's), NOT TESTED when the RF frequency is unknown.</summary>
    private static LimitCheck RangeCheck(
        AnalysisResult r,
        LimitProfile p,
        (double LowHz, double HighHz) range,
        string noSignal
    )
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        string src = p.SourceOf("frequencyRangeHz"),
            text = string.Create(c, $"{range.LowHz / 1e6:0.######}-{range.HighHz / 1e6:0.######} MHz");
        const string what = "carrier within the profile's frequency range";
        if (r.Carrier is not { } car)
            return LimitCheck.NotTested(what, "Hz", text, src, noSignal);
        double? rf = FrequencyAxis.Of(r.Capture).IsAbsolute ? car.FrequencyHz.Value : p.NominalFrequencyHz;
        if (rf is not { } f)
            return LimitCheck.NotTested(
                what,
                "Hz",
                text,
                src,
                "the RF frequency is unknown (no centre frequency and no nominal in the profile)"
            );
        bool inside = f >= range.LowHz && f <= range.HighHz;
        return new LimitCheck(
            what,
            double.NaN,
            "Hz",
            double.NaN,
            double.NaN,
            text,
            double.NaN,
            inside ? Verdict.Pass : Verdict.Inconclusive,
            string.Create(c, $"{src}; carrier at {f / 1e6:0.######} MHz"),
            inside
                ? null
                : string.Create(c, $"the carrier at {f / 1e6:0.######} MHz lies outside the range the profile is for: ")
                    + "its limits may not be this frequency's"
        );
    }

    /// <summary>The class found against the classes the profile is for.</summary>
    private static LimitCheck ClassCheck(AnalysisResult r, LimitProfile p, string src, string noSignal)
    {
        ModulationKind kind = r.Classification.Kind;
        string wanted = string.Join(" or ", p.Modulation.Select(m => m.Name()));
        bool match = p.Modulation.Contains(kind);
        string? reason =
            match ? null
            : kind == ModulationKind.Noise ? noSignal
            : $"the profile is for {wanted}, the capture was classed {kind.Name()}: its limits are not those of this "
                + "emission";
        return new LimitCheck(
            "modulation class",
            double.NaN,
            "",
            double.NaN,
            double.NaN,
            wanted,
            double.NaN,
            match ? Verdict.Pass
                : kind == ModulationKind.Noise ? Verdict.NotTested
                : Verdict.Inconclusive,
            src,
            reason
        );
    }
}
