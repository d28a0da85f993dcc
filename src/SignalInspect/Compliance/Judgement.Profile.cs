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

    /// <summary>The profile's audio limits: the test tone's distortion (THD, an upper limit) and the unmodulated
    /// carrier's hum-and-noise ratio (a lower limit: the margin is the reading less the limit).</summary>
    private static IEnumerable<LimitCheck> AudioChecks(AnalysisResult r, LimitProfile p, double k, string noSignal)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        string src = p.SourceOf("audio");
        AudioQualityResult? a = r.Audio;
        if (p.MaxAudioDistortionPercent is { } maxThd)
        {
            string text = string.Create(c, $"<= {maxThd:0.##} %");
            const string what = "audio distortion (THD)";
            yield return a?.ThdPercent is { } thd
                ? Upper(what, thd.Value, "%", k * thd.StandardUncertainty, maxThd, text, src)
                : LimitCheck.NotTested(
                    what,
                    "%",
                    text,
                    src,
                    a?.DistortionNotTested
                        ?? (r.Classification.Kind == ModulationKind.Noise ? noSignal : "no demodulated audio tone")
                );
        }
        if (p.MinHumNoiseDb is { } minHn)
        {
            string text = string.Create(c, $">= {minHn:0.#} dB");
            const string what = "hum and noise ratio";
            // Over a band the channel cut short the residual reads low and the ratio high: no verdict from it.
            if (a?.HumNoiseDb is not null && a.BandHighHz < AudioQuality.BandHighHz)
                yield return LimitCheck.NotTested(
                    what,
                    "dB",
                    text,
                    src,
                    string.Create(c, $"the channel kept audio up to {a.BandHighHz:0} Hz only, not the whole ")
                        + string.Create(c, $"{AudioQuality.BandLowHz:0}-{AudioQuality.BandHighHz:0} Hz band (a ")
                        + "post-detection low-pass of 3 kHz or more asked for keeps it)"
                );
            else if (a?.HumNoiseDb is { } hn && a.ResidualFmHz is { } rfm && rfm.Value > 0)
            {
                // The ratio's U from the residual's: 20 / ln 10 x u(residual) / residual.
                double u = k * 20 / Math.Log(10) * rfm.StandardUncertainty / rfm.Value;
                Verdict v = UpperVerdict(-hn, u, -minHn);
                string? reason =
                    v == Verdict.Inconclusive
                        ? string.Create(c, $"the reading is within its expanded uncertainty ({u:0.###} dB) of the ")
                            + "limit: neither met nor missed is shown"
                        : null;
                yield return new LimitCheck(what, hn, "dB", u, minHn, text, hn - minHn, v, src, reason)
                {
                    ByUncertainty = v == Verdict.Inconclusive,
                };
            }
            else
                yield return LimitCheck.NotTested(
                    what,
                    "dB",
                    text,
                    src,
                    r.Classification.Kind != ModulationKind.Cw
                        ? "needs an unmodulated carrier (the class found is " + r.Classification.Kind.Name() + ")"
                        : "needs the reference deviation the ratio is taken against (given at analysis)"
                );
        }
        if (ToneCheck(r, p, k, src) is { } tone)
            yield return tone;
    }

    /// <summary>The sub-audible tone's frequency against the listed tone it matches; null without that limit.</summary>
    private static LimitCheck? ToneCheck(AnalysisResult r, LimitProfile p, double k, string src)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        AudioQualityResult? a = r.Audio;
        if (p.SubAudibleTolerancePercent is not { } tol)
            return null;
        string text = string.Create(c, $"within {tol:0.###} % of the listed tone");
        const string what = "sub-audible tone frequency";
        if (a?.SubAudible is { StandardHz: { } std } sub)
        {
            double dev = 100 * (sub.FrequencyHz.Value - std) / std,
                u = k * 100 * sub.FrequencyHz.StandardUncertainty / std;
            Verdict v = UpperVerdict(Math.Abs(dev), u, tol);
            return new LimitCheck(
                what,
                dev,
                "%",
                u,
                tol,
                text,
                tol - Math.Abs(dev),
                v,
                src,
                v == Verdict.Inconclusive ? "the reading is within its expanded uncertainty of the limit" : null
            )
            {
                ByUncertainty = v == Verdict.Inconclusive,
            };
        }
        return LimitCheck.NotTested(
            what,
            "%",
            text,
            src,
            a?.SubAudible is not null ? "the tone matches no listed tone: there is no nominal to hold it to"
                : a?.Code is not null ? "the capture carries a digital code squelch word, not a tone"
                : "no sub-audible tone was found"
        );
    }

    /// <summary>The audio response of a tone series against its curve within the profile's tolerance (the worst
    /// step judged, with its U): judged once on the whole capture (the series spans transmissions); null without
    /// that limit.</summary>
    private static LimitCheck? ResponseCheck(AnalysisResult r, LimitProfile p, double k)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        string src = p.SourceOf("audio");
        if (p is not { ResponseAboveDb: { } up, ResponseBelowDb: { } down })
            return null;
        string curve = p.ResponseFlat ? "flat response" : "6 dB/octave pre-emphasis curve";
        string limitText = string.Create(c, $"+{up:0.##} / -{down:0.##} dB about the {curve}");
        const string whatR = "audio response";
        var points = (r.Response?.Points ?? []).ToList();
        var read = points.Where(x => x.ResponseDb is not null).ToList();
        if (read.Count < 2)
            return LimitCheck.NotTested(
                whatR,
                "dB",
                limitText,
                src,
                r.Response is null
                    ? "no tone series was given at analysis"
                    : r.Response.NotTested ?? "fewer than two steps of the tone series gave a reading"
            );
        // Each step's departure from the curve, and how far inside the tolerance it stays (negative: outside).
        var (e, margin, uDb) = read.Select(x =>
            {
                double dev = x.ResponseDb!.Value - (p.ResponseFlat ? 0 : x.PreEmphasisDb ?? 0);
                return (dev, Math.Min(up - dev, dev + down), k * (x.ResponseUncertaintyDb ?? 0));
            })
            .MinBy(x => x.Item2);
        Verdict verdict =
            margin - uDb >= 0 ? Verdict.Pass
            : margin + uDb < 0 ? Verdict.Fail
            : Verdict.Inconclusive;
        int missing = points.Count - read.Count;
        string? why =
            verdict == Verdict.Inconclusive
                ? "the worst step is within its expanded uncertainty of the tolerance"
                : null;
        if (missing > 0 && verdict == Verdict.Pass)
            (verdict, why) = (Verdict.Inconclusive, string.Create(c, $"{missing} step(s) gave no reading"));
        return new LimitCheck(whatR, e, "dB", uDb, e >= 0 ? up : -down, limitText, margin, verdict, src, why)
        {
            ByUncertainty = verdict == Verdict.Inconclusive && missing == 0,
        };
    }
}
