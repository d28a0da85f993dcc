using System.CommandLine;
using SignalInspect.Capture;
using SignalInspect.Synthesis;

namespace SignalInspect.Cli;

/// <summary>
/// <c>signalinspect demo</c>: the built-in scenario. The Harbour Water Authority (an invented
/// utility) brings three recordings from its radio shop; the demo synthesises them and reads
/// them back. Its outputs go to a folder of its own and are replaced on each run.
/// </summary>
internal static class DemoCommand
{
    /// <summary>The demo captures: file name, datatype, spec.</summary>
    internal static IReadOnlyList<(string File, string Datatype, SignalSpec Spec)> Scenario { get; } =
    [
        ("hwa-handheld-ch7.sigmf", "cf32_le", new SignalSpec
        {
            Kind = SignalKind.Fm, SampleRateHz = 48_000, DurationS = 2, CenterFrequencyHz = 155_312_500,
            CarrierOffsetHz = 180, Amplitude = 0.5, ModulatingFrequencyHz = 1000, PeakDeviationHz = 3100, SnrDb = 35, Seed = 7,
        }),
        ("hwa-am-test-set.wav", "ci16_le", new SignalSpec
        {
            Kind = SignalKind.Am, SampleRateHz = 32_000, DurationS = 2, CenterFrequencyHz = 1_530_000,
            CarrierOffsetHz = -40, Amplitude = 0.4, ModulatingFrequencyHz = 1000, AmDepth = 0.85, SnrDb = 40, Seed = 11,
        }),
        ("hwa-telemetry-burst.sigmf-meta", "ci16_le", new SignalSpec
        {
            Kind = SignalKind.Fsk, SampleRateHz = 96_000, DurationS = 1.5, CenterFrequencyHz = 457_987_500,
            CarrierOffsetHz = 600, Amplitude = 0.5, FskShiftHz = 1000, SymbolRateBd = 1200, DriftHzPerS = 40, SnrDb = 30, Seed = 3,
        }),
    ];

    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var outDir = new Option<string>("--out") { Description = "Folder for the demo's captures (a 'demo' folder inside it is replaced on each run).", DefaultValueFactory = _ => "reports", HelpName = "DIR" };
        var cmd = new Command("demo", "Run the built-in scenario: synthesise the Harbour Water Authority's three recordings and read them back.") { outDir };
        cmd.SetAction(r =>
        {
            string dir = Path.Combine(r.GetValue(outDir)!, "demo");
            Directory.CreateDirectory(dir);
            stdout.WriteLine($"{"capture",-32} {"container",-14} {"rate",12} {"centre",16} {"samples",9}  signal");
            var start = new DateTimeOffset(2026, 5, 4, 9, 30, 0, TimeSpan.Zero);
            foreach (var (file, datatype, spec) in Scenario)
            {
                string path = Path.Combine(dir, file);
                Synthesizer.Write(spec, path, SampleFormat.Parse(datatype), start, overwrite: true);
                CaptureInfo info = CaptureSource.Open(path, new ReaderOptions { CenterFrequencyHz = file.EndsWith(".wav", StringComparison.Ordinal) ? spec.CenterFrequencyHz : null }).Info;
                stdout.WriteLine($"{file,-32} {info.Container,-14} {Units.Hz(info.SampleRateHz),12} {Units.Hz(info.CenterFrequencyHz),16} {info.SampleCount,9}  {spec.Kind.ToString().ToUpperInvariant()}, {info.Datatype}");
            }
            stdout.WriteLine($"captures written to {dir}");
            return ExitCodes.Success;
        });
        return cmd;
    }
}
