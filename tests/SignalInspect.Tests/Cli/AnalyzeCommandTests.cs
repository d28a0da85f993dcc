using System.Text.Json;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// <c>analyze --json</c> on captures written by testdata/make_measure_captures.py (numpy and the
/// Python standard library, not SignalInspect): the accuracy targets of issue 4 against their true
/// parameters (testdata/MANIFEST.md, section measure/).
/// </summary>
public class AnalyzeCommandTests
{
    private static JsonElement Analyze(params string[] args)
    {
        var (code, stdout, stderr) = CliRunner.Run(["analyze", .. args, "--json", "-"]);
        Assert.True(code == 0, stderr);
        return JsonDocument.Parse(stdout).RootElement;
    }

    private static string M(string file) => TestData.Path("measure", file);

    [Fact]
    public void Mono_audio_AM_on_a_12_kHz_carrier()
    {
        JsonElement j = Analyze(M("am-audio-12k.wav"));
        Assert.Equal("am", j.GetProperty("modulation").GetString());
        Near.Equal(70, j.GetProperty("am").GetProperty("depthPercent").GetDouble(), 1, "depth");
        Near.Equal(12000, j.GetProperty("carrier").GetProperty("frequencyHz").GetDouble(), 1, "carrier");
        Near.Equal(1000, j.GetProperty("modulatingFrequencyHz").GetDouble(), 1, "tone");
        Near.Equal(
            2000,
            j.GetProperty("bandwidth").GetProperty("occupiedHz").GetDouble(),
            Math.Max(2 * j.GetProperty("bandwidth").GetProperty("rbwHz").GetDouble(), 60),
            "OBW = 2 fm"
        );
        Assert.Equal("2K00A3E", j.GetProperty("emissionDesignator").GetString());
        Assert.Equal(JsonValueKind.Null, j.GetProperty("fm").GetProperty("peakDeviationHz").ValueKind);
    }

    [Fact]
    public void IQ_WAV_PM()
    {
        // PM of 1 rad by 800 Hz (MANIFEST.md). One tone cannot tell PM from FM (the phase and the frequency
        // are both sines: a fact of the trade), so it is read as FM of 800 Hz peak deviation, whose peak phase
        // is the 1 rad; --expect pm measures the phase directly.
        JsonElement asFm = Analyze(M("pm-iq.wav"));
        Assert.Equal("fm", asFm.GetProperty("modulation").GetString());
        Near.Equal(800, asFm.GetProperty("fm").GetProperty("peakDeviationHz").GetDouble(), 16, "deviation");
        Near.Equal(1.0, asFm.GetProperty("fm").GetProperty("peakPhaseRad").GetDouble(), 0.02, "peak phase");
        JsonElement j = Analyze(M("pm-iq.wav"), "--expect", "pm");
        Assert.Equal("pm", j.GetProperty("modulation").GetString());
        Near.Equal(1.0, j.GetProperty("pm").GetProperty("peakDeviationRad").GetDouble(), 0.02, "peak phase");
        Near.Equal(800, j.GetProperty("pm").GetProperty("peakDeviationHz").GetDouble(), 16, "deviation");
        Near.Equal(1500, j.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 1, "offset");
        Near.Equal(800, j.GetProperty("modulatingFrequencyHz").GetDouble(), 1, "tone");
        Assert.Equal(JsonValueKind.Null, j.GetProperty("carrier").GetProperty("offsetPpm").ValueKind); // no RF given
    }

    [Fact]
    public void Raw_cu8_wideband_FM()
    {
        JsonElement j = Analyze(M("wbfm-1024k.cu8"), "--sample-rate", "1.024M", "--center-frequency", "98.1M");
        Assert.Equal("fm", j.GetProperty("modulation").GetString());
        Near.Equal(75000, j.GetProperty("fm").GetProperty("peakDeviationHz").GetDouble(), 750, "deviation");
        Near.Equal(-120000, j.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 1, "offset");
        Near.Equal(97.98e6, j.GetProperty("carrier").GetProperty("frequencyHz").GetDouble(), 1, "carrier");
        Near.Equal(15000, j.GetProperty("modulatingFrequencyHz").GetDouble(), 15, "tone");
        // beta = 5: OBW99 = 2 x 6 x 15 kHz = 180 kHz (Bessel sums, testdata/REFERENCE-VALUES.md [D]).
        double rbw = j.GetProperty("bandwidth").GetProperty("rbwHz").GetDouble();
        Near.Equal(
            180000,
            j.GetProperty("bandwidth").GetProperty("occupiedHz").GetDouble(),
            Math.Max(2 * rbw, 0.03 * 180000),
            "OBW"
        );
        Assert.Equal("180KF3E", j.GetProperty("emissionDesignator").GetString());
    }

