using System.CommandLine;
using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Spectrum;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect analyze</c>: every measurement of a capture, as a summary and JSON.</summary>
internal static class AnalyzeCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var capture = new Argument<string>("capture") { Description = "The capture file (see 'info')." };
        var nominal = Units.SiOption(
            "--nominal",
            "Nominal (assigned) carrier frequency in Hz: offsets and ppm are taken from it (absolute RF when the centre is known)."
        );
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
            Description = "Occupied-bandwidth percentage (default 99, ITU-R SM.328).",
            DefaultValueFactory = _ => 99,
            HelpName = "PERCENT",
        };
        var xdb = new Option<double>("--xdb")
        {
            Description = "The x of the x-dB bandwidth (default 26 dB).",
            DefaultValueFactory = _ => 26,
            HelpName = "DB",
        };
        var obwNoise = new Option<string>("--obw-noise")
        {
            Description = "Noise floor in the occupied bandwidth: subtract (default) or keep.",
            DefaultValueFactory = _ => "subtract",
            HelpName = "subtract|keep",
        };
        obwNoise.AcceptOnlyFromAmong("subtract", "keep");
        var lp = Units.SiOption(
            "--post-lowpass",
            "Post-detection low-pass cutoff in Hz (default: the channel filter's width, so every modulating frequency the occupied bandwidth allows passes)."
        );
        var hp = Units.SiOption("--post-highpass", "Post-detection high-pass corner in Hz (default off).");
        var deemph = new Option<double?>("--deemphasis")
        {
            Description = "De-emphasis time constant in microseconds (e.g. 50 or 75; default off).",
            HelpName = "US",
        };
        var force = new Option<bool>("--force") { Description = "Replace existing output files." };
        var report = new Option<string?>("--report")
        {
            Description =
                "Write a PDF measurement report to OUT.pdf, with the same report model as JSON beside it (OUT.json).",
            HelpName = "OUT.pdf",
        };
        var limits = new Option<string?>("--limits")
        {
            Description =
                "Limit profile (JSON, see profiles/README.md): verdicts PASS / FAIL / INCONCLUSIVE for each limit; exit code 1 when any fails.",
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
            Description = "Paper size of the report: a4 (default) or letter.",
            DefaultValueFactory = _ => "a4",
            HelpName = "a4|letter",
        };
        paper.AcceptOnlyFromAmong("a4", "letter");
        var reader = new ReaderOptionSet();
        var spec = new SpectrumCommand.SpectrumOptionSet();
        var cmd = new Command(
            "analyze",
            "Measure a capture: modulation type, carrier frequency and offset (Hz, ppm), occupied and x-dB bandwidth, AM depth, FM/PM deviation, FSK shift and rate, modulating frequency, emission designator."
        )
        {
            capture,
            nominal,
            expect,
            json,
            obw,
            xdb,
            obwNoise,
            lp,
            hp,
            deemph,
            force,
            report,
            limits,
            title,
            op,
            eut,
            notes,
            paper,
        };
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
                AtomicFile.CheckWritable(Path.ChangeExtension(pdfOut, ".json"), overwrite);
            }
            string? profilePath = r.GetValue(limits);
            LimitProfile? profile = profilePath is null ? null : LimitProfile.Load(profilePath);
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            var (kind, beta) = spec.WindowKindOf(r);
            ModulationKind? expected = null;
            if (r.GetValue(expect) is { } e)
                expected = ModulationKindNames.Parse(e);
            var options = new AnalysisOptions
            {
                NominalHz = r.GetValue(nominal) ?? profile?.NominalFrequencyHz,
                Expect = expected,
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
                SuppressDc = r.GetValue(spec.SuppressDc),
                StartS = r.GetValue(spec.Start) ?? 0,
                DurationS = r.GetValue(spec.Duration),
                Threads = r.GetValue(spec.Threads),
                KeepSpectrogram = pdfOut is not null,
            };
            long total = source.Info.SampleCount;
            AnalysisResult result = CliProgress.Run(stderr, "analyze", total, report =>
                Analyzer.Analyze(source, options, report)
            );
            bool toStdout = jsonOut == "-";
            TextWriter summary = toStdout ? stderr : stdout;
            WriteSummary(summary, result);
            foreach (string w in result.Warnings)
                stderr.WriteLine($"signalinspect: warning: {w}");
            MeasurementReport model = MeasurementReport.Create(
                result,
                profile,
                profilePath,
                r.GetValue(title) ?? $"Measurement of {Path.GetFileName(source.Info.Path)}"
            ) with
            {
                Operator = r.GetValue(op),
                Equipment = r.GetValue(eut),
                Notes = r.GetValue(notes),
                Paper = r.GetValue(paper) == "letter" ? PaperSize.Letter : PaperSize.A4,
                CommandLine =
                    "signalinspect " + string.Join(' ', Environment.GetCommandLineArgs().Skip(1).Select(Quote)),
            };
            Verdict? overall = model.Overall;
            if (profile is not null)
                WriteVerdicts(summary, profile, model.Checks, overall!.Value);
            if (pdfOut is not null)
            {
                WriteReport(model, pdfOut, overwrite);
                summary.WriteLine($"wrote {pdfOut} and {Path.ChangeExtension(pdfOut, ".json")}");
            }
            if (jsonOut is not null)
            {
                byte[] bytes = AnalysisJson.ToBytes(result);
                if (toStdout)
                    stdout.WriteLine(System.Text.Encoding.UTF8.GetString(bytes));
                else
                {
                    AtomicFile.Write(jsonOut, overwrite, s => s.Write(bytes));
                    summary.WriteLine($"wrote {jsonOut}");
                }
            }
            return overall == Verdict.Fail ? ExitCodes.LimitFailed : ExitCodes.Success;
        });
        return cmd;
    }

    private static string Quote(string a) => a.Contains(' ') ? $"\"{a}\"" : a;

    /// <summary>Writes the PDF and its JSON model, each atomically.</summary>
    internal static void WriteReport(MeasurementReport model, string pdfOut, bool overwrite)
    {
        AtomicFile.Write(Path.ChangeExtension(pdfOut, ".json"), overwrite, s => s.Write(ReportJson.ToBytes(model)));
        AtomicFile.Write(pdfOut, overwrite, s => PdfReportWriter.Write(model, s));
    }

    internal static void WriteVerdicts(
        TextWriter o,
        LimitProfile profile,
        IReadOnlyList<LimitCheck> checks,
        Verdict overall
    )
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        o.WriteLine($"limits                {profile.Name}");
        foreach (LimitCheck k in checks)
            o.WriteLine(
                string.Create(
                    c,
                    $"  {k.Verdict.ToString().ToUpperInvariant(),-13} {k.Measurement}: {k.Value:0.###} {k.Unit} (U {k.ExpandedUncertainty:0.###}), limit {k.LimitText}, margin {k.Margin:+0.###;-0.###}"
                )
            );
        o.WriteLine($"verdict               {overall.ToString().ToUpperInvariant()}");
    }

    internal static void WriteSummary(TextWriter o, AnalysisResult r)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        void Row(string k, string v) => o.WriteLine($"{k,-22}{v}");
        string F(double v, string fmt = "0.###") => v.ToString(fmt, c);
        Row("file", r.Capture.Path);
        Row(
            "modulation",
            $"{r.Classification.Kind.Name()} (confidence {F(r.Classification.Confidence, "0.00")}{(r.Classification.Expected ? ", as --expect said" : string.Empty)}): {r.Classification.Reason}"
        );
        Row("SNR in band", F(r.ChannelSnrDb, "0.0") + " dB");
        if (r.Carrier is { } car)
        {
            Row(
                "carrier",
                $"{F(car.FrequencyHz.Value, "0.###")} Hz +/- {F(car.FrequencyHz.StandardUncertainty, "0.###")} Hz (k=1)"
            );
            Row(
                "offset",
                $"{F(car.OffsetHz, "0.###")} Hz"
                    + (car.OffsetPpm is { } ppm ? $" ({F(ppm, "0.####")} ppm)" : string.Empty)
                    + $" from {car.OffsetReference}"
            );
        }
        var b = r.Bandwidth;
        Row(
            $"occupied bw ({F(100 * (1 - b.Beta), "0.#")} %)",
            $"{F(b.OccupiedHz, "0.#")} Hz +/- {F(r.OccupiedUncertaintyHz, "0.#")} Hz, edges {F(FrequencyAxis.Of(r.Capture).ToReported(b.LowerEdgeHz), "0.#")} to {F(FrequencyAxis.Of(r.Capture).ToReported(b.UpperEdgeHz), "0.#")} Hz"
        );
        Row(
            $"{F(b.Xdb, "0.#")} dB bandwidth",
            $"{F(b.XdbHz, "0.#")} Hz (RBW {F(r.Method.RbwHz, "0.##")} Hz, noise floor {(b.Treatment == NoiseFloorTreatment.Subtract ? "subtracted" : "kept")})"
        );
        if (r.Am is { } am)
            Row(
                "AM depth",
                $"{F(am.DepthPercent.Value, "0.00")} % (+peak {F(am.PositivePeakPercent, "0.00")} %, -peak {F(am.NegativePeakPercent, "0.00")} %)"
                    + (am.SidebandDepthPercent is { } sb ? $", sidebands give {F(sb, "0.00")} %" : string.Empty)
            );
        if (r.Fm is { } fm)
            Row(
                "FM deviation",
                $"peak {F(fm.PeakDeviationHz.Value, "0.#")} Hz (+{F(fm.PositivePeakHz, "0.#")} / -{F(fm.NegativePeakHz, "0.#")} Hz), rms {F(fm.RmsDeviationHz, "0.#")} Hz"
                    + (fm.ModulationIndex is { } mi ? $", index {F(mi, "0.###")}" : string.Empty)
            );
        if (r.Pm is { } pm)
            Row("PM deviation", $"peak {F(pm.PeakDeviationRad.Value, "0.####")} rad");
        if (r.Fsk is { } fsk)
            Row(
                "FSK",
                $"tones {string.Join(", ", fsk.ToneFrequenciesHz.Select(t => F(t, "0.#")))} Hz, shift {F(fsk.ShiftHz.Value, "0.#")} Hz"
                    + (
                        fsk.SymbolRateBd is { } sr
                            ? $", {F(sr.Value, "0.##")} Bd, h = {F(fsk.ModulationIndex!.Value, "0.###")}"
                            : ", symbol rate not found"
                    )
            );
        if (r.ModulatingFrequencyHz is { } mf)
            Row("modulating frequency", F(mf.Value, "0.##") + " Hz");
        if (r.EmissionDesignator is { } d)
            Row(
                "emission designator",
                d
                    + (
                        r.NecessaryBandwidthHz is { } nb
                            ? $" (necessary bandwidth {F(nb, "0.#")} Hz, 47 CFR 2.202; measured occupied {F(b.OccupiedHz, "0.#")} Hz)"
                            : string.Empty
                    )
            );
    }
}
