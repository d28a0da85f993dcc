using System.Text.Json;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// Modulation limiting from a level series, steps found without a list, and the profile's response and sub-audible
/// tone limits (issue 26 items 3 and 4). Expected values from the construction: each burst's deviation is set, the
/// level series' deviation follows its input level (+20 dB per decade) until a 4 kHz ceiling. The limits here are
/// chosen for the tests, not a rule's.
/// </summary>
public class AudioLimitsTests
{
    private static JsonElement Analyze(TempDir tmp, string[] synth, params string[] analyze)
    {
        string path = tmp.File($"l{Guid.NewGuid():N}.sigmf");
        var (code, _, err) = CliRunner.Run(["synth", path, "--sample-rate", "24k", .. synth]);
        Assert.True(code == 0, err);
        var (c, json, e) = CliRunner.Run(["analyze", path, "--json", "-", .. analyze]);
        Assert.True(json.Length > 0, e);
        return JsonDocument.Parse(json).RootElement.Clone();
    }

    private static string Write(TempDir tmp, string name, string text)
    {
        string path = tmp.File(name);
        File.WriteAllText(path, text);
        return path;
    }

    /// <summary>Five steps at -20, -10, 0, +6, +12 dB: 300, 948.7, 3000 Hz (in proportion), then 4000 and 4000 (held):
    /// the compression 20 log10(4000 / (300 x 10^((L + 20) / 20))) at the last two (-3.50, -9.50 dB), 0 before;
    /// within 0.2 dB; the ceiling 4 kHz within 1 %.</summary>
    [Fact]
    public void A_level_series_shows_the_limiter()
    {
        using var tmp = new TempDir();
        double[] levels = [-20, -10, 0, 6, 12],
            dev = [300, 948.7, 3000, 4000, 4000];
        var synth = new List<string> { "--kind", "fm", "--duration", "6", "--snr", "30" };
        var list = new List<string>();
        for (int i = 0; i < 5; i++)
        {
            synth.AddRange(["--burst", FormattableString.Invariant($"{0.2 + 1.2 * i}:{1.0 + 1.2 * i}:0:{dev[i]}")]);
            list.Add(FormattableString.Invariant($"{0.2 + 1.2 * i},{1.0 + 1.2 * i},1k,{levels[i]}"));
        }
        string steps = Write(tmp, "levels.txt", "# start, end, tone, level dB\n" + string.Join("\n", list));
        JsonElement r = Analyze(tmp, [.. synth], "--steps", steps).GetProperty("response");
        JsonElement[] s = [.. r.GetProperty("steps").EnumerateArray()];
        for (int i = 0; i < 5; i++)
        {
            double expected = 20 * Math.Log10(dev[i] / (300 * Math.Pow(10, (levels[i] + 20) / 20)));
            Near.Equal(expected, s[i].GetProperty("compressionDb").GetDouble(), 0.2, $"compression at {levels[i]} dB");
            Assert.Equal(levels[i], s[i].GetProperty("levelDb").GetDouble());
        }
        Assert.Equal(-20, r.GetProperty("referenceLevelDb").GetDouble());
        Near.Equal(4000, r.GetProperty("limitAmount").GetDouble(), 40, "limiter ceiling");
    }

    private static string[] Series(bool preEmphasised, double gapS)
    {
        double[] tones = [300, 1000, 3000, 500];
        var a = new List<string> { "--kind", "fm", "--duration", "7", "--snr", "35" };
        for (int i = 0; i < tones.Length; i++)
        {
            double start = 0.3 + i * (1.2 + gapS),
                d = preEmphasised ? tones[i] : 1500;
            a.AddRange(["--burst", FormattableString.Invariant($"{start}:{start + 1.2}:0:{d}:{tones[i]}")]);
        }
        return [.. a];
    }

    /// <summary>Without a list, each transmission (carrier off 0.5 s between) is a step: the pre-emphasised series
    /// reads the curve 20 log10(f / 1 kHz) within 0.3 dB.</summary>
    [Fact]
    public void Transmissions_are_the_steps_without_a_list()
    {
        using var tmp = new TempDir();
        JsonElement r = Analyze(tmp, Series(true, 0.5), "--steps", "auto").GetProperty("response");
        JsonElement[] s = [.. r.GetProperty("steps").EnumerateArray()];
        Assert.Equal(4, s.Length);
        foreach (JsonElement step in s)
            Near.Equal(
                step.GetProperty("preEmphasisDb").GetDouble(),
                step.GetProperty("responseDb").GetDouble(),
                0.3,
                "response against the curve"
            );
    }

    /// <summary>One transmission whose tone steps every second without a gap: pre-emphasised (deviation in proportion
    /// to the tone) the steps are found by the change of deviation and read the curve within 0.3 dB; flat (one
    /// deviation for every tone) no step shows and no response is given, with the reason.</summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void Steps_without_a_gap_are_found_by_their_deviation(bool preEmphasised)
    {
        using var tmp = new TempDir();
        double[] tones = [300, 1000, 3000, 500, 2000];
        var synth = new List<string> { "--kind", "fm", "--duration", "5", "--snr", "35" };
        for (int i = 0; i < tones.Length; i++)
        {
            double d = preEmphasised ? tones[i] : 1500;
            synth.AddRange(["--burst", FormattableString.Invariant($"{i}:{i + 1}:0:{d}:{tones[i]}")]);
        }
        JsonElement r = Analyze(tmp, [.. synth], "--steps", "auto").GetProperty("response");
        JsonElement[] s = [.. r.GetProperty("steps").EnumerateArray()];
        if (!preEmphasised)
        {
            Assert.Empty(s);
            Assert.Contains("no steps found", r.GetProperty("notTested").GetString());
            return;
        }
        Assert.Equal(tones.Length, s.Length);
        for (int i = 0; i < tones.Length; i++)
            Near.Equal(20 * Math.Log10(tones[i] / 1000), s[i].GetProperty("responseDb").GetDouble(), 0.3, "response");
    }

