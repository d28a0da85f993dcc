using System.Globalization;
using SignalInspect.Compliance;
using SignalInspect.Measure;

namespace SignalInspect.Reporting;

/// <summary>
/// One line of a report's results: a quantity, its value (a number, or words such as a class or a
/// designator), unit, uncertainty and, when a limit judged it, the limit, margin, verdict and the
/// reason. The console summary, the PDF table and the demo's table all render these rows; no
/// renderer looks at the modulation itself.
/// </summary>
public sealed record ResultRow
{
    /// <summary>A stable identifier (e.g. <c>fm.peakDeviation</c>) for renderers that pick rows.</summary>
    public required string Key { get; init; }

    /// <summary>What the row states, as printed ("FM peak deviation").</summary>
    public required string Quantity { get; init; }

    /// <summary>The value, or null when the row is words (<see cref="Text"/>).</summary>
    public double? Value { get; init; }

    /// <summary>The value in words, when it is not one number ("FM", "3100.2 / 3099.8", "11K0F3E").</summary>
    public string? Text { get; init; }

    /// <summary>Unit of the value and the uncertainty.</summary>
    public string Unit { get; init; } = "";

    /// <summary>Format of the value and uncertainty in the PDF and console (invariant culture).</summary>
    public string Format { get; init; } = "0.###";

    /// <summary>Standard uncertainty (k = 1), or null when none is stated.</summary>
    public double? StandardUncertainty { get; init; }

    /// <summary>Expanded uncertainty U = k u, or null.</summary>
    public double? ExpandedUncertainty { get; init; }

    /// <summary>The limit as written, when a limit judged this row.</summary>
    public string? LimitText { get; init; }

    /// <summary>The limit as a number in <see cref="Unit"/> (NaN when it could not be applied), when a limit judged
    /// this row.</summary>
    public double? Limit { get; init; }

    /// <summary>Margin to the limit (positive: inside), same unit.</summary>
    public double? Margin { get; init; }

    /// <summary>The verdict, when a limit judged this row.</summary>
    public Verdict? Verdict { get; init; }

    /// <summary>Why the verdict is INCONCLUSIVE or NOT TESTED.</summary>
    public string? Reason { get; init; }

    /// <summary>For a check judged on every transmission: the worst one, in words; null otherwise.</summary>
    public string? Where { get; init; }

    /// <summary>For a check judged on every transmission: the worst one's index (from 0); null otherwise.</summary>
    public int? Transmission { get; init; }

    /// <summary>A short note for the last column of an unjudged row ("conf. 0.93", "Bn 11000 Hz").</summary>
    public string? Note { get; init; }

    /// <summary>True for the one or two rows that sum up a capture in a table of many (the demo's).</summary>
    public bool Headline { get; init; }

    /// <summary>Short label for a headline ("peak deviation", "depth").</summary>
    public string? HeadlineLabel { get; init; }

    /// <summary>The value as printed: <see cref="Text"/>, or the number in <see cref="Format"/> ("-" when not
    /// finite).</summary>
    public string ValueText =>
        Text
        ?? (Value is { } v && double.IsFinite(v) ? Unsigned0(v.ToString(Format, CultureInfo.InvariantCulture)) : "-");

    /// <summary>
    /// The value and its expanded uncertainty as a report prints them: U to two significant digits and the value to
    /// the same decimal place (GUM 7.2.6: "the numerical values of the estimate and its uncertainty should not be
    /// given with an excessive number of digits"; two significant digits of U is common practice). Without a finite
    /// U, the row's own format; the JSON keeps every digit.
    /// </summary>
    public (string Value, string Uncertainty) Rounded
    {
        get
        {
            if (Text is not null || Value is not { } v || !double.IsFinite(v))
                return (ValueText, ExpandedUncertainty is { } e0 && double.IsFinite(e0) ? Plain(e0, Format) : "-");
            if (ExpandedUncertainty is not { } u || !double.IsFinite(u) || u <= 0)
                return (ValueText, ExpandedUncertainty is { } z && double.IsFinite(z) ? Plain(z, Format) : "-");
            return RoundPair(v, u);
        }
    }

