using System.CommandLine;
using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Inspection;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Synthesis;

namespace SignalInspect.Cli;

/// <summary>
/// <c>signalinspect demo</c>: the built-in scenario. The Harbour Water Authority (an invented
/// utility) brings three recordings from its radio shop: a handheld on a 12.5 kHz VHF channel that
/// over-deviates, an AM transmitter on test, and a drifting UHF telemetry FSK burst. The demo
/// synthesises them, analyses each against a limit profile, writes a PDF report (and its JSON)
/// for each and prints a summary. Its outputs go to a folder of its own and are replaced on each run.
/// </summary>
internal static class DemoCommand
{
    /// <summary>The demo captures: file name, datatype, spec, profile, equipment.</summary>
    internal static IReadOnlyList<(
        string File,
        string Datatype,
        SignalSpec Spec,
        string Profile,
        string Equipment
    )> Scenario
    { get; } =
    [
        (
            "hwa-handheld-ch7.sigmf",
            "cf32_le",
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 48_000,
                DurationS = 2,
                CenterFrequencyHz = 155_312_500,
                CarrierOffsetHz = 180,
                Amplitude = 0.5,
                ModulatingFrequencyHz = 1000,
                PeakDeviationHz = 3100,
                SnrDb = 60,
                Seed = 7,
            },
            "land-mobile-12k5-vhf.json",
            "HWA handheld, fleet no. 7 (channel 7, 155.3125 MHz)"
        ),
        (
            "hwa-am-test-set.wav",
            "ci16_le",
            new SignalSpec
            {
                Kind = SignalKind.Am,
                SampleRateHz = 32_000,
                DurationS = 2,
                CenterFrequencyHz = 1_530_000,
                CarrierOffsetHz = -40,
                Amplitude = 0.4,
                ModulatingFrequencyHz = 1000,
                AmDepth = 0.92,
                SnrDb = 45,
                Seed = 11,
            },
            "am-broadcast.json",
            "HWA information transmitter on the test bench (1530 kHz)"
        ),
        (
            "hwa-telemetry-burst.sigmf-meta",
            "ci16_le",
            new SignalSpec
            {
                Kind = SignalKind.Fsk,
                SampleRateHz = 96_000,
                DurationS = 1.5,
                CenterFrequencyHz = 457_987_500,
                CarrierOffsetHz = 640,
                Amplitude = 0.5,
                FskShiftHz = 1000,
                SymbolRateBd = 1200,
                DriftHzPerS = 40,
                SnrDb = 40,
                Seed = 3,
            },
            "land-mobile-12k5-uhf.json",
            "HWA pump-station telemetry modem (457.9875 MHz)"
        ),
    ];

    /// <summary>Reads one of the example profiles shipped in profiles/ (embedded in the tool).</summary>
    internal static LimitProfile EmbeddedProfile(string name)
    {
        using Stream s = typeof(DemoCommand).Assembly.GetManifestResourceStream("profiles/" + name)
            ?? throw new InvalidOperationException($"the example profile {name} is not embedded");
        using var reader = new StreamReader(s);
        return LimitProfile.Parse(reader.ReadToEnd(), "profiles/" + name);
    }

    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var outDir = new Option<string>("--out")
        {
            Description =
                "Folder for the demo's outputs: its 'demo' subfolder is created and its files replaced on each run.",
            DefaultValueFactory = _ => "reports",
            HelpName = "DIR",
        };
        var cmd = new Command(
            "demo",
            "Run the built-in scenario: synthesise the Harbour Water Authority's three recordings, measure each "
                + "against a limit profile and write a PDF report for each into DIR/demo/."
        )
        {
            outDir,
        };
        cmd.SetAction(r =>
        {
            string dir = Path.Combine(r.GetValue(outDir)!, "demo");
            Directory.CreateDirectory(dir);
            var start = new DateTimeOffset(2026, 5, 4, 9, 30, 0, TimeSpan.Zero);
            var rows = new List<string[]>();
            foreach (var (file, datatype, spec, profileName, equipment) in Scenario)
            {
                string path = Path.Combine(dir, file);
                stderr.WriteLine($"demo: {file}");
                Synthesizer.Write(spec, path, SampleFormat.Parse(datatype), start, overwrite: true);
                bool wav = file.EndsWith(".wav", StringComparison.Ordinal);
                CaptureSource source = CaptureSource.Open(
                    path,
                    new ReaderOptions { CenterFrequencyHz = wav ? spec.CenterFrequencyHz : null }
                );
                LimitProfile profile = EmbeddedProfile(profileName);
                var settings = new InspectionSettings
                {
                    Analysis = new AnalysisOptions { NominalHz = spec.CenterFrequencyHz },
                    Profile = profile,
                    ProfilePath = "profiles/" + profileName,
                    Header = new ReportHeader
                    {
                        Title = "Harbour Water Authority radio shop: " + equipment,
                        Operator = "demo (synthesised recording)",
                        Equipment = equipment,
                        Notes =
                            "Demonstration: the recording was synthesised by 'signalinspect demo' ("
                            + Synthesizer.Describe(spec)
                            + ").",
                        CommandLine = "signalinspect demo",
                    },
                };
                MeasurementReport model = CaptureInspection.Inspect(source, settings);
                Verdict overall = model.Overall!.Value;
                string pdf = Path.Combine(
                    dir,
                    Path.GetFileNameWithoutExtension(file.Replace(".sigmf-meta", string.Empty)) + ".pdf"
                );
                CaptureInspection.WriteReport(model, pdf, overwrite: true);
                rows.Add([
                    file,
                    model.Analysis.Classification.Kind.Name(),
                    ConsoleReport.Headline(model),
                    overall.ToString().ToUpperInvariant(),
                    pdf,
                ]);
            }
            int[] w =
            [
                .. Enumerable
                    .Range(0, 4)
                    .Select(i =>
                        Math.Max(
                            rows.Max(x => x[i].Length),
                            new[] { "capture", "kind", "reading", "verdict" }[i].Length
                        )
                    ),
            ];
            stdout.WriteLine(
                $"{"capture".PadRight(w[0])}  {"kind".PadRight(w[1])}  "
                    + $"{"reading".PadRight(w[2])}  {"verdict".PadRight(w[3])}  report"
            );
            foreach (string[] row in rows)
                stdout.WriteLine(
                    $"{row[0].PadRight(w[0])}  {row[1].PadRight(w[1])}  {row[2].PadRight(w[2])}  "
                        + $"{row[3].PadRight(w[3])}  {row[4]}"
                );
            stdout.WriteLine($"reports and captures are in {dir}");
            return ExitCodes.Success;
        });
        return cmd;
    }
}
