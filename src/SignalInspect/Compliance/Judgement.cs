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
public sealed record LimitCheck(
    string Measurement,
    double Value,
    string Unit,
    double ExpandedUncertainty,
    double Limit,
    string LimitText,
    double Margin,
    Verdict Verdict,
    string Basis
);

/// <summary>
/// Judges measurements against a profile. Decision rule: guarded acceptance and rejection with a
/// guard band equal to the expanded uncertainty U = k u (k from the profile, 2 by default): PASS
/// when value + U is inside the limit, FAIL when value - U is outside it, INCONCLUSIVE otherwise
/// (a guard-banded rule of the kind ILAC-G8:09/2019 describes).
/// </summary>
public static class Judgement
{
    /// <summary>The decision rule, as the report states it.</summary>
    public const string DecisionRule =
        "Guarded acceptance and rejection, guard band w = U (expanded uncertainty, coverage factor k): PASS if the "
        + "measured value plus U is within the limit; FAIL if the value minus U is beyond it; INCONCLUSIVE otherwise "
        + "(a guard-banded decision rule as described in ILAC-G8:09/2019).";

    /// <summary>The expanded uncertainty the emission-mask check uses, dB (type B: Welch estimate spread and window
    /// scalloping).</summary>
    public const double MaskUncertaintyDb = 2.0;

    /// <summary>Checks every limit of the profile that applies to the measured modulation.</summary>
    public static IReadOnlyList<LimitCheck> Check(AnalysisResult r, LimitProfile p)
    {
        var checks = new List<LimitCheck>();
        double k = p.CoverageFactor;
        CultureInfo c = CultureInfo.InvariantCulture;
        string src = p.Source is { } s ? s : p.Name;
        if ((p.FrequencyTolerancePpm is not null || p.FrequencyToleranceHz is not null) && r.Carrier is { } car)
        {
            double? nominal = p.NominalFrequencyHz ?? r.Capture.CenterFrequencyHz;
            bool absolute = FrequencyAxis.Of(r.Capture).IsAbsolute;
            double offset = absolute && p.NominalFrequencyHz is { } nom ? car.FrequencyHz.Value - nom : car.OffsetHz;
            double? tolHz = p.FrequencyToleranceHz
                ?? (nominal is { } n && p.FrequencyTolerancePpm is { } ppm ? ppm * n / 1e6 : null);
            if (tolHz is { } t)
            {
                double u = k * car.FrequencyHz.StandardUncertainty;
                checks.Add(
                    Upper(
                        "carrier frequency error |f - f0|",
                        Math.Abs(offset),
                        "Hz",
                        u,
                        t,
                        string.Create(c, $"<= {t:0.###} Hz ({p.ToleranceText} of {nominal:0.###} Hz)"),
                        $"{src}; offset {offset:+0.###;-0.###} Hz"
                    )
                );
            }
            else
            {
                checks.Add(
                    new LimitCheck(
                        "carrier frequency error",
                        Math.Abs(car.OffsetHz),
                        "Hz",
                        double.NaN,
                        double.NaN,
                        p.ToleranceText ?? "",
                        double.NaN,
                        Verdict.Inconclusive,
                        "the RF frequency is unknown (no centre frequency and no nominal): a ppm tolerance cannot be "
                            + "applied"
                    )
                );
            }
        }
        if (p.MaxPeakDeviationHz is { } maxDev)
        {
            if (r.Fm is { } fm)
                checks.Add(
                    Upper(
                        "FM peak deviation",
                        fm.PeakDeviationHz.Value,
                        "Hz",
                        k * fm.PeakDeviationHz.StandardUncertainty,
                        maxDev,
                        string.Create(c, $"<= {maxDev:0.###} Hz"),
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
                        string.Create(c, $"<= {maxDev:0.###} Hz"),
                        src
                    )
                );
        }
        if (p.MaxOccupiedBandwidthHz is { } maxObw)
            checks.Add(
                Upper(
                    $"occupied bandwidth ({100 * (1 - r.Bandwidth.Beta):0.#} %)",
                    r.Bandwidth.OccupiedHz,
                    "Hz",
                    k * r.OccupiedUncertaintyHz,
                    maxObw,
                    string.Create(c, $"<= {maxObw:0.###} Hz"),
                    src
                )
            );
        if (r.Am is { } am)
            foreach (
                var (what, value, limit) in new[]
                {
                    ("AM positive-peak modulation", am.PositivePeakPercent, p.MaxAmPositivePeakPercent),
                    ("AM negative-peak modulation", am.NegativePeakPercent, p.MaxAmNegativePeakPercent),
                }
            )
                if (limit is { } max)
                    checks.Add(
                        Upper(
                            what,
                            value,
                            "%",
                            k * am.DepthPercent.StandardUncertainty,
                            max,
                            string.Create(c, $"<= {max:0.##} %"),
                            src
                        )
                    );
        if (p.Mask is { } mask && r.Carrier is not null)
            checks.Add(MaskCheck(r, mask));
        return checks;
    }

    /// <summary>The overall verdict: FAIL if any check fails, else INCONCLUSIVE if any is, else PASS (PASS also when
    /// there is no check).</summary>
    public static Verdict Overall(IEnumerable<LimitCheck> checks)
    {
        var list = checks.ToList();
        if (list.Any(x => x.Verdict == Verdict.Fail))
            return Verdict.Fail;
        return list.Any(x => x.Verdict == Verdict.Inconclusive) ? Verdict.Inconclusive : Verdict.Pass;
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
    ) => new(what, value, unit, u, limit, text, limit - value, UpperVerdict(value, u, limit), basis);

    /// <summary>
    /// Mask: the max-hold PSD, as power in the mask's reference bandwidth, against the required
    /// attenuation below the total mean power (the unmodulated carrier power for constant-envelope
    /// signals). Bins at the capture's noise floor cannot show compliance where the mask is stricter
    /// than the floor: the check is then INCONCLUSIVE for lack of dynamic range, not FAIL.
    /// </summary>
    private static LimitCheck MaskCheck(AnalysisResult r, EmissionMask mask)
    {
        double carrierAxis = FrequencyAxis.Of(r.Capture).ToAxis(r.Carrier!.FrequencyHz.Value);
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
        string name = mask.Name;
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
        if (v == Verdict.Pass && floorLimited)
        {
            v = Verdict.Inconclusive;
            basis +=
                "; the capture's noise floor is above the mask at some offsets (not enough dynamic range to show "
                + "compliance there)";
        }
        else if (!double.IsNaN(worst) && worst < 99)
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
            basis
        );
    }
}
