using System.Globalization;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Compliance;

/// <summary>The outcome of one limit check.</summary>
public enum Verdict
{
    /// <summary>Inside the limit by more than the expanded uncertainty.</summary>
    Pass,

    /// <summary>Outside the limit by more than the expanded uncertainty.</summary>
    Fail,

    /// <summary>The value plus or minus its expanded uncertainty straddles the limit (or the capture cannot show
    /// it).</summary>
    Inconclusive,

    /// <summary>The limit was not tested: it does not apply to the class found, there is no signal, or the value
    /// could not be measured. The reason says which.</summary>
    NotTested,
}

/// <summary>How verdicts are written.</summary>
public static class VerdictNames
{
    /// <summary>PASS, FAIL, INCONCLUSIVE, NOT TESTED.</summary>
    public static string Text(this Verdict v) =>
        v == Verdict.NotTested ? "NOT TESTED" : v.ToString().ToUpperInvariant();
}

/// <summary>One limit, the measured value and the verdict.</summary>
/// <param name="Measurement">What was checked.</param>
/// <param name="Value">Measured value (in <paramref name="Unit"/>).</param>
/// <param name="Unit">Unit.</param>
/// <param name="ExpandedUncertainty">Expanded uncertainty U = k u (same unit).</param>
/// <param name="Limit">The limit (same unit).</param>
/// <param name="LimitText">The limit as written in the report (e.g. "&lt;= 2500 Hz").</param>
/// <param name="Margin">Limit minus value for an upper limit (positive: inside), same unit.</param>
/// <param name="Verdict">The verdict under the decision rule.</param>
/// <param name="Basis">Where the limit comes from and any note.</param>
/// <param name="Reason">Why the verdict is INCONCLUSIVE or NOT TESTED (null for PASS and FAIL).</param>
/// <param name="Transmission">For a capture measured transmission by transmission: which one (from 0) this check's
/// reading is, the worst of them; null when the reading is of the whole window.</param>
/// <param name="Where">That transmission in words, as the reports print it ("transmission 2 of 3, 6-9.001 s").</param>
/// <param name="ByUncertainty">INCONCLUSIVE only because the reading lies within its expanded uncertainty of the limit
/// (the case the decision rule settles); false for any other reason.</param>
public sealed record LimitCheck(
    string Measurement,
    double Value,
    string Unit,
    double ExpandedUncertainty,
    double Limit,
    string LimitText,
    double Margin,
    Verdict Verdict,
    string Basis,
    string? Reason = null,
    int? Transmission = null,
    string? Where = null,
    bool ByUncertainty = false
)
{
    /// <summary>A limit that was not tested, with the reason.</summary>
    public static LimitCheck NotTested(
        string measurement,
        string unit,
        string limitText,
        string basis,
        string reason
    ) =>
        new(
            measurement,
            double.NaN,
            unit,
            double.NaN,
            double.NaN,
            limitText,
            double.NaN,
            Verdict.NotTested,
            basis,
            reason
        );
}

/// <summary>
/// Judges measurements against a profile. Decision rule: guarded acceptance and rejection with a
/// guard band equal to the expanded uncertainty U = k u (k from the profile, 2 by default): PASS
/// when value + U is inside the limit, FAIL when value - U is outside it, INCONCLUSIVE otherwise
/// (a guard-banded rule of the kind ILAC-G8:09/2019 describes).
/// </summary>
public static partial class Judgement
{
    /// <summary>The decision rule a profile names (guarded by default), as the report states it.</summary>
    public static string RuleText(LimitProfile? p) => p?.Rule == DecisionRuleKind.Simple ? SimpleRule : DecisionRule;

    /// <summary>Simple acceptance, as the report states it.</summary>
    public const string SimpleRule =
        "Simple acceptance, guard band w = 0 (ILAC-G8:09/2019, 4.2.1): PASS if the measured value is within the "
        + "limit, FAIL if it is beyond; the expanded uncertainty U is stated but not used, so a reading just inside "
        + "the limit may be a false accept with a probability up to 50 %. INCONCLUSIVE only where the capture "
        + "cannot show the quantity (noise floor, band).";