    [Fact]
    public void SigMF_narrowband_FM()
    {
        JsonElement j = Analyze(M("nbfm-151625.sigmf-meta"));
        Assert.Equal("fm", j.GetProperty("modulation").GetString());
        JsonElement fm = j.GetProperty("fm");
        Near.Equal(2500, fm.GetProperty("peakDeviationHz").GetDouble(), 25, "peak deviation");
        Near.Equal(2500, fm.GetProperty("positivePeakHz").GetDouble(), 25, "+peak");
        Near.Equal(2500, fm.GetProperty("negativePeakHz").GetDouble(), 25, "-peak");
        Near.Equal(2500 / Math.Sqrt(2), fm.GetProperty("rmsDeviationHz").GetDouble(), 25, "rms");
        Near.Equal(350, j.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 1, "offset");
        Near.Equal(350 / 151.62535, j.GetProperty("carrier").GetProperty("offsetPpm").GetDouble(), 0.01, "ppm");
        Near.Equal(
            8000,
            j.GetProperty("bandwidth").GetProperty("occupiedHz").GetDouble(),
            0.03 * 8000,
            "OBW (2.5 kHz / 1 kHz: 8.0 kHz)"
        );
        Assert.Equal(151625000, j.GetProperty("capture").GetProperty("centerFrequencyHz").GetDouble());
        Assert.Equal(64, j.GetProperty("capture").GetProperty("sha256").GetString()!.Length);
    }

    [Fact]
    public void SigMF_unmodulated_carrier_and_nominal_frequency()
    {
        JsonElement j = Analyze(M("cw-462.sigmf-meta"), "--nominal", "462.5625M");
        Assert.Equal("cw", j.GetProperty("modulation").GetString());
        Near.Equal(-777.7, j.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 1, "offset");
        Near.Equal(-777.7 / 462.5625, j.GetProperty("carrier").GetProperty("offsetPpm").GetDouble(), 0.005, "ppm");
        Assert.Equal("N0N", j.GetProperty("emissionDesignator").GetString());
        JsonElement n2 = Analyze(M("cw-462.sigmf-meta"), "--nominal", "462.5620M");
        Near.Equal(
            -277.7,
            n2.GetProperty("carrier").GetProperty("offsetHz").GetDouble(),
            1,
            "offset from another nominal"
        );
    }

    [Fact]
    public void SigMF_FSK()
    {
        JsonElement j = Analyze(M("fsk-433.sigmf-meta"));
        Assert.Equal("fsk", j.GetProperty("modulation").GetString());
        JsonElement fsk = j.GetProperty("fsk");
        Near.Equal(1200, fsk.GetProperty("shiftHz").GetDouble(), 24, "shift");
        Near.Equal(1000, fsk.GetProperty("symbolRateBd").GetDouble(), 10, "symbol rate");
        double[] tones = [.. fsk.GetProperty("toneFrequenciesHz").EnumerateArray().Select(t => t.GetDouble())];
        Near.Equal(433921400, tones[0], 24, "lower tone");
        Near.Equal(433922600, tones[1], 24, "upper tone");
    }

    [Fact]
    public void JSON_holds_every_documented_key()
    {
        JsonElement j = Analyze(M("nbfm-151625.sigmf-meta"));
        foreach (string k in new[] { "sampleRateHz", "centerFrequencyHz", "samples", "durationS", "sha256" })
            Assert.True(j.GetProperty("capture").TryGetProperty(k, out _), k);
        foreach (string k in new[] { "frequencyHz", "offsetHz", "offsetPpm" })
            Assert.True(j.GetProperty("carrier").TryGetProperty(k, out _), k);
        foreach (string k in new[] { "occupiedHz", "lowerEdgeHz", "upperEdgeHz", "xdbHz", "xdb", "rbwHz" })
            Assert.True(j.GetProperty("bandwidth").TryGetProperty(k, out _), k);
        foreach (string k in new[] { "depthPercent", "positivePeakPercent", "negativePeakPercent" })
            Assert.True(j.GetProperty("am").TryGetProperty(k, out _), k);
        foreach (string k in new[] { "peakDeviationHz", "positivePeakHz", "negativePeakHz", "rmsDeviationHz" })
            Assert.True(j.GetProperty("fm").TryGetProperty(k, out _), k);
        Assert.True(j.GetProperty("pm").TryGetProperty("peakDeviationRad", out _));
        foreach (string k in new[] { "shiftHz", "symbolRateBd", "toneFrequenciesHz" })
            Assert.True(j.GetProperty("fsk").TryGetProperty(k, out _), k);
        foreach (string k in new[] { "modulation", "modulatingFrequencyHz", "emissionDesignator" })
            Assert.True(j.TryGetProperty(k, out _), k);
        Assert.Equal(26, j.GetProperty("bandwidth").GetProperty("xdb").GetDouble());
    }

    [Fact]
    public void JSON_file_output_summary_and_bad_options()
    {
        using var tmp = new TempDir();
        string json = tmp.File("r.json");
        var (code, stdout, stderr) = CliRunner.Run("analyze", M("cw-462.sigmf-meta"), "--json", json);
        Assert.True(code == 0, stderr);
        Assert.Matches(@"(?m)^modulation +cw \(confidence", stdout);
        Assert.Contains("wrote", stdout);
        Assert.Equal(
            "cw",
            JsonDocument.Parse(File.ReadAllText(json)).RootElement.GetProperty("modulation").GetString()
        );
        Assert.Equal(2, CliRunner.Run("analyze", M("cw-462.sigmf-meta"), "--json", json).Code); // exists: needs --force
        Assert.Equal(2, CliRunner.Run("analyze", M("cw-462.sigmf-meta"), "--expect", "qam").Code);
        Assert.Equal(2, CliRunner.Run("analyze", M("cw-462.sigmf-meta"), "--obw-percent", "120").Code);
    }
}
