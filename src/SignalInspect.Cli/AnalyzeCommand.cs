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
        var nominal = Units.SiOption(
            "--nominal",
            "Nominal (assigned) carrier frequency in Hz: offsets and ppm are taken from it (absolute RF when the "
                + "centre is known)."
        );
        var signal = new Option<string?>("--signal")
        {
            Description =
                "The emission to measure, FREQ[:WIDTH] (default: the strongest): FREQ in Hz, absolute RF when the "
                + "capture's centre is known, else an offset from the centre (audio frequency for real input); "
                + "WIDTH sets the channel the measurement sees. SI suffixes: --signal 459.9875M:12.5k.",
            HelpName = "FREQ[:WIDTH]",
        };
        var expect = new Option<string?>("--expect")
        {
            Description = "Measure as this modulation instead of classifying: am, fm, pm, fsk, cw, noise.",
            HelpName = "KIND",
        };
        var json = new Option<string?>("--json")
        {
            Description = "Write the results as JSON to OUT, or to standard output with '-'.",
            HelpName = "OUT|-",
        };
        var obw = new Option<double>("--obw-percent")
        {
            Description = "Occupied-bandwidth percentage (ITU-R SM.328).",
            DefaultValueFactory = _ => 99,
            HelpName = "PERCENT",
        };
        var xdb = new Option<double>("--xdb")
        {
            Description = "The x of the x-dB bandwidth, dB.",
            DefaultValueFactory = _ => 26,
            HelpName = "DB",
        };
        var obwNoise = new Option<string>("--obw-noise")
        {
            Description = "Noise floor in the occupied bandwidth: subtract or keep.",
            DefaultValueFactory = _ => "subtract",
            HelpName = "subtract|keep",
        };
        obwNoise.AcceptOnlyFromAmong("subtract", "keep");
        var lp = Units.SiOption(
            "--post-lowpass",
            "Post-detection low-pass cutoff in Hz (default: the channel filter's width, so every modulating frequency "
                + "the occupied bandwidth allows passes)."
        );
        var hp = Units.SiOption("--post-highpass", "Post-detection high-pass corner in Hz (default off).");
        var deemph = new Option<double?>("--deemphasis")
        {
            Description = "De-emphasis time constant in microseconds (e.g. 50 or 75; default off).",
            HelpName = "US",
        };
        var interval = new Option<double?>("--track-interval")
        {
            Description =
                "Length in seconds of the windows the carrier, deviation or depth and level are followed in (default "
                + "about 0.1 s, a whole number of periods of the modulating tone); the frequency tolerance is judged "
                + "on the worst window.",
            HelpName = "S",
        };
        var reference = new ReferenceOptionSet();
        var conditions = new Option<string?>("--conditions")
        {
            Description = "Test conditions for the report (temperature, supply voltage, set-up).",
            HelpName = "TEXT",
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
        var spec = new SpectrumCommand.SpectrumOptionSet();
        var cmd = new Command(
            "analyze",
            "Measure a capture: modulation type, carrier frequency and offset (Hz, ppm), occupied and x-dB bandwidth, "
                + "AM depth, FM/PM deviation, FSK shift and rate, modulating frequency, emission designator."
        )
        {
            capture,
            signal,
            nominal,
            expect,
            json,
            obw,
            xdb,
            obwNoise,
            lp,
            hp,
            deemph,
            interval,
            force,
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
        reference.AddTo(cmd);
        reader.AddTo(cmd);
        spec.AddTo(cmd);
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
            var (kind, beta) = spec.WindowKindOf(r);
            ModulationKind? expected = null;
            if (r.GetValue(expect) is { } e)
                expected = ModulationKindNames.Parse(e);
            var options = new AnalysisOptions
            {
                NominalHz = r.GetValue(nominal),
                Expect = expected,
                Signal = r.GetValue(signal) is { } sig ? ParseSignal(sig) : null,
                ObwPercent = r.GetValue(obw),
                Xdb = r.GetValue(xdb),
                ObwNoise = r.GetValue(obwNoise) == "keep" ? NoiseFloorTreatment.Keep : NoiseFloorTreatment.Subtract,
                FftSize = r.GetValue(spec.Fft)
                    ?? (
                        r.GetValue(spec.Rbw) is { } rbw
                            ? Spectrum.SpectrumSettings.FftSizeForRbw(rbw, source.Info.SampleRateHz, kind, beta)
                            : null
                    ),
                Window = kind,
                PostLowPassHz = r.GetValue(lp),
                PostHighPassHz = r.GetValue(hp),
                DeEmphasisUs = r.GetValue(deemph),
                TrackIntervalS = r.GetValue(interval),
                SuppressDc = r.GetValue(spec.SuppressDc),
                StartS = r.GetValue(spec.Start) ?? 0,
                DurationS = r.GetValue(spec.Duration),
                Threads = r.GetValue(spec.Threads),
                KeepSpectrogram = pdfOut is not null,
            };
            options = reference.Apply(r, options);
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
            {
                byte[] bytes = profile is null ? AnalysisJson.ToBytes(model.Analysis) : AnalysisJson.ToBytes(model);
                if (toStdout)
                    stdout.WriteLine(System.Text.Encoding.UTF8.GetString(bytes));
                else
                {
                    AtomicFile.Write(jsonOut, overwrite, s => s.Write(bytes));
                    summary.WriteLine($"wrote {jsonOut}");
                }
            }
            return ExitCodes.ForVerdict(model.Overall);
        });
        return cmd;
    }

    /// <summary>Parses FREQ[:WIDTH], each a number with an optional SI suffix.</summary>
    private static SignalSelection ParseSignal(string text)
    {
        string[] p = text.Split(':');
        if (p.Length is 1 or 2 && Units.TryParseSi(p[0], out double f))
        {
            if (p.Length == 1)
                return new SignalSelection(f);
            if (Units.TryParseSi(p[1], out double w))
                return new SignalSelection(f, w);
        }
        throw new UsageException($"--signal: '{text}' is not FREQ or FREQ:WIDTH in Hz (e.g. 459.9875M:12.5k)");
    }

    private static string Quote(string a) => a.Contains(' ') ? $"\"{a}\"" : a;
}