    /// <summary>The guarded decision rule, as the report states it.</summary>
    public const string DecisionRule =
        "Guarded acceptance and rejection, guard band w = U (expanded uncertainty, coverage factor k): PASS if the "
        + "measured value plus U is within the limit; FAIL if the value minus U is beyond it; INCONCLUSIVE otherwise "
        + "(a guard-banded decision rule as described in ILAC-G8:09/2019).";

    /// <summary>The expanded uncertainty the emission-mask check uses, dB (type B: Welch estimate spread and window
    /// scalloping).</summary>
    public const double MaskUncertaintyDb = 2.0;

    /// <summary>
    /// Checks every limit of the profile: each gets PASS, FAIL, INCONCLUSIVE, or NOT TESTED with its reason (it
    /// does not apply to the class found, there is no signal, or the value could not be measured). A profile
    /// for some classes also gets a check of the class itself.
    /// </summary>
    /// <remarks>
    /// A capture measured transmission by transmission (<see cref="AnalysisResult.Transmissions"/> with results) is
    /// judged on every transmission: each limit's check is the worst transmission's (FAIL, then INCONCLUSIVE, then
    /// NOT TESTED, then PASS; the smallest margin among equals), and names it.
    /// </remarks>
    public static IReadOnlyList<LimitCheck> Check(AnalysisResult r, LimitProfile p)
    {
        // The response of a tone series spans the transmissions: judged once, on the whole capture.
        IReadOnlyList<LimitCheck> all = ResponseCheck(r, p, p.CoverageFactor) is { } response
            ? [.. Guarded(r, p), response]
            : Guarded(r, p);
        return p.Rule == DecisionRuleKind.Simple ? [.. all.Select(Simple)] : all;
    }

    /// <summary>A guarded check as simple acceptance: a reading within its U of the limit is judged by the reading
    /// alone.</summary>
    private static LimitCheck Simple(LimitCheck c) =>
        c.ByUncertainty
            ? c with
            {
                Verdict = c.Margin >= 0 ? Verdict.Pass : Verdict.Fail,
                Reason = null,
                Basis = c.Basis + "; simple acceptance: within its U of the limit, judged by the reading",
            }
            : c;

    private static IReadOnlyList<LimitCheck> Guarded(AnalysisResult r, LimitProfile p)
    {
        var measured = r.Transmissions.Select((t, i) => (t, i)).Where(x => x.t.Result is not null).ToList();
        if (measured.Count < 2)
            return CheckOne(r, p, measured.Count == 1 ? measured[0].t : null);
        var each = measured.Select(x => (x.t, x.i, Checks: CheckOne(x.t.Result!, p, x.t))).ToList();
        int n = each[0].Checks.Count;
        if (each.Any(x => x.Checks.Count != n))
            throw new InvalidOperationException("a profile's checks must not depend on the reading");
        var worst = new List<LimitCheck>(n);
        for (int j = 0; j < n; j++)
        {
            var (t, i, checks) = each.OrderByDescending(x => Severity(x.Checks[j].Verdict))
                .ThenBy(x => double.IsFinite(x.Checks[j].Margin) ? x.Checks[j].Margin : double.MaxValue)
                .First();
            bool alike = each.All(x =>
                x.Checks[j].Verdict == checks[j].Verdict && !double.IsFinite(x.Checks[j].Margin)
            );
            string where = alike
                ? $"alike on all {each.Count} transmissions"
                : string.Create(
                    CultureInfo.InvariantCulture,
                    $"worst is transmission {i + 1} of {r.Transmissions.Count}, {t.StartS:0.###}-{t.EndS:0.###} s"
                );
            string? inner = checks[j].Where;
            worst.Add(
                checks[j] with
                {
                    Transmission = alike ? null : i,
                    Where = inner is null ? where : $"{where}; {inner}",
                }
            );
        }
        return worst;
    }

