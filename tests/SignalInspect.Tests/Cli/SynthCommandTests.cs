using System.Text.Json;
using SignalInspect.Capture;

namespace SignalInspect.Tests.Cli;

public class SynthCommandTests
{
    [Theory]
    [InlineData("a.sigmf-meta", "SigMF")]
    [InlineData("a.sigmf", "SigMF archive")]
    [InlineData("a.wav", "WAV")]
    [InlineData("a.cs16", "raw")]
    public void Writes_each_container_and_info_reads_it_back(string file, string container)
    {
        using var tmp = new TempDir();
        string path = tmp.File(file);
        var (code, stdout, stderr) = CliRunner.Run(
            "synth",
            path,
            "--kind",
            "am",
            "--depth",
            "80",
            "--sample-rate",
            "96k",
            "--duration",
            "0.25",
            "--center-frequency",
            "1.53M",
            "--snr",
            "30"
        );
        Assert.True(code == 0, stderr);
        Assert.Contains("wrote", stdout);
        // The raw file is read back through the sidecar synth wrote beside it: no options needed.
        var (code2, json, err2) = CliRunner.Run("info", path, "--json");
        Assert.True(code2 == 0, err2);
        JsonElement j = JsonDocument.Parse(json).RootElement;
        Assert.Equal(container, j.GetProperty("container").GetString());
        Assert.Equal(96000, j.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(24000, j.GetProperty("samples").GetInt64());
        if (container != "WAV") // a WAV file has no place for it
            Assert.Equal(1.53e6, j.GetProperty("centerFrequencyHz").GetDouble());
    }

    [Fact]
    public void A_raw_capture_synth_wrote_is_analyzed_with_no_options_through_its_sidecar()
    {
        // Round trip of issue 25: `synth x.cu8` then `analyze x.cu8` alone. Without the sidecar the rate is
        // unknown (a refusal), so a pass here means the sidecar was read; the values are the synth's own.
        using var tmp = new TempDir();
        string path = tmp.File("x.cu8");
        var (code, _, stderr) = CliRunner.Run(
            "synth",
            path,
            "--kind",
            "fm",
            "--deviation",
            "2.5k",
            "--tone",
            "1k",
            "--sample-rate",
            "250k",
            "--center-frequency",
            "446.00625M",
            "--offset",
            "3k",
            "--duration",
            "0.5",
            "--snr",
            "40"
        );
        Assert.True(code == 0, stderr);
        Assert.True(File.Exists(path + CaptureFormats.SidecarSuffix));
        var (code2, json, err2) = CliRunner.Run("analyze", path, "--json", "-");
        Assert.True(code2 == 0, err2);
        JsonElement j = JsonDocument.Parse(json).RootElement;
        JsonElement cap = j.GetProperty("capture");
        Assert.Equal("cu8", cap.GetProperty("datatype").GetString());
        Assert.Equal(250000, cap.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(446.00625e6, cap.GetProperty("centerFrequencyHz").GetDouble());
        Assert.Contains(j.GetProperty("notes").EnumerateArray(), n => n.GetString()!.Contains("x.cu8.si.json"));
        Assert.Equal(3000, j.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 2.0);

        // An option given wins over the sidecar (the rate stated twice: the sidecar's is the one taken when
        // none is given, above).
        var (code3, json3, _) = CliRunner.Run("info", path, "--json", "--sample-rate", "125k");
        Assert.Equal(0, code3);
        Assert.Equal(125000, JsonDocument.Parse(json3).RootElement.GetProperty("sampleRateHz").GetDouble());
    }

    [Fact]
    public void Keyed_calls_from_synth_are_listed_and_judged_one_by_one()
    {
        // Issue 22: two calls (2.5 and 3.2 kHz deviation) with silence between, through the command line.
        // Expected values from the construction; the profile's 3 kHz limit fails on the second call only.
        using var tmp = new TempDir();
        string path = tmp.File("calls.cf32");
        var (code, _, stderr) = CliRunner.Run(
            "synth",
            path,
            "--kind",
            "fm",
            "--duration",
            "4",
            "--snr",
            "30",
            "--burst",
            "0.5:1.5",
            "--burst",
            "2.2:3.6:200:3200"
        );
        Assert.True(code == 0, stderr);
        string profile = tmp.File("p.json");
        File.WriteAllText(profile, """{"name": "3 kHz", "modulation": ["fm"], "maxPeakDeviationHz": 3000}""");
        var (code2, json, err2) = CliRunner.Run("analyze", path, "--limits", profile, "--json", "-");
        Assert.Equal(1, code2); // FAIL
        Assert.Contains("worst is transmission 2 of 2", err2); // the console summary goes to stderr with --json -
        JsonElement j = JsonDocument.Parse(json).RootElement;
        JsonElement[] tx = [.. j.GetProperty("transmissions").EnumerateArray()];
        Assert.Equal(2, tx.Length);
        Assert.Equal(2.2, tx[1].GetProperty("startS").GetDouble(), 0.01);
        Assert.Equal(3.6, tx[1].GetProperty("endS").GetDouble(), 0.01);
        Assert.Equal(200, tx[1].GetProperty("carrierOffsetHz").GetDouble(), 5.0);
        Assert.Equal(2500, tx[0].GetProperty("peakDeviationHz").GetDouble(), 50.0);
        Assert.Equal(3200, tx[1].GetProperty("peakDeviationHz").GetDouble(), 64.0);
        Assert.Equal(1, j.GetProperty("measuredTransmission").GetInt32()); // the longer call's figures lead
        JsonElement dev = j.GetProperty("checks")
            .EnumerateArray()
            .Single(c => c.GetProperty("measurement").GetString() == "FM peak deviation");
        Assert.Equal("FAIL", dev.GetProperty("verdict").GetString());
        Assert.Equal(1, dev.GetProperty("transmission").GetInt32());
        Assert.Equal("FAIL", j.GetProperty("verdict").GetString());
    }

    [Theory]
    [InlineData("2:1", "--burst")]
    [InlineData("1", "START:END")]
    public void A_bad_burst_is_refused_with_its_option(string value, string message)
    {
        using var tmp = new TempDir();
        var (code, _, stderr) = CliRunner.Run("synth", tmp.File("b.cf32"), "--burst", value);
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
        Assert.Empty(Directory.GetFiles(tmp.Path));
    }

    [Fact]
    public void Refuses_to_overwrite_without_force()
    {
        using var tmp = new TempDir();
        string path = tmp.File("x.cf32");
        File.WriteAllText(path, "keep me");
        var (code, _, stderr) = CliRunner.Run("synth", path);
        Assert.Equal(2, code);
        Assert.Contains("already exists (use --force", stderr);
        Assert.Equal("keep me", File.ReadAllText(path));
        Assert.Equal(0, CliRunner.Run("synth", path, "--force", "--duration", "0.01").Code);
        Assert.Equal(480 * 8, new FileInfo(path).Length);
    }

    [Theory]
    [InlineData("--amplitude", "2", "--amplitude: must be from 0 to 1")]
    [InlineData("--offset", "30k", "--offset: must lie inside")]
    [InlineData("--datatype", "cq8", "unknown datatype")]
    [InlineData("--key-up", "14k", "--key-up: '14k' is not two numbers as A:B")]
    [InlineData("--key-up", "14k:-1", "--key-up: needs a finite excursion")]
    public void Bad_parameters_exit_with_2_and_name_the_option(string option, string value, string message)
    {
        using var tmp = new TempDir();
        var (code, _, stderr) = CliRunner.Run("synth", tmp.File("y.cf32"), option, value);
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
        Assert.Empty(Directory.GetFiles(tmp.Path));
    }

    [Fact]
    public void Real_audio_output_is_a_mono_WAV()
    {
        using var tmp = new TempDir();
        string path = tmp.File("audio.wav");
        Assert.Equal(
            0,
            CliRunner
                .Run(
                    "synth",
                    path,
                    "--real",
                    "--kind",
                    "fm",
                    "--offset",
                    "6k",
                    "--datatype",
                    "ri16_le",
                    "--duration",
                    "0.1"
                )
                .Code
        );
        var (_, json, _) = CliRunner.Run("info", path, "--json");
        JsonElement j = JsonDocument.Parse(json).RootElement;
        Assert.False(j.GetProperty("isComplex").GetBoolean());
        Assert.Equal("ri16_le", j.GetProperty("datatype").GetString());
    }
}