    /// <summary><paramref name="value"/> and <paramref name="u"/> rounded as <see cref="Rounded"/> says.</summary>
    public static (string Value, string Uncertainty) RoundPair(double value, double u)
    {
        int places = Math.Clamp(1 - (int)Math.Floor(Math.Log10(u)), -12, 9);
        // U rounded up to two digits may become three (99.6 -> 100): one place fewer then.
        if (Math.Round(u, Math.Max(places, 0)) >= Math.Pow(10, 2 - places))
            places--;
        // At most MaxSignificantDigits in the value: a statistical U far finer than that (an absolute carrier of
        // 155 MHz fitted to 0.4 mHz) is rounded up to the coarser place, which GUM 7.2.6 allows (never down).
        int whole = Math.Abs(value) >= 1 ? (int)Math.Floor(Math.Log10(Math.Abs(value))) + 1 : 1;
        bool up = whole + places > MaxSignificantDigits;
        if (up)
            places = MaxSignificantDigits - whole;
        string F(double x, bool ceiling)
        {
            double step = Math.Pow(10, -places);
            double r = ceiling ? Math.Ceiling(x / step) * step : Math.Round(x / step) * step;
            return Unsigned0(r.ToString(places >= 0 ? "F" + places : "0", CultureInfo.InvariantCulture));
        }
        return (F(value, false), F(u, up));
    }

    /// <summary>Most significant digits a printed value carries.</summary>
    public const int MaxSignificantDigits = 10;

    private static string Plain(double x, string format) => Unsigned0(x.ToString(format, CultureInfo.InvariantCulture));

    /// <summary>"-0" (a small negative value rounded to nothing) written as "0".</summary>
    private static string Unsigned0(string s) =>
        s.StartsWith('-') && s.TrimStart('-').Trim('0', '.').Length == 0 ? s[1..] : s;
}