    /// <summary>How bad a verdict is when transmissions are compared: FAIL, INCONCLUSIVE, NOT TESTED, PASS.</summary>
    private static int Severity(Verdict v) =>
        v switch
        {
            Verdict.Fail => 3,
            Verdict.Inconclusive => 2,
            Verdict.NotTested => 1,
            _ => 0,
        };

    private static IReadOnlyList<LimitCheck> CheckOne(AnalysisResult r, LimitProfile p, Transmission? tx)
    {
        var checks = new List<LimitCheck>();
        double k = p.CoverageFactor;
        CultureInfo c = CultureInfo.InvariantCulture;
        string src = p.Source is { } s ? s : p.Name;
        ModulationKind kind = r.Classification.Kind;
        // Without a carrier: no signal, or a signal of no known class (whose mean frequency is no carrier).
        string noSignal =
            r.DiscriminatorHzPerFullScale is not null ? DiscriminatorAnalysis.NoRf
            : kind == ModulationKind.Unknown
                ? "the class found (unknown: neither AM nor angle modulation) has no carrier to measure against it"
            : string.Create(c, $"no signal was found (SNR in band {r.ChannelSnrDb:0.#} dB): nothing to measure");
        string Unlike(string what) =>
            kind == ModulationKind.Noise ? noSignal : $"{what} does not apply to the class found ({kind.Name()})";
        if (p.Modulation.Count > 0)
            checks.Add(ClassCheck(r, p, p.SourceOf("modulation"), noSignal));
        if (p.FrequencyRangeHz is { } range)
            checks.Add(RangeCheck(r, p, range, noSignal));
        if (p.FrequencyTolerancePpm is not null || p.FrequencyToleranceHz is not null)
        {
            string tolSrc = p.SourceOf("frequencyTolerance");
            checks.Add(
                r.Carrier is { } car
                    ? ToleranceCheck(r, p, car, k, tolSrc)
                    : LimitCheck.NotTested("carrier frequency error", "Hz", p.ToleranceText ?? "", tolSrc, noSignal)
            );
        }
        if (p.MaxPeakDeviationHz is { } maxDev)
        {
            src = p.SourceOf("maxPeakDeviationHz");
            string text = string.Create(c, $"<= {maxDev:0.###} Hz");
            if (r.Fm is { } fm)
                checks.Add(
                    Upper(
                        "FM peak deviation",
                        fm.PeakDeviationHz.Value,
                        "Hz",
                        k * fm.PeakDeviationHz.StandardUncertainty,
                        maxDev,
                        text,
                        src
                    )
                );
            else if (r.Fsk is { } fsk)
                checks.Add(
                    Upper(
                        "FSK peak deviation (shift / 2)",
                        fsk.DeviationHz,
                        "Hz",
                        k * fsk.ShiftHz.StandardUncertainty / 2,
                        maxDev,
                        text,
                        src
                    )
                );
            else
                checks.Add(
                    LimitCheck.NotTested(
                        "FM peak deviation",
                        "Hz",
                        text,
                        src,
                        kind == ModulationKind.Pm
                            ? "measured as PM (--expect pm): the deviation limit is judged on an FM reading"
                            : Unlike("a frequency-deviation limit")
                    )
                );
        }
        if (p.MaxOccupiedBandwidthHz is { } maxObw)
        {
            src = p.SourceOf("maxOccupiedBandwidthHz");
            string what = string.Create(c, $"occupied bandwidth ({100 * (1 - r.Bandwidth.Beta):0.#} %)");
            string text = string.Create(c, $"<= {maxObw:0.###} Hz");
            checks.Add(
                kind == ModulationKind.Noise || r.DiscriminatorHzPerFullScale is not null
                    ? LimitCheck.NotTested(what, "Hz", text, src, noSignal)
                    : Upper(what, r.Bandwidth.OccupiedHz, "Hz", k * r.OccupiedUncertaintyHz, maxObw, text, src)
            );
        }
        foreach (
            var (what, value, limit) in new[]
            {
                ("AM positive-peak modulation", r.Am?.PositivePeakPercent, p.MaxAmPositivePeakPercent),
                ("AM negative-peak modulation", r.Am?.NegativePeakPercent, p.MaxAmNegativePeakPercent),
            }
        )
        {
            if (limit is not { } max)
                continue;
            src = p.SourceOf("am");
            string text = string.Create(c, $"<= {max:0.##} %");
            checks.Add(
                r.Am is { } am && value is { } v
                    ? Upper(what, v, "%", k * am.DepthPercent.StandardUncertainty, max, text, src)
                    : LimitCheck.NotTested(what, "%", text, src, Unlike("an AM modulation limit"))
            );
        }
        checks.AddRange(AudioChecks(r, p, k, noSignal));
        if (p.Transient is { } transient)
            checks.AddRange(TransientChecks(r, p, transient, tx, k, noSignal));
        if (p.Mask is { } mask)
            checks.Add(
                r.Carrier is not null
                    ? MaskCheck(r, mask, p.Sources.GetValueOrDefault("mask"))
                    : LimitCheck.NotTested(
                        "emission mask: worst margin",
                        "dB",
                        ">= 0 dB above the mask attenuation",
                        p.Sources.GetValueOrDefault("mask") ?? mask.Name,
                        noSignal
                    )
            );
        return checks;
    }

