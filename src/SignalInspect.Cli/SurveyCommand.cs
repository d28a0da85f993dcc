using System.CommandLine;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Survey;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect survey</c>: every emission of a wideband capture, its time on air and measurements,
/// and the occupancy of a channel grid.</summary>
internal static class SurveyCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var capture = new Argument<string>("capture") { Description = "The capture file (see 'info')." };
        var json = new Option<string?>("--json")
        {
            Description =
                "Write the survey as JSON to OUT (every emission with its full analysis), or to standard "
                + "output with '-'.",
            HelpName = "OUT|-",
        };
        var csv = new Option<string?>("--csv")
        {
            Description = "Write one CSV row per emission to OUT.",
            HelpName = "OUT.csv",
        };
        var annotate = new Option<string?>("--annotate")
        {
            Description =
                "Write a copy of the capture's SigMF metadata with one annotation per emission to OUT.sigmf-meta, "
                + "pointing at the same data file (SigMF pairs only; the input is never changed).",
            HelpName = "OUT.sigmf-meta",
        };
        var report = new Option<string?>("--report")
        {
            Description =
                "Write a PDF survey report to OUT.pdf: the spectrum with the emissions numbered, the spectrogram, the "
                + "table of emissions and the channels' occupancy.",
            HelpName = "OUT.pdf",
        };
        var survey = new SurveyOptionSet();
        var force = new Option<bool>("--force") { Description = "Replace existing output files." };
        var measure = new MeasurementOptionSet();
        var reader = new ReaderOptionSet();
        var cmd = new Command(
            "survey",
            "Find every emission in a capture (also those on only part of the time): frequency, class, occupied "
                + "bandwidth, power, SNR, time on air and the measurements 'analyze' makes of each; channel "
                + "occupancy of a grid; findings written back as SigMF annotations."
        )
        {
            capture,
            json,
            csv,
            annotate,
            report,
            force,
        };
        survey.AddTo(cmd);
        measure.AddTo(cmd);
        reader.AddTo(cmd);
        cmd.SetAction(r =>
        {
            bool overwrite = r.GetValue(force);
            string? jsonOut = r.GetValue(json),
                csvOut = r.GetValue(csv),
                metaOut = r.GetValue(annotate),
                pdfOut = r.GetValue(report);
            if (pdfOut is not null && !pdfOut.EndsWith(".pdf", StringComparison.OrdinalIgnoreCase))
                throw new UsageException($"--report: '{pdfOut}' should end in .pdf");
            foreach (string? o in new[] { jsonOut == "-" ? null : jsonOut, csvOut, metaOut, pdfOut })
                if (o is not null)
                    AtomicFile.CheckWritable(o, overwrite);
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            AnalysisOptions options = measure.Read(r, source.Info);
            if (options.DiscriminatorHzPerFullScale is not null)
                throw new UsageException(
                    "--discriminator: a survey finds emissions in an RF capture; measure discriminator audio with "
                        + "'analyze --discriminator'"
                );
            if (options.Signal is not null)
                throw new UsageException(
                    "--signal: a survey measures every emission; measure one with 'analyze --signal'"
                );
            SurveySettings settings = survey.Read(r, options with { KeepSpectrogram = false });
            SurveyResult result = CliProgress.Run(stderr, "survey", source.Info.SampleCount, report =>
                BandSurvey.Run(source, settings, progress: report)
            );
            bool toStdout = jsonOut == "-";
            TextWriter summary = toStdout ? stderr : stdout;
            SurveyText.WriteTable(summary, result);
            foreach (string w in result.Warnings)
                stderr.WriteLine($"signalinspect: warning: {w}");
            if (jsonOut is not null)
                AnalyzeCommand.WriteJson(jsonOut, SurveyJson.ToBytes(result), overwrite, stdout, summary);
            if (csvOut is not null)
            {
                AtomicFile.Write(csvOut, overwrite, s =>
                {
                    using var w = new StreamWriter(s, new System.Text.UTF8Encoding(false), leaveOpen: true);
                    SurveyText.WriteCsv(w, result);
                });
                summary.WriteLine($"wrote {csvOut}");
            }
            if (pdfOut is not null)
            {
                AtomicFile.Write(pdfOut, overwrite, s => SurveyPdf.Write(result, s));
                summary.WriteLine($"wrote {pdfOut}");
            }
            if (metaOut is not null)
            {
                SigMfAnnotation.Write(result, metaOut, overwrite);
                summary.WriteLine($"wrote {metaOut}");
            }
            return ExitCodes.Success;
        });
        return cmd;
    }
}
