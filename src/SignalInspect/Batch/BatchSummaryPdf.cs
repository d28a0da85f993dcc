using System.Globalization;
using PdfSharp.Pdf;
using SignalInspect.Reporting;

namespace SignalInspect.Batch;

/// <summary>The batch summary PDF: counts per modulation and verdict, then one row per capture with a spectrum
/// thumbnail, flagged by verdict and status.</summary>
public static class BatchSummaryPdf
{
    /// <summary>Writes the summary PDF.</summary>
    public static void Write(IReadOnlyList<BatchRecord> records, string outDir, string? profileName, Stream output)
    {
        PdfReportWriter.EnsureFonts();
        CultureInfo c = CultureInfo.InvariantCulture;
        var doc = new PdfDocument();
        doc.Info.Title = "SignalInspect batch summary";
        var l = new PdfLayout(doc, PaperSize.A4);
        l.NewPage();
        l.Text("Batch summary", l.H1);
        l.Text(
            string.Create(c, $"{records.Count} capture(s), made {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC")
                + (profileName is { } p ? $", limits: {p}" : ", no limits"),
            l.Body,
            PdfSharp.Drawing.XBrushes.DimGray
        );
        l.Gap(6);
        var kinds = records
            .GroupBy(r => r.Status != "error" ? r.Modulation ?? "?" : "error")
            .OrderBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => $"{g.Key} {g.Count()}");
        var verdicts = records
            .Where(r => r.Status != "error")
            .GroupBy(r => r.Verdict ?? "no limits")
            .OrderBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => $"{g.Key} {g.Count()}");
        l.Text("By modulation: " + string.Join(", ", kinds), l.Body);
        l.Text(
            "By verdict: "
                + string.Join(", ", verdicts)
                + string.Create(c, $"; could not be read: {records.Count(r => r.Status == "error")}"),
            l.Body
        );
        l.Gap(8);
        var rows = new List<(byte[]?, string[])>();
        foreach (BatchRecord r in records)
        {
            byte[]? png =
                r.Thumbnail is { } t && File.Exists(Path.Combine(outDir, t))
                    ? File.ReadAllBytes(Path.Combine(outDir, t))
                    : null;
            string what =
                r.Status != "error"
                    ? string.Join(
                        ", ",
                        new[]
                        {
                            r.Modulation?.ToUpperInvariant(),
                            r.CarrierFrequencyHz is { } f ? string.Create(c, $"carrier {f:0.###} Hz") : null,
                            r.OffsetHz is { } o ? string.Create(c, $"offset {o:+0.#;-0.#} Hz") : null,
                            r.OccupiedHz is { } b ? string.Create(c, $"OBW {b:0} Hz") : null,
                            r.PeakDeviationHz is { } d ? string.Create(c, $"deviation {d:0} Hz") : null,
                            r.DepthPercent is { } m ? string.Create(c, $"depth {m:0.0} %") : null,
                            r.EmissionDesignator,
                        }.Where(x => x is not null)
                    ) + (r.Warnings is { } w ? " | warning: " + w : string.Empty)
                    : r.Error ?? "error";
            string flag = r.Status != "error" ? r.Verdict ?? r.Status : "ERROR";
            rows.Add((png, [Path.GetFileName(r.File), what, flag]));
        }
        l.ThumbnailTable(["spectrum", "capture", "readings", "verdict"], [0.22, 0.19, 0.41, 0.18], rows, 40);
        l.Gap(10);
        l.Text("Standing of these results", l.H2);
        l.Text(MeasurementReport.Disclaimer, l.Body);
        foreach (string caution in MeasurementReport.Cautions)
            l.Text("- " + caution, l.Small);
        l.Finish("batch summary");
        doc.Save(output, closeStream: false);
    }
}
