using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// The receiver's frequency reference error and how it was found: the receiver reads every RF frequency
/// <see cref="ErrorPpm"/> ppm high (a reading r of a true frequency f is r = f (1 + e 1e-6)), so a reading is
/// corrected to r / (1 + e 1e-6). One reference drives a software-defined receiver's tuner and its sample clock, so
/// the same factor holds for every frequency of the capture's axis (common practice; testdata/REFERENCE-VALUES.md,
/// "A receiver's frequency reference error").
/// </summary>
public sealed record FrequencyReference
{
    /// <summary>How the error was found: <see cref="Declared"/> or <see cref="ByReferenceCarrier"/>.</summary>
    public required string Source { get; init; }

    /// <summary>The receiver reads frequencies this many ppm high (negative: low).</summary>
    public required double ErrorPpm { get; init; }

    /// <summary>Standard uncertainty (k = 1) of <see cref="ErrorPpm"/>, ppm.</summary>
    public required double StandardUncertaintyPpm { get; init; }

    /// <summary>The reference carrier's known frequency, Hz; null when the error was declared.</summary>
    public double? ReferenceCarrierHz { get; init; }

    /// <summary>The reference carrier as the receiver read it, with the fit's standard uncertainty; null when the
    /// error was declared.</summary>
    public Measured? ReferenceReadHz { get; init; }

    /// <summary><see cref="Source"/> of an error the user declared (measured against a standard).</summary>
    public const string Declared = "declared";

    /// <summary><see cref="Source"/> of an error read from a carrier of known frequency in the capture.</summary>
    public const string ByReferenceCarrier = "reference carrier";

    /// <summary>The true frequency of a reading, Hz.</summary>
    public double Correct(double readHz) => readHz / (1 + ErrorPpm * 1e-6);

    /// <summary>What the receiver reads for a true frequency, Hz (the inverse of <see cref="Correct"/>).</summary>
    public double Read(double trueHz) => trueHz * (1 + ErrorPpm * 1e-6);

    /// <summary>The standard uncertainty the reference adds to a corrected frequency of <paramref name="hz"/>,
    /// Hz.</summary>
    public double UncertaintyAt(double hz) => Math.Abs(hz) * StandardUncertaintyPpm * 1e-6;

    /// <summary>One line for the reports: what was corrected, by how much and from what.</summary>
    public string Text
    {
        get
        {
            CultureInfo c = CultureInfo.InvariantCulture;
            string how =
                ReferenceCarrierHz is { } known && ReferenceReadHz is { } read
                    ? string.Create(
                        c,
                        $"from a reference carrier known at {known:0.###} Hz, read at {read.Value:0.###} Hz "
                    ) + string.Create(c, $"(u {read.StandardUncertainty:0.####} Hz)")
                    : "as declared (--receiver-error), measured against a standard by the user";
            return string.Create(
                    c,
                    $"receiver reads {ErrorPpm:+0.####;-0.####} ppm (u {StandardUncertaintyPpm:0.####} ppm), "
                ) + $"{how}; every RF frequency divided by (1 + e 1e-6)";
        }
    }

    /// <summary>What the reports say when no reference correction was made.</summary>
    public const string NotCorrected =
        "The receiver's frequency reference is not corrected: frequencies are as the receiver read them, and its "
        + "reference error (a few ppm for a receiver without a disciplined oscillator) is neither removed nor in the "
        + "uncertainty. Give --receiver-error or --reference-carrier to correct it.";
}

/// <summary>Applies a <see cref="FrequencyReference"/> to a finished analysis: every absolute frequency of the
/// result (the carrier, its offset and ppm, the timeline's windows, the key transients' settled carrier, the FSK
/// tones) divided by (1 + e 1e-6), and the reference's uncertainty added to the carrier's budget.</summary>
public static class FrequencyCorrection
{
    /// <summary>Name of the reference's component in the carrier's uncertainty budget.</summary>
    public const string BudgetName = "receiver frequency reference";

    /// <summary>The result with its frequencies corrected (and its transmissions' results).</summary>
    public static AnalysisResult Apply(AnalysisResult r, FrequencyReference f, double? nominalHz)
    {
        if (!FrequencyAxis.Of(r.Capture).IsAbsolute)
            throw new InvalidOperationException("a reference correction needs the capture's RF axis");
        CarrierResult? car = r.Carrier is { } c ? Carrier(r.Capture, c, f, nominalHz) : null;
        Timeline? tl =
            r.Timeline is { } t && car is not null
                ? t with
                {
                    Windows =
                    [
                        .. t.Windows.Select(w =>
                        {
                            double hz = f.Correct(w.CarrierFrequencyHz),
                                offset = car.OffsetHz + (hz - car.FrequencyHz.Value),
                                rf = nominalHz ?? hz;
                            return w with
                            {
                                CarrierFrequencyHz = hz,
                                CarrierOffsetHz = offset,
                                OffsetPpm = w.OffsetPpm is null || rf == 0 ? null : offset / rf * 1e6,
                            };
                        }),
                    ],
                }
                : r.Timeline;
        return r with
        {
            Carrier = car,
            Timeline = tl,
            Fsk = r.Fsk is { } fsk
                ? fsk with
                {
                    ToneFrequenciesHz = [.. fsk.ToneFrequenciesHz.Select(f.Correct)],
                }
                : null,
            FrequencyReference = f,
            Transmissions =
            [
                .. r.Transmissions.Select(x =>
                    x with
                    {
                        Result = x.Result is { } inner ? Apply(inner, f, nominalHz) : null,
                        KeyUp = x.KeyUp is { } up ? up with { SettledHz = f.Correct(up.SettledHz) } : null,
                        KeyDown = x.KeyDown is { } down ? down with { SettledHz = f.Correct(down.SettledHz) } : null,
                    }
                ),
            ],
        };
    }

    private static CarrierResult Carrier(CaptureInfo info, CarrierResult c, FrequencyReference f, double? nominalHz)
    {
        double hz = f.Correct(c.FrequencyHz.Value);
        double from = nominalHz ?? info.CenterFrequencyHz!.Value;
        double offset = hz - from;
        double rf = nominalHz ?? hz;
        UncertaintyComponent reference = new(
            BudgetName,
            f.UncertaintyAt(hz),
            f.Source == FrequencyReference.Declared
                ? "the declared error's standard uncertainty (--receiver-error-uncertainty) x the frequency"
                : "the reference carrier's fit uncertainty / its frequency, x this frequency"
        );
        return c with
        {
            FrequencyHz = Measured.FromBudget(
                hz,
                [
                    .. c.FrequencyHz.Budget.Count > 0
                        ? c.FrequencyHz.Budget
                        : [new UncertaintyComponent("measurement", c.FrequencyHz.StandardUncertainty, c.Method)],
                    reference,
                ]
            ),
            OffsetHz = offset,
            OffsetPpm = rf != 0 ? offset / rf * 1e6 : null,
        };
    }
}
