using System.Diagnostics;
using System.Text.Json;
using Xunit.Abstractions;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// The short CI version of the whole-pipeline benchmark (tests/Benchmarks/pipeline.sh): the same
/// synthesised FM capture, 0.25 s long, through <c>analyze --json</c> with the benchmark's settings,
/// against what the numpy/scipy reference script computed on it (committed in
/// testdata/benchmark/pipeline-smoke.json; Debian python3-scipy 1.10.1). The throughput is printed,
/// never asserted (these machines are shared: speed is measured by hand, see RESULTS.md).
/// </summary>
public class PipelineSmokeTests(ITestOutputHelper output)
{
    [Fact]
    public void Analyze_agrees_with_the_numpy_scipy_reference_on_the_smoke_capture()
    {
        using JsonDocument doc = JsonDocument.Parse(
            File.ReadAllText(TestData.Path("benchmark", "pipeline-smoke.json"))
        );
        JsonElement root = doc.RootElement,
            reference = root.GetProperty("reference");
        using var tmp = new TempDir();
        string capture = tmp.File("smoke.cf32");
        string[] synth = root.GetProperty("captureCommand").GetString()!.Split(' ')[1..];
        synth[Array.IndexOf(synth, "CAPTURE.cf32")] = capture;
        var (code, _, err) = CliRunner.Run(synth);
        Assert.True(code == 0, err);
        Assert.Equal(root.GetProperty("captureSha256").GetString(), TestData.Sha256(capture).ToLowerInvariant());

        var clock = Stopwatch.StartNew();
        var (ac, json, aerr) = CliRunner.Run(
            "analyze",
            capture,
            "--sample-rate",
            "2400000",
            "--obw-noise",
            "keep",
            "--post-lowpass",
            "15000",
            "--json",
            "-"
        );
        double seconds = clock.Elapsed.TotalSeconds;
        Assert.True(ac == 0, aerr);
        JsonElement j = JsonDocument.Parse(json).RootElement;
        double obw = j.GetProperty("bandwidth").GetProperty("occupiedHz").GetDouble();
        double dev = j.GetProperty("fm").GetProperty("peakDeviationHz").GetDouble();
        double refObw = reference.GetProperty("occupiedHz").GetDouble(),
            refDev = reference.GetProperty("peakDeviationHz").GetDouble();
        long samples = reference.GetProperty("samples").GetInt64();
        output.WriteLine(
            $"analyze: {seconds:0.000} s, {samples / seconds / 1e6:0.0} MS/s (in-process, includes first-call "
                + "compilation); "
                + $"OBW {obw:0.0} vs {refObw:0.0} Hz, peak deviation {dev:0.0} vs {refDev:0.0} Hz"
        );
        Near.Equal(refObw, obw, 1e-3 * refObw, "occupied bandwidth (0.1 %)");
        Near.Equal(refDev, dev, 5e-3 * refDev, "peak deviation (0.5 %)");
    }
}
