namespace SignalInspect.Tests.Cli;

/// <summary>Help text (issue 25 item 6): each default is shown once, and none depends on the machine.</summary>
public class HelpTests
{
    [Theory]
    [InlineData("info")]
    [InlineData("spectrum")]
    [InlineData("analyze")]
    [InlineData("survey")]
    [InlineData("synth")]
    [InlineData("batch")]
    [InlineData("demo")]
    public void Defaults_are_shown_once_and_never_the_machines(string command)
    {
        var (code, help, _) = CliRunner.Run(command, "--help");
        Assert.Equal(0, code);
        foreach (string line in help.Split('\n'))
        {
            int at = line.IndexOf("[default:", StringComparison.Ordinal);
            if (at < 0)
                continue;
            Assert.DoesNotContain("default", line[..at], StringComparison.OrdinalIgnoreCase);
            // One per core is this machine's count: it must not print as a default.
            if (line.TrimStart().StartsWith("--jobs", StringComparison.Ordinal) || line.Contains("--threads"))
                Assert.Fail($"a machine-dependent default is printed: {line.Trim()}");
        }
    }

    /// <summary>Issue 25 item 6: the merge subcommand's usage line showed batch's own arguments before it.</summary>
    [Fact]
    public void The_merge_usage_line_is_right()
    {
        var (code, help, _) = CliRunner.Run("batch", "merge", "--help");
        Assert.Equal(0, code);
        Assert.Contains(" batch merge <dirs>... [options]", help);
        Assert.DoesNotContain("<inputs>... merge", help);
    }

    private static HashSet<string> Options(string command) =>
        [
            .. System
                .Text.RegularExpressions.Regex.Matches(CliRunner.Run(command, "--help").Out, @"(?m)^\s+(--[a-z-]+)")
                .Select(m => m.Groups[1].Value),
        ];

    /// <summary>Issue 25 item 3: batch measures a folder the way analyze measures a file: every measurement option
    /// of analyze is offered by batch (the report-only and output options of one file aside).</summary>
    [Fact]
    public void Batch_offers_every_measurement_option_of_analyze()
    {
        string[] oneFile = ["--json", "--report", "--title", "--operator", "--equipment", "--notes", "--conditions"];
        // A step list's times belong to one capture.
        string[] oneFileToo = ["--paper", "--steps"];
        HashSet<string> analyze = Options("analyze"),
            batch = Options("batch");
        Assert.Contains("--rbw", analyze);
        Assert.Empty(analyze.Except(batch).Except(oneFile).Except(oneFileToo));
    }

    /// <summary>The spectrum options analyze offers are applied (--overlap and --calibration were accepted and
    /// ignored), and batch applies the measurement options as analyze does.</summary>
    [Fact]
    public void Measurement_options_take_effect_in_analyze_and_batch()
    {
        string capture = TestData.Path("measure", "nbfm-151625.sigmf-meta");
        var (code, json, err) = CliRunner.Run(
            "analyze",
            capture,
            "--overlap",
            "75",
            "--calibration",
            "-30",
            "--nominal",
            "151.6255M",
            "--json",
            "-"
        );
        Assert.True(code == 0, err);
        var a = System.Text.Json.JsonDocument.Parse(json).RootElement;
        Assert.Equal(75, a.GetProperty("method").GetProperty("overlapPercent").GetDouble(), 6);
        Assert.Equal(-30, a.GetProperty("method").GetProperty("calibrationDb").GetDouble(), 6);
        // 151625350 Hz against a nominal of 151625500 Hz (testdata/MANIFEST.md): -150 Hz.
        Assert.Equal(-150, a.GetProperty("carrier").GetProperty("offsetHz").GetDouble(), 0);
        using var tmp = new TempDir();
        string dir = tmp.File("in");
        Directory.CreateDirectory(dir);
        File.Copy(capture, Path.Combine(dir, "x.sigmf-meta"));
        File.Copy(Path.ChangeExtension(capture, ".sigmf-data"), Path.Combine(dir, "x.sigmf-data"));
        (code, _, err) = CliRunner.Run("batch", dir, "--out", tmp.File("out"), "--nominal", "151.6255M");
        Assert.True(code == 0, err);
        var rec = System.Text.Json.JsonDocument.Parse(
            File.ReadAllLines(Path.Combine(tmp.File("out"), "summary.jsonl"))[0]
        );
        Assert.Equal(-150, rec.RootElement.GetProperty("offsetHz").GetDouble(), 0);
    }
}