    /// <summary>A response limit of +1 / -3 dB about the pre-emphasis curve: the pre-emphasised series passes, a flat
    /// one (10.5 dB above the curve at 300 Hz) fails; without a series the limit is NOT TESTED.</summary>
    [Theory]
    [InlineData(true, "PASS")]
    [InlineData(false, "FAIL")]
    public void The_response_is_judged_against_its_tolerance(bool preEmphasised, string verdict)
    {
        using var tmp = new TempDir();
        string profile = Write(
            tmp,
            "response.json",
            "{ \"name\": \"response test\", \"source\": \"chosen for the test\", \"audio\": { \"responseAboveDb\": 1, "
                + "\"responseBelowDb\": 3, \"responseCurve\": \"pre-emphasis\" } }"
        );
        JsonElement root = Analyze(tmp, Series(preEmphasised, 0.5), "--steps", "auto", "--limits", profile);
        JsonElement check = root.GetProperty("checks")
            .EnumerateArray()
            .Single(c => c.GetProperty("measurement").GetString() == "audio response");
        Assert.Equal(verdict, check.GetProperty("verdict").GetString());
        JsonElement none = Analyze(tmp, ["--kind", "fm", "--snr", "35"], "--limits", profile)
            .GetProperty("checks")
            .EnumerateArray()
            .Single(c => c.GetProperty("measurement").GetString() == "audio response");
        Assert.Equal("NOT TESTED", none.GetProperty("verdict").GetString());
        Assert.Contains("no tone series", none.GetProperty("reason").GetString());
    }

    /// <summary>A sub-audible tone limit of 0.5 % of the listed tone: 118.8 Hz passes; 119.6 Hz (0.67 % off, still
    /// matched to 118.8 within the 1 % match) fails.</summary>
    [Theory]
    [InlineData("118.8", "PASS")]
    [InlineData("119.6", "FAIL")]
    public void The_sub_audible_tone_is_held_to_its_listed_frequency(string hz, string verdict)
    {
        using var tmp = new TempDir();
        string profile = Write(
            tmp,
            "tone.json",
            "{ \"name\": \"tone test\", \"source\": \"chosen for the test\", \"audio\": { "
                + "\"subAudibleTolerancePercent\": 0.5 } }"
        );
        string[] synth = ["--kind", "fm", "--deviation", "2k", "--add-tone", hz + ":600", "--duration", "3"];
        JsonElement check = Analyze(tmp, [.. synth, "--snr", "40"], "--limits", profile)
            .GetProperty("checks")
            .EnumerateArray()
            .Single(c => c.GetProperty("measurement").GetString() == "sub-audible tone frequency");
        Assert.Equal(verdict, check.GetProperty("verdict").GetString());
    }

    /// <summary>A bad response curve in a profile is refused with one line naming the field.</summary>
    [Fact]
    public void A_bad_curve_is_refused()
    {
        using var tmp = new TempDir();
        string profile = Write(
            tmp,
            "bad.json",
            "{ \"name\": \"bad\", \"audio\": { \"responseAboveDb\": 1, \"responseBelowDb\": 3, "
                + "\"responseCurve\": \"loudness\" } }"
        );
        string path = tmp.File("c.sigmf");
        Assert.Equal(0, CliRunner.Run("synth", path, "--kind", "fm").Code);
        var (code, _, err) = CliRunner.Run("analyze", path, "--limits", profile);
        Assert.Equal(2, code);
        Assert.Contains("audio.responseCurve", err);
    }

    /// <summary>The report of a tone series carries one plot more (the response against its curve and tolerance) and
    /// the response check's row.</summary>
    [Fact]
    public void The_report_plots_the_response()
    {
        using var tmp = new TempDir();
        string path = tmp.File("series.sigmf");
        Assert.Equal(0, CliRunner.Run(["synth", path, "--sample-rate", "24k", .. Series(true, 0.5)]).Code);
        string profile = Write(
            tmp,
            "response.json",
            "{ \"name\": \"response test\", \"source\": \"chosen for the test\", \"audio\": { \"responseAboveDb\": 1, "
                + "\"responseBelowDb\": 3 } }"
        );
        int Images(string pdf, params string[] extra)
        {
            var (code, _, err) = CliRunner.Run(["analyze", path, "--report", pdf, "--limits", profile, .. extra]);
            Assert.True(code is 0 or 1 or 4, err); // 4: a limit not shown (NOT TESTED)
            using var doc = UglyToad.PdfPig.PdfDocument.Open(pdf);
            if (extra.Length > 0)
                Assert.Contains(
                    "audio response",
                    string.Join(" ", doc.GetPages().SelectMany(p => p.GetWords()).Select(w => w.Text))
                );
            return doc.GetPages().Sum(p => p.GetImages().Count());
        }
        Assert.Equal(Images(tmp.File("plain.pdf")) + 1, Images(tmp.File("steps.pdf"), "--steps", "auto"));
    }
}
