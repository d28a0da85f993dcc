using System.Globalization;
using PdfSharp.Drawing;
using PdfSharp.Pdf;
using SignalInspect.Diagnostics;
using SignalInspect.Reporting;
using SignalInspect.Reporting.Plots;

namespace SignalInspect.Survey;

/// <summary>The survey report: the wide spectrum (mean over max-hold) with the emissions numbered, the spectrogram,
/// the table of emissions, the channels' occupancy, and the standing of the results.</summary>
public static class SurveyPdf
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>Writes the survey report to <paramref name="output"/>.</summary>
    public static void Write(SurveyResult s, Stream output, PaperSize paper = PaperSize.A4)
    {
        PdfReportWriter.EnsureFonts();
        var doc = new PdfDocument();
        string file = SafeText.ForTerminal(Path.GetFileName(s.Capture.Path));
        doc.Info.Title = "SignalInspect survey of " + file;
        var l = new PdfLayout(doc, paper);
        l.NewPage();
        l.Text("Survey of " + file, l.H1);
        l.Text(
            string.Create(C, $"{s.Emissions.Count} emission(s) found; made {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC"),
            l.Body,
            XBrushes.DimGray
        );
        l.Gap(4);
        var info = s.Capture;
        l.KeyValueTable([
            ("capture", $"{file}: {info.Container}, {info.Datatype}"),
            ("sample rate", string.Create(C, $"{info.SampleRateHz:0.###} Hz")),
            ("centre", info.CenterFrequencyHz is { } cf ? string.Create(C, $"{cf:0.###} Hz") : "not stated (offsets)"),
            (
                "analysed",
                string.Create(C, $"{s.Window.Count / info.SampleRateHz:0.###} s from sample {s.Window.First}")
            ),
            ("start time", info.StartTime?.ToString("u", C) ?? "not stated"),
        ]);
        l.Gap(6);
        double w = l.ContentWidth;
        string unit = s.Spectrum.Mean.Settings.CalibrationDb != 0 ? "dBm" : "dBFS";
        byte[] spec = SpectrumPlot.RenderPng(
            s.Spectrum.Mean,
            string.Create(C, $"Spectrum: mean over max-hold, RBW {s.Spectrum.Mean.RbwHz:0.##} Hz; emissions numbered"),
            PdfReportWriter.Px(w),
            PdfReportWriter.Px(220),
            PdfReportWriter.Dpi / 96,
            new SpectrumPlot.Marks
            {
                Overlay = s.Spectrum.MaxHold,
                Labels = [.. s.Emissions.Select(e => (e.CentreHz, e.Number.ToString(C)))],
            },
            absolute: true
        );
        l.Image(spec, w, 220);
        l.Gap(6);
        if (s.Spectrum.Spectrogram is { } g)
        {
            byte[] gram = TimePlots.SpectrogramPng(
                g,
                info.IsComplex ? info.CenterFrequencyHz : null,
                string.Create(C, $"Spectrogram ({g.Rows} time steps of {s.TimeStepS * 1000:0.###} ms)"),
                PdfReportWriter.Px(w),
                PdfReportWriter.Px(200),
                PdfReportWriter.Dpi / 96
            );
            l.Image(gram, w, 200);
            l.Gap(8);
        }
        l.Text("Emissions", l.H2);
        if (s.Emissions.Count == 0)
            l.Text("None: " + string.Join("; ", s.Warnings), l.Body);
        else
            l.Table(
                ["#", "frequency (Hz)", "class", "OBW (Hz)", $"peak / mean ({unit})", "SNR (dB)", "on air", "measured"],
                [0.04, 0.16, 0.08, 0.09, 0.13, 0.07, 0.14, 0.29],
                [
                    .. s.Emissions.Select(e =>
                        new[]
                        {
                            e.Number.ToString(C),
                            e.CentreHz.ToString("0.0", C),
                            e.ClassName,
                            e.OccupiedBandwidthHz is { } obw ? obw.ToString("0", C) : "-",
                            string.Create(C, $"{e.PeakPowerDb:0.0} / {e.MeanPowerDb:0.0}"),
                            e.SnrDb.ToString("0.0", C),
                            double.IsNaN(e.FirstSeenS)
                                ? "-"
                                : string.Create(C, $"{e.OnAirPercent:0.0} %, {e.FirstSeenS:0.00}-{e.LastSeenS:0.00} s"),
                            SurveyText.Key(e),
                        }
                    ),
                ],
                verdicts: false,
                font: l.Small
            );
        if (s.Channels.Count > 0)
        {
            l.Gap(8);
            l.Need(210); // the heading stays with its chart
            l.Text("Channel occupancy", l.H2);
            byte[] bars = BarPlot.PercentPng(
                [.. s.Channels.Select((c, i) => ((i + 1).ToString(C), c.OccupancyPercent))],
                string.Create(C, $"Occupancy over {s.Settings.OccupancyThresholdDb:0.#} dB above the channel's noise"),
                "occupied (% of time steps)",
                string.Create(
                    C,
                    $"channel (1 at {s.Channels[0].CentreHz:0.###} Hz, {s.Channels[0].WidthHz:0.###} Hz apart)"
                ),
                PdfReportWriter.Px(w),
                PdfReportWriter.Px(180),
                PdfReportWriter.Dpi / 96
            );
            l.Image(bars, w, 180);
            l.Gap(4);
            l.Table(
                ["#", "channel (Hz)", "width (Hz)", "occupied", $"mean ({unit})", $"max ({unit})", $"noise ({unit})"],
                [0.06, 0.2, 0.12, 0.14, 0.16, 0.16, 0.16],
                [
                    .. s.Channels.Select(
                        (c, i) =>
                            new[]
                            {
                                (i + 1).ToString(C),
                                c.CentreHz.ToString("0.0", C),
                                c.WidthHz.ToString("0.#", C),
                                c.OccupancyPercent.ToString("0.0", C) + " %",
                                c.MeanPowerDb.ToString("0.0", C),
                                c.MaxPowerDb.ToString("0.0", C),
                                c.NoiseDb.ToString("0.0", C),
                            }
                    ),
                ],
                verdicts: false,
                font: l.Small
            );
        }
        l.Gap(8);
        l.Text("Method", l.H2);
        foreach (string n in s.Notes)
            l.Text("- " + n, l.Small);
        foreach (string warning in s.Warnings)
            l.Text("- warning: " + warning, l.Small);
        l.Gap(8);
        l.Text("Standing of these results", l.H2);
        l.Text(MeasurementReport.Disclaimer, l.Body);
        foreach (string caution in MeasurementReport.Cautions)
            l.Text("- " + caution, l.Small);
        l.Finish("survey of " + file);
        doc.Save(output, closeStream: false);
    }
}
