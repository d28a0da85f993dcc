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
        var channels = new Option<string?>("--channels")
        {
            Description =
                "Channel grid for occupancy, START:STEP:COUNT: COUNT channels STEP Hz wide, the first centred at "
                + "START (absolute RF when the centre is known), e.g. 462.5625M:12.5k:8.",
            HelpName = "START:STEP:COUNT",
        };
        var minSnr = new Option<double>("--min-snr")
        {
            Description = "Least SNR of an emission in its own bins while on, dB.",
            DefaultValueFactory = _ => 6,
            HelpName = "DB",
        };
        var threshold = new Option<double>("--occupancy-threshold")
        {
            Description = "A channel is occupied in a time step when its power exceeds its noise by this much, dB.",
            DefaultValueFactory = _ => 6,
            HelpName = "DB",
        };
        var steps = new Option<int>("--time-steps")
        {
            Description = "Time steps of the time-resolved pass (the time resolution is the window over this).",
            DefaultValueFactory = _ => 512,
            HelpName = "N",
        };
        var listOnly = new Option<bool>("--list-only")
        {
            Description = "List the emissions without measuring each (faster: one pass over the capture).",
        };
        var maxMeasured = new Option<int>("--max-measured")
        {
            Description = "Measure at most this many emissions (the strongest); the rest are listed.",
            DefaultValueFactory = _ => 64,
            HelpName = "N",
        };
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
            channels,
            minSnr,
            threshold,
            steps,
            listOnly,
            maxMeasured,
            force,
        };
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
            ChannelGrid? grid = r.GetValue(channels) is { } g ? ParseGrid(g) : null;
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            AnalysisOptions options = measure.Read(r, source.Info);
            if (options.Signal is not null)
                throw new UsageException(
                    "--signal: a survey measures every emission; measure one with 'analyze --signal'"
                );
            var settings = new SurveySettings
            {
                Analysis = options with { KeepSpectrogram = false },
                MinSnrDb = r.GetValue(minSnr),
                OccupancyThresholdDb = r.GetValue(threshold),
                Rows = r.GetValue(steps),
                ChannelGrid = grid,
                MeasureEach = !r.GetValue(listOnly),
                MaxMeasured = r.GetValue(maxMeasured),
            };
            settings.Validate();
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

    /// <summary>Parses START:STEP:COUNT (START and STEP with optional SI suffixes).</summary>
    private static ChannelGrid ParseGrid(string text)
    {
        string[] p = text.Split(':');
        if (
            p.Length == 3
            && Units.TryParseSi(p[0], out double start)
            && Units.TryParseSi(p[1], out double step)
            && int.TryParse(p[2], System.Globalization.CultureInfo.InvariantCulture, out int count)
        )
            return new ChannelGrid(start, step, count);
        throw new UsageException($"--channels: '{text}' is not START:STEP:COUNT (e.g. 462.5625M:12.5k:8)");
    }
}
