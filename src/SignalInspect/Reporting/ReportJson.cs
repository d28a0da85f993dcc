using System.Globalization;
using System.Text.Json;
using SignalInspect.Compliance;

namespace SignalInspect.Reporting;

/// <summary>Writes a <see cref="MeasurementReport"/> as JSON (beside the PDF): report metadata, the analysis (as
/// analyze --json), limits and checks.</summary>
public static class ReportJson
{
    /// <summary>Serialises the report to UTF-8 JSON bytes.</summary>
    public static byte[] ToBytes(MeasurementReport report)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteStartObject("report");
            w.WriteString("id", report.ReportId);
            w.WriteString(
                "created",
                report.Created.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture)
            );
            w.WriteString("title", report.Title);
            w.WriteString("operator", report.Header.Operator);
            w.WriteString("equipment", report.Header.Equipment);
            w.WriteString("notes", report.Header.Notes);
            w.WriteString("commandLine", report.Header.CommandLine);
            w.WriteString("software", "SignalInspect " + AnalysisJson.Version);
            w.WriteString("softwareCommit", AnalysisJson.Commit);
            w.WriteString("conditions", report.Header.Conditions);
            w.WriteEndObject();
            w.WritePropertyName("analysis");
            AnalysisJson.Write(w, report.Analysis, judgementKeys: false);
            WriteJudgement(w, report);
            w.WriteEndObject();
        }
        return ms.ToArray();
    }

    /// <summary>
    /// The limits, the checks (from the report's rows) and the verdict: <c>limits</c> (profile, file, source,
    /// coverage factor, decision rule), <c>checks[]</c> and <c>verdict</c>; null, empty and null without a
    /// profile. The same keys in the report's JSON and in <c>analyze --limits --json</c>.
    /// </summary>
    public static void WriteJudgement(Utf8JsonWriter w, MeasurementReport report)
    {
        if (report.Profile is { } p)
        {
            w.WriteStartObject("limits");
            w.WriteString("profile", p.Name);
            w.WriteString("file", report.ProfilePath);
            w.WriteString("source", p.Source);
            w.WriteNumber("coverageFactor", p.CoverageFactor);
            w.WriteString("decisionRule", Judgement.RuleText(p));
            w.WriteEndObject();
            w.WriteStartArray("checks");
            foreach (ResultRow c in ResultRows.For(report.Analysis, report.Checks, p.CoverageFactor))
            {
                if (c.Verdict is not { } verdict)
                    continue;
                w.WriteStartObject();
                w.WriteString("measurement", c.Quantity);
                Num(w, "value", c.Value!.Value);
                w.WriteString("unit", c.Unit);
                Num(w, "expandedUncertainty", c.ExpandedUncertainty!.Value);
                Num(w, "limit", c.Limit!.Value);
                w.WriteString("limitText", c.LimitText);
                Num(w, "margin", c.Margin!.Value);
                w.WriteString("verdict", verdict.Text());
                w.WriteString("basis", c.Note);
                w.WriteString("reason", c.Reason);
                CaptureInfoJson.WriteNumberOrNull(w, "transmission", c.Transmission);
                w.WriteString("where", c.Where);
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteString("verdict", report.Overall?.Text());
        }
        else
        {
            w.WriteNull("limits");
            w.WriteStartArray("checks");
            w.WriteEndArray();
            w.WriteNull("verdict");
        }
    }

    private static void Num(Utf8JsonWriter w, string name, double v)
    {
        if (double.IsFinite(v))
            w.WriteNumber(name, v);
        else
            w.WriteNull(name);
    }
}
