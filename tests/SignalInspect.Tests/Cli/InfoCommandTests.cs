using System.Text.Json;

namespace SignalInspect.Tests.Cli;

/// <summary><c>info --json</c> on captures SignalInspect did not write (sox, numpy; testdata/MANIFEST.md).</summary>
public class InfoCommandTests
{
    private static JsonElement InfoJson(params string[] args)
    {
        var (code, stdout, stderr) = CliRunner.Run(["info", .. args, "--json"]);
        Assert.True(code == 0, stderr);
        return JsonDocument.Parse(stdout).RootElement;
    }

    [Fact]
    public void Mono_16_bit_WAV_from_sox()
    {
        JsonElement j = InfoJson(TestData.Path("wav", "sox-mono-s16.wav"));
        Assert.Equal(8000, j.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(JsonValueKind.Null, j.GetProperty("centerFrequencyHz").ValueKind);
        Assert.False(j.GetProperty("isComplex").GetBoolean());
        Assert.Equal(400, j.GetProperty("samples").GetInt64());
        Assert.Equal(0.05, j.GetProperty("durationS").GetDouble(), 12);
        Assert.Equal("ri16_le", j.GetProperty("datatype").GetString());
        Assert.Equal(1, j.GetProperty("channels").GetInt32());
    }

    [Fact]
    public void Stereo_float_IQ_WAV_from_sox_with_a_centre_given()
    {
        JsonElement j = InfoJson(TestData.Path("wav", "sox-stereo-f32.wav"), "--center-frequency", "7.1M");
        Assert.Equal(48000, j.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(7.1e6, j.GetProperty("centerFrequencyHz").GetDouble());
        Assert.True(j.GetProperty("isComplex").GetBoolean());
        Assert.Equal(960, j.GetProperty("samples").GetInt64());
        Assert.Equal("cf32_le", j.GetProperty("datatype").GetString());
        Assert.Equal(2, j.GetProperty("channels").GetInt32());
        Assert.Contains("--center-frequency", j.GetProperty("notes")[0].GetString());
    }

    [Fact]
    public void Raw_cu8_with_options()
    {
        JsonElement j = InfoJson(
            TestData.Path("raw", "tone-100k-2048k.cu8"),
            "--sample-rate",
            "2.048M",
            "--center-frequency",
            "433.92M"
        );
        Assert.Equal(2.048e6, j.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(433.92e6, j.GetProperty("centerFrequencyHz").GetDouble());
        Assert.Equal(8192, j.GetProperty("samples").GetInt64());
        Assert.Equal("cu8", j.GetProperty("datatype").GetString());
        Assert.Equal(8192 / 2.048e6, j.GetProperty("durationS").GetDouble(), 12);
    }

    [Theory]
    [InlineData("nbfm-ci16.sigmf-meta", 48000, 462562500, 9600, "ci16_le")]
    [InlineData("cw-cf32.sigmf-meta", 250000, 144390000, 25000, "cf32_le")]
    [InlineData("wbfm-archive.sigmf", 48000, 151820000, 4800, "cf32_le")]
    public void SigMF_recordings(string file, double rate, double centre, long samples, string datatype)
    {
        JsonElement j = InfoJson(TestData.Path("sigmf", file));
        Assert.Equal(rate, j.GetProperty("sampleRateHz").GetDouble());
        Assert.Equal(centre, j.GetProperty("centerFrequencyHz").GetDouble());
        Assert.Equal(samples, j.GetProperty("samples").GetInt64());
        Assert.Equal(datatype, j.GetProperty("datatype").GetString());
        Assert.True(j.GetProperty("isComplex").GetBoolean());
        Assert.Equal("verified", j.GetProperty("checksum").GetString());
    }

    [Fact]
    public void Multi_capture_SigMF_lists_segments_and_reads_the_one_picked()
    {
        JsonElement all = InfoJson(TestData.Path("sigmf", "multi-ci8.sigmf-meta"));
        Assert.Equal(JsonValueKind.Null, all.GetProperty("centerFrequencyHz").ValueKind);
        Assert.Equal(3, all.GetProperty("segments").GetArrayLength());
        Assert.Equal(2, all.GetProperty("annotations").GetArrayLength());
        JsonElement one = InfoJson(TestData.Path("sigmf", "multi-ci8.sigmf-meta"), "--segment", "2");
        Assert.Equal(434.1e6, one.GetProperty("centerFrequencyHz").GetDouble());
        Assert.Equal(1500, one.GetProperty("samples").GetInt64());
        Assert.Equal(2, one.GetProperty("segment").GetInt32());
    }

    [Fact]
    public void Text_output_names_the_essentials()
    {
        var (code, stdout, _) = CliRunner.Run("info", TestData.Path("sigmf", "nbfm-ci16.sigmf-meta"));
        Assert.Equal(0, code);
        Assert.Contains("sample rate        48000 Hz", stdout);
        Assert.Contains("centre frequency   462562500 Hz", stdout);
        Assert.Contains("'FM voice'", stdout);
    }

    [Fact]
    public void Help_explains_the_commands_and_options()
    {
        var (code, stdout, _) = CliRunner.Run("--help");
        Assert.Equal(0, code);
        Assert.Contains("info", stdout);
        Assert.Contains("synth", stdout);
        Assert.Contains("Exit codes", stdout);
        Assert.Contains("SIGNALINSPECT_NO_MAP=1", stdout);
        (code, stdout, _) = CliRunner.Run("info", "--help");
        Assert.Equal(0, code);
        Assert.Contains("--sample-rate", stdout);
        Assert.Contains("--datatype", stdout);
    }
}
