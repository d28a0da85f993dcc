using System.CommandLine;
using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Inspection;
using SignalInspect.Measure;
using SignalInspect.Reporting;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect analyze</c>: every measurement of a capture, as a summary and JSON.</summary>
internal static class AnalyzeCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var capture = new Argument<string>("capture") { Description = "The capture file (see 'info')." };
        var json = new Option<string?>("--json")
        {
            Description = "Write the results as JSON to OUT, or to standard output with '-'.",
            HelpName = "OUT|-",
        };
        var measure = new MeasurementOptionSet();
        var conditions = new Option<string?>("--conditions")
        {
            Description = "Test conditions for the report (temperature, supply voltage, set-up).",
            HelpName = "TEXT",
        };
        var steps = new Option<string?>("--steps")
        {
            Description =
                "A tone series in the capture for the audio response: a text file, one step per line as START,END"
                + "[,TONE[,LEVEL]] (seconds, Hz, input level in dB; '#' starts a comment), or 'auto' to take each "
                + "transmission as a step. Each step's deviation (or depth) is given relative to the step nearest 1 "
                + "kHz, beside the 6 dB/octave pre-emphasis curve; with levels, relative to the lowest level's step, "
                + "with its compression (the limiter).",
            HelpName = "FILE|auto",
        };
        var force = new Option<bool>("--force") { Description = "Replace existing output files." };
        var report = new Option<string?>("--report")
        {
            Description =
                "Write a PDF measurement report to OUT.pdf, with the same report model as JSON beside it (OUT.json).",
            HelpName = "OUT.pdf",
        };
        var decisionRule = DecisionRuleOption.Create();
        var limits = new Option<string?>("--limits")
        {
            Description =
                "Limit profile (JSON, see profiles/README.md): verdicts PASS / FAIL / INCONCLUSIVE for each limit; "
                + "exit code 1 when any fails.",
            HelpName = "PROFILE",
        };
        var title = new Option<string?>("--title") { Description = "Report title.", HelpName = "TEXT" };
        var op = new Option<string?>("--operator") { Description = "Who measured (report).", HelpName = "NAME" };
        var eut = new Option<string?>("--equipment")
        {
            Description = "Equipment under test (report).",
            HelpName = "TEXT",
        };
        var notes = new Option<string?>("--notes") { Description = "Notes for the report.", HelpName = "TEXT" };
        var paper = new Option<string>("--paper")
        {
            Description = "Paper size of the report: a4 or letter.",
            DefaultValueFactory = _ => "a4",
            HelpName = "a4|letter",
        };
        paper.AcceptOnlyFromAmong("a4", "letter");
        var reader = new ReaderOptionSet();
        var cmd = new Command(
            "analyze",
            "Measure a capture: modulation type, carrier frequency and offset (Hz, ppm), occupied and x-dB bandwidth, "
                + "AM depth, FM/PM deviation, FSK shift and rate, modulating frequency, emission designator."
        )
        {
            capture,
            json,
            force,
            steps,
            report,
            limits,
            decisionRule,
            title,
            op,
            eut,
            notes,
            conditions,
            paper,
        };
        measure.AddTo(cmd);
        reader.AddTo(cmd);
        cmd.SetAction(r =>
        {
            string? jsonOut = r.GetValue(json);
            bool overwrite = r.GetValue(force);
            if (jsonOut is not null && jsonOut != "-")
                AtomicFile.CheckWritable(jsonOut, overwrite);
            string? pdfOut = r.GetValue(report);
            if (pdfOut is not null)
            {
                if (!pdfOut.EndsWith(".pdf", StringComparison.OrdinalIgnoreCase))
                    throw new UsageException($"--report: '{pdfOut}' should end in .pdf");
                AtomicFile.CheckWritable(pdfOut, overwrite);
                AtomicFile.CheckWritable(CaptureInspection.ModelPathFor(pdfOut), overwrite);
            }
            string? profilePath = r.GetValue(limits);
            LimitProfile? profile = profilePath is null ? null : LimitProfile.Load(profilePath);
            profile = DecisionRuleOption.Apply(profile, r.GetValue(decisionRule));
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            AnalysisOptions options = measure.Read(r, source.Info) with
            {
                KeepSpectrogram = pdfOut is not null,
                ToneSteps = r.GetValue(steps) is { } stepFile && stepFile != "auto" ? ReadSteps(stepFile) : [],
                StepsFromTransmissions = r.GetValue(steps) == "auto",
            };
            var settings = new InspectionSettings
            {
                Analysis = options,
                Profile = profile,
                ProfilePath = profilePath,
                Header = new ReportHeader
                {
                    Title = r.GetValue(title),
                    Operator = r.GetValue(op),
                    Equipment = r.GetValue(eut),
                    Notes = r.GetValue(notes),
                    Conditions = r.GetValue(conditions),
                    Paper = r.GetValue(paper) == "letter" ? PaperSize.Letter : PaperSize.A4,
                    CommandLine =
                        "signalinspect " + string.Join(' ', Environment.GetCommandLineArgs().Skip(1).Select(Quote)),
                },
            };
            if (
                jsonOut is not null
                && jsonOut != "-"
                && pdfOut is not null
                && Path.GetFullPath(jsonOut) == Path.GetFullPath(CaptureInspection.ModelPathFor(pdfOut))
            )
                throw new UsageException(
                    $"--json {jsonOut}: --report {pdfOut} writes its JSON model there; give --json another name"
                );
            MeasurementReport model = CliProgress.Run(stderr, "analyze", source.Info.SampleCount, report =>
                CaptureInspection.Inspect(source, settings, report, timer: Diagnostics.TimerFor(stderr))
            );
            bool toStdout = jsonOut == "-";
            TextWriter summary = toStdout ? stderr : stdout;
            ConsoleReport.WriteSummary(summary, model);
            foreach (string w in model.Analysis.Warnings)
                stderr.WriteLine($"signalinspect: warning: {w}");
            ConsoleReport.WriteVerdicts(summary, model);
            if (pdfOut is not null)
            {
                CaptureInspection.WriteReport(model, pdfOut, overwrite);
                summary.WriteLine($"wrote {pdfOut} and {CaptureInspection.ModelPathFor(pdfOut)}");
            }
            if (jsonOut is not null)
                WriteJson(
                    jsonOut,
                    profile is null ? AnalysisJson.ToBytes(model.Analysis) : AnalysisJson.ToBytes(model),
                    overwrite,
                    stdout,
                    summary
                );
            return ExitCodes.ForVerdict(model.Overall);
        });
        return cmd;
    }

    /// <summary>Reads a step list: START,END[,TONE[,LEVEL]] per line (SI suffixes allowed; TONE may be left empty),
    /// '#' comments, blank lines skipped.</summary>
    private static IReadOnlyList<ToneStep> ReadSteps(string path)
    {
        if (!File.Exists(path))
            throw new UsageException($"--steps: {path}: file not found");
        var list = new List<ToneStep>();
        int n = 0;
        foreach (string raw in File.ReadLines(path))
        {
            n++;
            string line = (raw.Split('#')[0]).Trim();
            if (line.Length == 0)
                continue;
            string[] p = line.Split(',', StringSplitOptions.TrimEntries);
            double a = 0,
                b = 0,
                t = 0,
                level = 0;
            bool hasTone = p.Length >= 3 && p[2].Length > 0,
                hasLevel = p.Length == 4;
            if (
                p.Length is < 2 or > 4
                || !Units.TryParseSi(p[0], out a)
                || !Units.TryParseSi(p[1], out b)
                || (hasTone && !Units.TryParseSi(p[2], out t))
                || (hasLevel && !Units.TryParseSi(p[3], out level))
                || !(b > a && a >= 0)
                || (hasTone && !(t > 0))
                || (p.Length == 3 && !hasTone)
            )
                throw new UsageException(
                    $"--steps: {path} line {n}: '{line}' is not START,END[,TONE[,LEVEL]] with 0 <= START < END "
                        + "(e.g. 2,4,1k or 2,4,,-10)"
                );
            list.Add(new ToneStep(a, b, hasTone ? t : null, hasLevel ? level : null));
        }
        if (list.Count == 0)
            throw new UsageException($"--steps: {path} holds no step");
        return list;
    }

    /// <summary>Writes JSON <paramref name="bytes"/> to <paramref name="jsonOut"/> (atomically, saying so on
    /// <paramref name="summary"/>) or to standard output for '-'.</summary>
    internal static void WriteJson(string jsonOut, byte[] bytes, bool overwrite, TextWriter stdout, TextWriter summary)
    {
        if (jsonOut == "-")
        {
            stdout.WriteLine(System.Text.Encoding.UTF8.GetString(bytes));
            return;
        }
        AtomicFile.Write(jsonOut, overwrite, s => s.Write(bytes));
        summary.WriteLine($"wrote {jsonOut}");
    }

    private static string Quote(string a) => a.Contains(' ') ? $"\"{a}\"" : a;
}