    private static LimitCheck ToleranceCheck(AnalysisResult r, LimitProfile p, CarrierResult car, double k, string src)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        double? nominal = p.NominalFrequencyHz ?? r.Capture.CenterFrequencyHz;
        bool absolute = FrequencyAxis.Of(r.Capture).IsAbsolute;
        double offset = absolute && p.NominalFrequencyHz is { } nom ? car.FrequencyHz.Value - nom : car.OffsetHz;
        double? tolHz = p.ToleranceHzAt(nominal);
        if (tolHz is not { } t)
            return LimitCheck.NotTested(
                "carrier frequency error",
                "Hz",
                p.ToleranceText ?? "",
                src,
                "the RF frequency is unknown (no centre frequency and no nominal): a ppm tolerance cannot be applied"
            );
        string limitText = string.Create(c, $"<= {t:0.###} Hz ({p.ToleranceText} of {nominal:0.###} Hz)");
        LimitCheck whole = Upper(
            "carrier frequency error |f - f0|",
            Math.Abs(offset),
            "Hz",
            k * car.FrequencyHz.StandardUncertainty,
            t,
            limitText,
            string.Create(c, $"{src}; offset {offset:+0.###;-0.###} Hz")
        );
        if (r.Timeline is not { Windows.Count: > 1 } tl)
            return whole;
        // Against time: every window is judged and the worst decides (a drifting carrier may spend seconds beyond
        // the tolerance while its mean is inside). A window's U adds its own scatter to the carrier's budget.
        LimitCheck? worst = null;
        foreach (TrackWindow w in tl.Windows)
        {
            double o = offset + (w.CarrierFrequencyHz - car.FrequencyHz.Value);
            double u = Math.Sqrt(
                w.StandardUncertaintyHz * w.StandardUncertaintyHz
                    + car.FrequencyHz.StandardUncertainty * car.FrequencyHz.StandardUncertainty
            );
            string where =
                string.Create(c, $"worst of {tl.Windows.Count} windows of {tl.WindowS:0.###} s: ")
                + string.Create(c, $"{w.StartS:0.###}-{w.EndS:0.###} s, offset {o:+0.###;-0.###} Hz ")
                + string.Create(c, $"(whole capture {offset:+0.###;-0.###} Hz)");
            LimitCheck one = Upper("carrier frequency error |f - f0|", Math.Abs(o), "Hz", k * u, t, limitText, src) with
            {
                Where = where,
            };
            if (
                worst is null
                || Severity(one.Verdict) > Severity(worst.Verdict)
                || (Severity(one.Verdict) == Severity(worst.Verdict) && one.Margin < worst.Margin)
            )
                worst = one;
        }
        return worst!;
    }

    /// <summary>
    /// Transient frequency behaviour: the largest difference from the assigned frequency (the profile's nominal, else
    /// the capture's centre) during t1 and t2 after the key-up and t3 before the key-down, each against its limit.
    /// </summary>
    private static IEnumerable<LimitCheck> TransientChecks(
        AnalysisResult r,
        LimitProfile p,
        TransientLimits tl,
        Transmission? tx,
        double k,
        string noSignal
    )
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        string basis = p.Sources.GetValueOrDefault("transient") ?? tl.Rule ?? p.Source ?? p.Name;
        var parts = new (string What, KeyTransient? Key, double From, double To, double Max)[]
        {
            (
                string.Create(c, $"transient frequency difference, t1 ({1000 * tl.T1S:0.#} ms after key-up)"),
                tx?.KeyUp,
                0,
                tl.T1S,
                tl.T1MaxHz
            ),
            (
                string.Create(
                    c,
                    $"transient frequency difference, t2 ({1000 * tl.T1S:0.#}-{1000 * (tl.T1S + tl.T2S):0.#} ms)"
                ),
                tx?.KeyUp,
                tl.T1S,
                tl.T1S + tl.T2S,
                tl.T2MaxHz
            ),
            (
                string.Create(c, $"transient frequency difference, t3 ({1000 * tl.T3S:0.#} ms before key-down)"),
                tx?.KeyDown,
                -tl.T3S,
                0,
                tl.T3MaxHz
            ),
        };
        foreach (var (what, key, from, to, max) in parts)
        {
            string text = string.Create(c, $"<= {max:0.###} Hz");
            if (r.Carrier is not { } car)
            {
                yield return LimitCheck.NotTested(what, "Hz", text, basis, noSignal);
                continue;
            }
            if (key is null)
            {
                yield return LimitCheck.NotTested(
                    what,
                    "Hz",
                    text,
                    basis,
                    "the capture holds no such key instant (the carrier is on at its start or end, or it was not "
                        + "measured transmission by transmission)"
                );
                continue;
            }
            bool absolute = FrequencyAxis.Of(r.Capture).IsAbsolute;
            double settledOffset =
                absolute && p.NominalFrequencyHz is { } nom
                    ? key.SettledHz - nom
                    : car.OffsetHz + (key.SettledHz - car.FrequencyHz.Value);
            var inside = key.Trace.Where(x => x.T >= from && x.T <= to).ToList();
            if (inside.Count == 0)
            {
                yield return LimitCheck.NotTested(
                    what,
                    "Hz",
                    text,
                    basis,
                    "no reading in the interval (the carrier was not yet at its full level, or the transmission is "
                        + "shorter)"
                );
                continue;
            }
            double worst = inside.Max(x => Math.Abs(settledOffset + x.DfHz));
            LimitCheck check = Upper(
                what,
                worst,
                "Hz",
                k * key.StandardUncertaintyHz,
                max,
                text,
                string.Create(c, $"{basis}; key instant {key.InstantS:0.####} s")
            );
            if (check.Verdict == Verdict.Pass && key.VisibleHz + Math.Abs(settledOffset) < max)
                check = check with
                {
                    Verdict = Verdict.Inconclusive,
                    Reason =
                        string.Create(
                            c,
                            $"the capture's band shows +/-{key.VisibleHz:0} Hz about the carrier, less than the limit: "
                        ) + "an excursion up to the limit would not be seen",
                };
            yield return check;
        }
    }

    /// <summary>
    /// The overall verdict: FAIL if any check fails; PASS only when there are checks and every one passed;
    /// else INCONCLUSIVE when one is, else NOT TESTED.
    /// </summary>
    public static Verdict Overall(IEnumerable<LimitCheck> checks)
    {
        var list = checks.ToList();
        if (list.Any(x => x.Verdict == Verdict.Fail))
            return Verdict.Fail;
        if (list.Count > 0 && list.All(x => x.Verdict == Verdict.Pass))
            return Verdict.Pass;
        return list.Any(x => x.Verdict == Verdict.Inconclusive) ? Verdict.Inconclusive : Verdict.NotTested;
    }

    /// <summary>Verdict for an upper limit under the guard-banded rule.</summary>
    public static Verdict UpperVerdict(double value, double expandedU, double limit) =>
        value + expandedU <= limit ? Verdict.Pass
        : value - expandedU > limit ? Verdict.Fail
        : Verdict.Inconclusive;

    private static LimitCheck Upper(
        string what,
        double value,
        string unit,
        double u,
        double limit,
        string text,
        string basis
    )
    {
        Verdict v = UpperVerdict(value, u, limit);
        string? reason =
            v == Verdict.Inconclusive
                ? string.Create(
                    CultureInfo.InvariantCulture,
                    $"the reading is within its expanded uncertainty ({u:0.###} {unit}) of the limit: neither met nor "
                ) + "exceeded is shown"
                : null;
        return new(what, value, unit, u, limit, text, limit - value, v, basis, reason)
        {
            ByUncertainty = v == Verdict.Inconclusive,
        };
    }

    /// <summary>
    /// Mask: the max-hold PSD, as power in the mask's reference bandwidth, against the required
    /// attenuation below the total mean power (the unmodulated carrier power for constant-envelope
    /// signals). Bins at the capture's noise floor cannot show compliance where the mask is stricter
    /// than the floor: the check is then INCONCLUSIVE for lack of dynamic range, not FAIL.
    /// </summary>
    private static LimitCheck MaskCheck(AnalysisResult r, EmissionMask mask, string? source)
    {
        double carrierAxis = r.CarrierAxisHz!.Value;
        MaskMarginResult m = MaskMargin.Measure(
            r.Spectrum,
            r.Bandwidth.NoiseFloorDensity,
            carrierAxis,
            mask.ReferenceBandwidthHz,
            mask.RequiredAttenuationDb,
            MaskUncertaintyDb
        );
        double worst = m.WorstMarginDb,
            worstAt = m.WorstOffsetHz;
        bool floorLimited = m.FloorLimited;
        string name = source is null ? mask.Name : $"{mask.Name} ({source})";
        string basis = string.Create(
            CultureInfo.InvariantCulture,
            $"{name}; max-hold PSD in {mask.ReferenceBandwidthHz:0.#} Hz against the mean total power; U = "
                + $"{MaskUncertaintyDb:0.#} dB (type B)"
        );
        if (double.IsPositiveInfinity(worst))
            worst = floorLimited ? double.NaN : 99;
        Verdict v =
            double.IsNaN(worst) ? Verdict.Inconclusive
            : worst - MaskUncertaintyDb >= 0 ? Verdict.Pass
            : worst + MaskUncertaintyDb < 0 ? Verdict.Fail
            : Verdict.Inconclusive;
        string? reason = null;
        if ((v == Verdict.Pass && floorLimited) || double.IsNaN(worst))
        {
            v = Verdict.Inconclusive;
            reason =
                "the capture's noise floor is above the mask at some offsets: not enough dynamic range to show "
                + "compliance there";
        }
        else if (v == Verdict.Inconclusive)
            reason = "the worst margin is within the mask check's uncertainty of the limit";
        bool byU =
            v == Verdict.Inconclusive && !double.IsNaN(worst) && !(floorLimited && worst - MaskUncertaintyDb >= 0);
        if (!double.IsNaN(worst) && worst < 99)
        {
            basis += string.Create(CultureInfo.InvariantCulture, $"; worst at {worstAt:+0;-0} Hz from the carrier");
        }
        return new LimitCheck(
            "emission mask: worst margin",
            double.IsNaN(worst) ? 0 : worst,
            "dB",
            MaskUncertaintyDb,
            0,
            ">= 0 dB above the mask attenuation",
            double.IsNaN(worst) ? double.NaN : worst,
            v,
            basis,
            reason
        )
        {
            ByUncertainty = byU,
        };
    }
}
