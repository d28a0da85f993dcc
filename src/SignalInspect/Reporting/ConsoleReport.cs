using System.Globalization;
using SignalInspect.Compliance;
using SignalInspect.Diagnostics;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Reporting;

/// <summary>
/// The console rendering of a report: what was read and how it was classed, then one line per
/// result row (<see cref="ResultRows"/>), then, with a profile, one line per check and the verdict.
/// </summary>
public static class ConsoleReport
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;
    private const int LabelWidth = 30;

    /// <summary>Writes the summary of <paramref name="report"/>.</summary>
    public static void WriteSummary(TextWriter o, MeasurementReport report)
    {
        AnalysisResult a = report.Analysis;
        double k = report.Profile?.CoverageFactor ?? 2;
        void Line(string label, string text) => o.WriteLine($"{label,-LabelWidth}{SafeText.ForTerminal(text)}");
        Line("file", a.Capture.Path);
        Classification cls = a.Classification;
        Line(
            "modulation",
            string.Create(C, $"{cls.Kind.Name()} (confidence {cls.Confidence:0.00}")
                + (cls.Expected ? ", as asked" : string.Empty)
                + $"): {cls.Reason}"
        );
        Line(
            a.DiscriminatorHzPerFullScale is null ? "SNR in band" : "SNR (demodulated)",
            a.ChannelSnrDb.ToString("0.0", C) + " dB"
        );
        IReadOnlyList<string> transmissions = ResultRows.Transmissions(a, k);
        for (int i = 0; i < transmissions.Count; i++)
            Line(i == 0 ? "transmissions" : "", transmissions[i]);
        if (ResultRows.TimelineSummary(a, k) is { } timeline)
            Line("carrier against time", timeline);
        if (a.DiscriminatorHzPerFullScale is null)
            Line("frequency reference", a.FrequencyReference?.Text ?? "not corrected (as the receiver read)");
        foreach (string n in a.Notes)
            Line("note", n);
        foreach (ResultRow row in ResultRows.For(a, [], k))
        {
            if (row.Key == "modulation")
                continue;
            var (value, rounded) = row.Rounded;
            string u = row.ExpandedUncertainty is not null
                ? string.Create(C, $" +/- {rounded} {row.Unit} (U, k = {k:0.##})")
                : string.Empty;
            string unit = row.Unit.Length > 0 ? " " + row.Unit : string.Empty;
            string note = row.Note is { } n && n != "-" ? $" ({n})" : string.Empty;
            Line(row.Quantity, value + unit + u + note + Detail(a, row.Key));
        }
    }

    /// <summary>What the console adds to a row: edges, references, the method's settings.</summary>
    private static string Detail(AnalysisResult a, string key)
    {
        BandwidthResult b = a.Bandwidth;
        var axis = FrequencyAxis.Of(a.Capture);
        double Rf(double axisHz) =>
            a.FrequencyReference is { } f ? f.Correct(axis.ToReported(axisHz)) : axis.ToReported(axisHz);
        return key switch
        {
            "carrier.offset" => $", from {a.Carrier!.OffsetReference}",
            "bandwidth.occupied" => string.Create(C, $", edges {Rf(b.LowerEdgeHz):0.#} to {Rf(b.UpperEdgeHz):0.#} Hz"),
            "bandwidth.xdb" => string.Create(C, $", RBW {a.Method.RbwHz:0.##} Hz, noise floor ")
                + (b.Treatment == NoiseFloorTreatment.Subtract ? "subtracted" : "kept"),
            "am.depth" when a.Am!.SidebandDepthPercent is { } sb => string.Create(C, $", sidebands give {sb:0.00} %"),
            "fm.peakDeviation" when a.Fm!.ModulationIndex is { } mi => string.Create(C, $", index {mi:0.###}"),
            "fsk.shift" => ", tones "
                + string.Join(", ", a.Fsk!.ToneFrequenciesHz.Select(t => t.ToString("0.#", C)))
                + " Hz"
                + (a.Fsk.SymbolRateBd is null ? ", symbol rate not found" : string.Empty),
            "emissionDesignator" when a.NecessaryBandwidthHz is not null => " (47 CFR 2.202)",
            _ => string.Empty,
        };
    }

    /// <summary>Writes one line per limit check and the overall verdict (nothing without a profile).</summary>
    public static void WriteVerdicts(TextWriter o, MeasurementReport report)
    {
        if (report.Profile is not { } profile)
            return;
        o.WriteLine(
            $"{"limits",-LabelWidth}{profile.Name}"
                + (
                    profile.Rule == DecisionRuleKind.Simple
                        ? " (decision rule: simple acceptance, w = 0: U stated, not used)"
                        : " (decision rule: guarded acceptance, w = U)"
                )
        );
        foreach (ResultRow row in ResultRows.For(report.Analysis, report.Checks, profile.CoverageFactor))
        {
            if (row.Verdict is not { } v)
                continue;
            string reading =
                v == Verdict.NotTested ? $"limit {row.LimitText}"
                : row.Value is { } value && double.IsFinite(value)
                    ? string.Create(C, $"{value:0.###} {row.Unit} (U {row.ExpandedUncertainty:0.###}), ")
                        + string.Create(C, $"limit {row.LimitText}, margin {row.Margin:+0.###;-0.###}")
                : $"limit {row.LimitText}";
            string why = row.Reason is { } reason ? $": {reason}" : string.Empty;
            string where = row.Where is { } tx ? $" [{tx}]" : string.Empty;
            o.WriteLine($"  {v.Text(),-13} {row.Quantity}{where}: {reading}{why}");
        }
        o.WriteLine($"{"verdict",-LabelWidth}{report.Overall?.Text()}");
    }

    /// <summary>The demo's one-line reading of a capture: its headline rows, then the offset.</summary>
    public static string Headline(MeasurementReport report)
    {
        IReadOnlyList<ResultRow> all = ResultRows.For(report.Analysis, [], 2);
        IEnumerable<ResultRow> rows = all.Where(r => r.Headline && r.Key != "carrier.offset")
            .Concat(all.Where(r => r.Headline && r.Key == "carrier.offset"));
        return string.Join(
            ", ",
            rows.Select(r =>
                r.Key == "carrier.offset"
                    ? $"offset {Signed(Short(r))} {r.Unit}"
                    : $"{r.HeadlineLabel} {Short(r)} {r.Unit}"
            )
        );
    }

    /// <summary>A one-line table's value: rounded to its U, or to the row's format when that is shorter (a statistical
    /// U far below what the recorder's reference allows would otherwise print a dozen digits).</summary>
    private static string Short(ResultRow r)
    {
        string rounded = r.Rounded.Value,
            plain = r.ValueText;
        return rounded.Length <= plain.Length ? rounded : plain;
    }

    private static string Signed(string v) => v.StartsWith('-') || v.Trim('0', '.').Length == 0 ? v : "+" + v;
}