/// <summary>Builds the rows of a report from an analysis and its limit checks.</summary>
public static class ResultRows
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>An RF frequency not judged against a limit, in MHz (155.3126800 MHz reads where 155312680.0 Hz does
    /// not); judged rows keep the unit of their limit.</summary>
    private static ResultRow Natural(ResultRow r) =>
        r.Verdict is null && r.Unit == "Hz" && r.Value is { } v && Math.Abs(v) >= 1e6
            ? r with
            {
                Value = v / 1e6,
                StandardUncertainty = r.StandardUncertainty / 1e6,
                ExpandedUncertainty = r.ExpandedUncertainty / 1e6,
                Unit = "MHz",
                Format = "0.#########",
            }
            : r;

    /// <summary>
    /// The rows: first one per limit check (in the profile's order), then every measurement not
    /// already judged, in a fixed order (class, carrier, bandwidths, the modulation's own, tone,
    /// designator). Uncertainties are expanded with <paramref name="coverageFactor"/>.
    /// </summary>
    public static IReadOnlyList<ResultRow> For(
        AnalysisResult a,
        IReadOnlyList<LimitCheck> checks,
        double coverageFactor
    )
    {
        double k = coverageFactor;
        var rows = new List<ResultRow>();
        foreach (LimitCheck c in checks)
            rows.Add(
                new ResultRow
                {
                    Key = "check",
                    Quantity = c.Measurement,
                    Value = c.Value,
                    Unit = c.Unit,
                    ExpandedUncertainty = c.ExpandedUncertainty,
                    LimitText = c.LimitText,
                    Limit = c.Limit,
                    Margin = c.Margin,
                    Verdict = c.Verdict,
                    Note = c.Basis,
                    Reason = c.Reason,
                    Where = c.Where,
                    Transmission = c.Transmission,
                }
            );
        // Values already judged above are not repeated as information rows.
        var judged = checks.Select(c => c.Measurement).ToList();
        bool Judged(string what) => judged.Any(j => j == what || j.StartsWith(what + " (", StringComparison.Ordinal));
        void Info(
            string key,
            string what,
            double value,
            string unit,
            double? u,
            string fmt = "0.###",
            string? headline = null
        )
        {
            if (Judged(what))
                return;
            rows.Add(
                new ResultRow
                {
                    Key = key,
                    Quantity = what,
                    Value = value,
                    Unit = unit,
                    Format = fmt,
                    StandardUncertainty = u,
                    ExpandedUncertainty = u is { } s ? k * s : null,
                    Headline = headline is not null,
                    HeadlineLabel = headline,
                }
            );
        }
        void Words(string key, string what, string text, string unit, string? note = null) =>
            rows.Add(
                new ResultRow
                {
                    Key = key,
                    Quantity = what,
                    Text = text,
                    Unit = unit,
                    Note = note,
                }
            );

        Words(
            "modulation",
            "modulation",
            a.Classification.Kind.Name().ToUpperInvariant(),
            "",
            string.Create(C, $"conf. {a.Classification.Confidence:0.00}")
        );
        if (a.Carrier is { } car)
        {
            Info(
                "carrier.frequency",
                "carrier frequency",
                car.FrequencyHz.Value,
                "Hz",
                car.FrequencyHz.StandardUncertainty
            );
            Info(
                "carrier.offset",
                "carrier offset",
                car.OffsetHz,
                "Hz",
                car.FrequencyHz.StandardUncertainty,
                headline: "offset"
            );
            if (car.OffsetPpm is { } ppm)
                Info("carrier.offsetPpm", "carrier offset", ppm, "ppm", null, "0.####");
        }
        // Discriminator audio holds no RF spectrum: no bandwidth row (its notes say why).
        if (a.DiscriminatorHzPerFullScale is null)
        {
            Info(
                "bandwidth.occupied",
                $"occupied bandwidth ({100 * (1 - a.Bandwidth.Beta):0.#} %)",
                a.Bandwidth.OccupiedHz,
                "Hz",
                a.OccupiedUncertaintyHz,
                "0.#",
                a.Am is null && a.Fsk is null ? "OBW" : null
            );
            Info(
                "bandwidth.xdb",
                $"{a.Bandwidth.Xdb:0.#} dB bandwidth",
                a.Bandwidth.XdbHz,
                "Hz",
                a.Method.RbwHz / Math.Sqrt(3),
                "0.#"
            );
        }
        if (a.Fm is { } fm)
        {
            Info(
                "fm.peakDeviation",
                "FM peak deviation",
                fm.PeakDeviationHz.Value,
                "Hz",
                fm.PeakDeviationHz.StandardUncertainty,
                "0.#",
                "peak deviation"
            );
            Words(
                "fm.peaks",
                "FM +peak / -peak",
                $"{fm.PositivePeakHz.ToString("0.#", C)} / {fm.NegativePeakHz.ToString("0.#", C)}",
                "Hz"
            );
            Info("fm.rmsDeviation", "FM rms deviation", fm.RmsDeviationHz, "Hz", null, "0.#");
            if (fm.PeakPhaseRad is { } phase)
                Info("fm.peakPhase", "FM peak phase", phase, "rad", null, "0.###");
        }
        if (a.Am is { } am)
        {
            Info(
                "am.depth",
                "AM depth",
                am.DepthPercent.Value,
                "%",
                am.DepthPercent.StandardUncertainty,
                "0.##",
                "depth"
            );
            Words(
                "am.peaks",
                "AM +peak / -peak",
                $"{am.PositivePeakPercent.ToString("0.##", C)} / {am.NegativePeakPercent.ToString("0.##", C)}",
                "%"
            );
        }
        if (a.Pm is { } pm)
            Info(
                "pm.peakPhase",
                "PM peak phase deviation",
                pm.PeakDeviationRad.Value,
                "rad",
                pm.PeakDeviationRad.StandardUncertainty,
                "0.####",
                "peak phase"
            );
        if (a.Fsk is { } fsk)
        {
            Info("fsk.shift", "FSK shift", fsk.ShiftHz.Value, "Hz", fsk.ShiftHz.StandardUncertainty, "0.#", "shift");
            if (fsk.SymbolRateBd is { } sr)
                Info("fsk.symbolRate", "FSK symbol rate", sr.Value, "Bd", sr.StandardUncertainty, "0.##", "rate");
        }
        if (a.Ook is { } ook)
        {
            Info("ook.onShare", "OOK carrier on", ook.OnSharePercent, "%", null, "0.#", "on");
            if (ook.Pulses is { } p)
            {
                Info(
                    "pulse.width",
                    "pulse width",
                    1e3 * p.WidthS.Value,
                    "ms",
                    1e3 * p.WidthS.StandardUncertainty,
                    "0.####"
                );
                Info(
                    "pulse.period",
                    "pulse period",
                    1e3 * p.PeriodS.Value,
                    "ms",
                    1e3 * p.PeriodS.StandardUncertainty,
                    "0.####"
                );
                Info(
                    "pulse.duty",
                    "duty cycle",
                    p.DutyCyclePercent.Value,
                    "%",
                    p.DutyCyclePercent.StandardUncertainty,
                    "0.##"
                );
                Info("pulse.correction", "15.35(c) averaging correction", p.AveragingCorrectionDb, "dB", null, "0.##");
                if (p.BitRateBd is { } rate)
                    Info("pulse.bitRate", "keyed bit rate", rate, "Bd", null, "0.#");
            }
        }
        if (a.ModulatingFrequencyHz is { } mf)
            Info("modulatingFrequency", "modulating frequency", mf.Value, "Hz", mf.StandardUncertainty, "0.##");
        if (a.ModulatingComponents.Count > 1)
        {
            string unit =
                a.Am is not null ? "%"
                : a.Pm is not null ? "rad"
                : "Hz";
            Words(
                "modulatingComponents",
                "modulating components",
                string.Join(
                    ", ",
                    a.ModulatingComponents.Select(c =>
                        string.Create(C, $"{c.FrequencyHz:0.#} Hz ({c.PeakAmount:0.##} {unit})")
                    )
                ),
                ""
            );
        }
        if (a.Audio is { } au)
        {
            // A weighting replaces the band (its table's span): the label names it instead.
            string band = au.Weighting.StartsWith("none", StringComparison.Ordinal)
                ? string.Create(C, $"{au.BandLowHz:0}-{au.BandHighHz:0} Hz")
                : au.Weighting.Split(' ')[0] + " weighted";
            if (au.ThdPercent is { } thd)
                Info("audio.thd", "audio distortion (THD)", thd.Value, "%", thd.StandardUncertainty, "0.##");
            if (au.ThdNPercent is { } thdn)
                Info("audio.thdN", $"THD+N ({band})", thdn.Value, "%", thdn.StandardUncertainty, "0.##");
            if (au.SinadDb is { } sinad)
                Info("audio.sinad", $"SINAD ({band})", sinad.Value, "dB", sinad.StandardUncertainty, "0.##");
            if (au.ResidualFmHz is { } rfm)
                Info(
                    "audio.residualFm",
                    $"residual FM ({band}, rms)",
                    rfm.Value,
                    "Hz",
                    rfm.StandardUncertainty,
                    "0.##"
                );
            if (au.ResidualAmPercent is { } ram)
                Info("audio.residualAm", $"residual AM ({band}, rms)", ram, "%", null, "0.###");
            if (au.HumNoiseDb is { } hn)
                Info("audio.humNoise", "hum and noise ratio", hn, "dB", null, "0.#");
            if (au.SubAudible is { } sub)
                Words(
                    "audio.subAudible",
                    "sub-audible tone",
                    string.Create(C, $"{sub.FrequencyHz.Value:0.0} Hz, deviation {sub.DeviationHz:0} Hz"),
                    "",
                    sub.StandardHz is { } std ? string.Create(C, $"{sub.List} tone {std:0.0} Hz") : "on no tone list"
                );
            if (au.ReverseBurst is { } rb)
                Words(
                    "audio.reverseBurst",
                    "reverse burst",
                    string.Create(C, $"{rb.ShiftDeg:0} degrees, the last {1000 * rb.DurationS:0} ms read"),
                    "",
                    string.Create(C, $"+/- {1000 * rb.ResolutionS:0} ms; a transmission's window ends ")
                        + string.Create(C, $"{1000 * TransmissionFinder.SteadyBeforeKeyDownS:0} ms before key-down")
                );
            if (au.Code is { } code)
                Words(
                    "audio.codeSquelch",
                    "digital code squelch",
                    code.Name,
                    "",
                    (code.Standard ? "standard code; " : "not a standard code; ")
                        + string.Create(C, $"{code.Words} words, correlation {code.Correlation:0.00}")
                        + (code.SameSignal.Count > 0 ? "; also " + string.Join(", ", code.SameSignal.Take(3)) : "")
                        + (code.TurnOffS is { } off ? string.Create(C, $"; turn-off {1000 * off:0} ms") : "")
                );
        }
        foreach (ResponsePoint p in a.Response?.Points ?? [])
            Words(
                "audio.response",
                string.Create(C, $"audio response, {p.Step.StartS:0.##}-{p.Step.EndS:0.##} s"),
                p.ResponseDb is { } db
                    ? p.CompressionDb is { } cmp
                        ? string.Create(C, $"{p.Step.LevelDb:+0.#;-0.#} dB in: {p.Amount:0.#} {a.Response!.Unit}, ")
                            + string.Create(C, $"{db:+0.00;-0.00} dB, compression {cmp:+0.00;-0.00} dB")
                        : string.Create(
                            C,
                            $"{p.ToneHz:0.#} Hz: {db:+0.00;-0.00} dB (6 dB/octave: {p.PreEmphasisDb:+0.00;-0.00})"
                        )
                    : "no reading: " + p.Problem,
                "",
                a.Response!.ReferenceHz is { } rf ? string.Create(C, $"relative to {rf:0.#} Hz") : "-"
            );
        if (a.Response is { LimitAmount: { } limit } resp)
            Info("audio.limit", "limiter ceiling (level series)", limit, resp.Unit, null, "0.#");
        else if (a.Response is { ReferenceLevelDb: not null, NotTested: null })
            Words(
                "audio.limit",
                "limiter ceiling (level series)",
                "not reached",
                "",
                "no step 1 dB short of its level"
            );
        if (a.EmissionDesignator is { } d)
            Words(
                "emissionDesignator",
                "emission designator",
                d,
                "",
                a.NecessaryBandwidthHz is { } nb ? $"Bn {nb.ToString("0", C)} Hz" : "-"
            );
        return [.. rows.Select(Natural)];
    }

    /// <summary>
    /// One line per transmission found ("2: 6-9.001 s (3.001 s), fm, offset -0.1 Hz, peak deviation 2993.1 Hz
    /// +/- 16.8 Hz, OBW 8016.8 Hz"): empty when the capture holds one transmission that fills it.
    /// </summary>
    public static IReadOnlyList<string> Transmissions(AnalysisResult a, double coverageFactor)
    {
        if (a.Transmissions.Count == 0 || (a.Transmissions.Count == 1 && a.Transmissions[0].Result is null))
            return [];
        var lines = new List<string>();
        for (int i = 0; i < a.Transmissions.Count; i++)
        {
            Transmission t = a.Transmissions[i];
            var parts = new List<string>
            {
                string.Create(C, $"{i + 1}: {t.StartS:0.###}-{t.EndS:0.###} s ({t.DurationS:0.###} s)"),
            };
            AnalysisResult x = t.Result ?? a;
            foreach (ResultRow row in For(x, [], coverageFactor).Where(r => r.Headline || r.Key == "modulation"))
            {
                string u = row.ExpandedUncertainty is { } e ? " +/- " + e.ToString(row.Format, C) : string.Empty;
                string unit = row.Unit.Length > 0 ? " " + row.Unit : string.Empty;
                parts.Add($"{row.HeadlineLabel ?? row.Quantity} {row.ValueText}{u}{unit}".Trim());
            }
            if (t.KeyUp is { } up)
                parts.Add(
                    string.Create(C, $"key-up at {up.InstantS:0.####} s: peak {up.PeakExcursionHz:+0;-0} Hz ")
                        + string.Create(C, $"at {1000 * up.PeakAtS:0.##} ms, settled within {up.SettleBandHz:0} Hz ")
                        + string.Create(C, $"after {1000 * up.SettlingS:0.#} ms")
                );
            if (t.KeyDown is { } down)
                parts.Add(
                    string.Create(C, $"key-down at {down.InstantS:0.####} s: peak {down.PeakExcursionHz:+0;-0} Hz ")
                        + string.Create(C, $"at {1000 * down.PeakAtS:0.##} ms")
                );
            lines.Add(string.Join(", ", parts));
        }
        return lines;
    }

    /// <summary>The carrier against time in one line ("offset -585.8 to +983.7 Hz in 50 windows of 0.1 s, drift
    /// +320 Hz/s +/- 0.05 Hz/s (U); deviation measured about the local carrier"), null without a timeline of two
    /// windows or more.</summary>
    public static string? TimelineSummary(AnalysisResult a, double coverageFactor)
    {
        if (a.Timeline is not { Windows.Count: > 1 } t)
            return null;
        // Rounded first: a value that rounds to nothing would print as "-+0" with a signed format.
        static double R(double v, int places) => Math.Round(v, places) + 0.0;
        string text = string.Create(
            C,
            $"offset {R(t.MinOffsetHz, 1):+0.#;-0.#;0} to {R(t.MaxOffsetHz, 1):+0.#;-0.#;0} Hz in {t.Windows.Count} "
                + $"windows of {t.WindowS:0.###} s"
        );
        if (t.DriftHzPerS is { } d)
            text +=
                string.Create(C, $", drift {R(d.Value, 3):+0.###;-0.###;0} Hz/s ")
                + string.Create(C, $"+/- {coverageFactor * d.StandardUncertainty:0.###} Hz/s (U)");
        return t.Detrended ? text + "; deviation measured about the local carrier" : text;
    }
}
