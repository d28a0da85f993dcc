using SignalInspect.Tests.Spectrum;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// <c>spectrum --csv</c> on captures SignalInspect did not write, against scipy.signal.welch run on
/// the same bytes decoded by numpy (testdata/spectrum/make_welch_refs.py, Debian python3-scipy 1.10.1).
/// </summary>
public class SpectrumCommandTests
{
    [Theory]
    [InlineData("sigmf/nbfm-ci16.sigmf-meta", "capture-nbfm-ci16-fft1024.csv", "1024")]
    [InlineData("raw/tone-100k-2048k.cu8", "capture-tone-100k-2048k-cu8-fft512.csv", "512")]
    [InlineData("wav/sox-mono-s16.wav", "capture-sox-mono-s16-fft128.csv", "128")]
    [InlineData("wav/sox-stereo-f32.wav", "capture-sox-stereo-f32-fft256.csv", "256")]
    public void CSV_agrees_with_scipy_within_0_05_dB_where_within_80_dB_of_the_peak(
        string capture,
        string reference,
        string fft
    )
    {
        using var tmp = new TempDir();
        string csv = tmp.File("psd.csv");
        string[] rate = capture.EndsWith(".cu8") ? ["--sample-rate", "2.048M"] : [];
        var (code, stdout, stderr) = CliRunner.Run([
            "spectrum",
            TestData.Path(capture.Split('/')),
            "--fft",
            fft,
            "--csv",
            csv,
            .. rate,
        ]);
        Assert.True(code == 0, stderr);
        Assert.Contains("wrote", stdout);
        Assert.Equal("frequencyHz,psdDbfsPerHz", File.ReadLines(csv).First());
        var (f, db) = WelchEstimatorTests.ReadCsv(csv);
        var (rf, rdb) = WelchEstimatorTests.ReadCsv(TestData.Path("spectrum", reference));
        Assert.Equal(rf.Length, f.Length);
        double peak = rdb.Max();
        int compared = 0;
        for (int i = 0; i < rf.Length; i++)
        {
            Near.Equal(rf[i], f[i], 1e-6, "frequency");
            if (rdb[i] < peak - 80)
                continue;
            Near.Equal(rdb[i], db[i], 0.05, $"PSD at {rf[i]} Hz");
            compared++;
        }
        Assert.True(compared >= 3, $"only {compared} bins within 80 dB of the peak");
    }

    [Fact]
    public void CSV_to_standard_output_with_dash_equals_the_file_and_the_summary_goes_to_stderr()
    {
        using var tmp = new TempDir();
        string csv = tmp.File("psd.csv");
        string capture = TestData.Path("sigmf", "cw-cf32.sigmf-meta");
        var (code, _, stderr) = CliRunner.Run("spectrum", capture, "--csv", csv);
        Assert.True(code == 0, stderr);
        string stdout;
        (code, stdout, stderr) = CliRunner.Run("spectrum", capture, "--csv", "-");
        Assert.True(code == 0, stderr);
        Assert.Equal(File.ReadAllText(csv), stdout);
        Assert.Contains("RBW", stderr);
        Assert.False(File.Exists("-"), "no file named '-'");
    }

    [Fact]
    public void PNG_is_written_and_existing_outputs_are_kept_without_force()
    {
        using var tmp = new TempDir();
        string png = tmp.File("s.png"),
            csv = tmp.File("s.csv");
        File.WriteAllText(csv, "old");
        string capture = TestData.Path("sigmf", "cw-cf32.sigmf-meta");
        var (code, _, stderr) = CliRunner.Run("spectrum", capture, "--csv", csv);
        Assert.Equal(2, code);
        Assert.Contains("already exists (use --force", stderr);
        Assert.Equal("old", File.ReadAllText(csv));
        (code, _, stderr) = CliRunner.Run("spectrum", capture, "--csv", csv, "--png", png, "--force");
        Assert.True(code == 0, stderr);
        byte[] head = File.ReadAllBytes(png)[..8];
        Assert.Equal(new byte[] { 0x89, (byte)'P', (byte)'N', (byte)'G', 0x0D, 0x0A, 0x1A, 0x0A }, head);
        Assert.NotEqual("old", File.ReadAllText(csv));
        Assert.Equal(2, Directory.GetFiles(tmp.Path).Length);
    }

    [Fact]
    public void Summary_reports_RBW_window_peak_and_DC_suppression()
    {
        var (code, stdout, _) = CliRunner.Run(
            "spectrum",
            TestData.Path("sigmf", "cw-cf32.sigmf-meta"),
            "--rbw",
            "100",
            "--window",
            "flattop",
            "--suppress-dc"
        );
        Assert.Equal(0, code);
        // flat-top ENBW 3.7702 bins x 250000 / 8192 = 115.06 Hz (the power of two nearest to the 100 Hz asked).
        Assert.Contains("FFT 8192", stdout);
        Assert.Contains("RBW                115.0", stdout);
        Assert.Contains("replaced by interpolation", stdout);
        Assert.Contains("144.391", stdout); // carrier at +1234.5 Hz from 144.39 MHz
    }

    [Theory]
    [InlineData("--window", "gaussian", "unknown window")]
    [InlineData("--fft", "8", "--fft")]
    [InlineData("--overlap", "99", "--overlap")]
    [InlineData("--fft", "1048576", "fewer than one FFT segment")]
    public void Bad_settings_exit_with_2(string option, string value, string message)
    {
        var (code, _, stderr) = CliRunner.Run("spectrum", TestData.Path("sigmf", "cw-cf32.sigmf-meta"), option, value);
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
    }
}
