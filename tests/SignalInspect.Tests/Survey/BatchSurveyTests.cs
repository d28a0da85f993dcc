using System.Text.Json;

namespace SignalInspect.Tests.Survey;

/// <summary>
/// batch --survey (issue 24 item 4): one row per emission of each capture, measured as the survey measures it, a
/// capture without any emission one row saying so; a profile is refused (a survey does not know each emission's
/// assigned channel) and a survey option without --survey is refused; --resume keeps every row of a capture done.
/// Expected values from the construction: an FM carrier at -20 kHz and a carrier at +25 kHz 10 dB down.
/// </summary>
public class BatchSurveyTests
{
    private static string Folder(TempDir tmp)
    {
        string dir = tmp.File("field");
        Directory.CreateDirectory(dir);
        string[] common = ["--sample-rate", "100k", "--duration", "1", "--center-frequency", "155M"];
        Assert.Equal(
            0,
            CliRunner
                .Run([
                    "synth",
                    Path.Combine(dir, "two.sigmf"),
                    "--kind",
                    "fm",
                    "--offset",
                    "-20k",
                    "--snr",
                    "25",
                    .. common,
                    "--also",
                    "cw:25k:-10",
                ])
                .Code
        );
        Assert.Equal(0, CliRunner.Run(["synth", Path.Combine(dir, "quiet.sigmf"), "--kind", "noise", .. common]).Code);
        return dir;
    }

    private static JsonElement[] Rows(string outDir) =>
        [.. File.ReadAllLines(Path.Combine(outDir, "summary.jsonl")).Select(l => JsonDocument.Parse(l).RootElement)];

    [Fact]
    public void Each_emission_is_a_row_and_a_quiet_capture_one_row()
    {
        using var tmp = new TempDir();
        string dir = Folder(tmp),
            outDir = tmp.File("out");
        var (code, stdout, stderr) = CliRunner.Run("batch", dir, "--survey", "--out", outDir);
        Assert.True(code == 0, stderr);
        Assert.Contains("emissions             2 in 2 capture(s)", stdout);
        Assert.Contains("2 emission(s): fm, cw", stderr);
        JsonElement[] rows = Rows(outDir);
        Assert.Equal(3, rows.Length);
        JsonElement[] two = [.. rows.Where(r => r.GetProperty("file").GetString()!.EndsWith("two.sigmf"))];
        Assert.Equal([1L, 2L], two.Select(r => r.GetProperty("emission").GetInt64()));
        Assert.Equal(["fm", "cw"], two.Select(r => r.GetProperty("modulation").GetString()));
        Near.Equal(154.98e6, two[0].GetProperty("carrierFrequencyHz").GetDouble(), 1, "FM carrier");
        Near.Equal(155.025e6, two[1].GetProperty("carrierFrequencyHz").GetDouble(), 1, "CW carrier");
        Assert.All(two, r => Near.Equal(100, r.GetProperty("onAirPercent").GetDouble(), 1, "on air"));
        JsonElement quiet = Assert.Single(rows, r => r.GetProperty("file").GetString()!.EndsWith("quiet.sigmf"));
        Assert.Equal(JsonValueKind.Null, quiet.GetProperty("emission").ValueKind);
        Assert.Contains("no emission", quiet.GetProperty("warnings").GetString());
        string header = File.ReadLines(Path.Combine(outDir, "summary.csv")).First();
        Assert.StartsWith("file,status,emission,onAirPercent,", header);

        // Resume: the capture done keeps both its rows.
        var (again, resumed, err) = CliRunner.Run("batch", dir, "--survey", "--out", outDir, "--resume");
        Assert.True(again == 0, err);
        Assert.Contains("analysed 0, skipped 2", resumed);
        Assert.Equal(3, Rows(outDir).Length);
    }

    [Theory]
    [InlineData("--survey --limits PROFILE", "a survey lists every emission")]
    [InlineData("--channels 155M:12.5k:2", "a survey option; add --survey")]
    public void A_profile_or_a_lone_survey_option_is_refused(string args, string message)
    {
        using var tmp = new TempDir();
        string dir = Folder(tmp);
        string[] extra =
        [
            .. args.Split(' ').Select(a => a == "PROFILE" ? TestData.Repo("profiles", "land-mobile-12k5-vhf.json") : a),
        ];
        var (code, _, err) = CliRunner.Run(["batch", dir, "--out", tmp.File("out"), .. extra]);
        Assert.Equal(2, code);
        Assert.Contains(message, err);
        Assert.False(Directory.Exists(tmp.File("out")));
    }
}
