using System.Text.Json;
using SignalInspect.Compliance;
using SignalInspect.Measure;
using SignalInspect.Synthesis;
using SignalInspect.Tests.Measure;

namespace SignalInspect.Tests.Compliance;

/// <summary>
/// No verdict without evidence: every limit of a profile gets PASS, FAIL, INCONCLUSIVE or NOT TESTED with
/// a reason, and the overall verdict is PASS only when every limit was tested and passed (the kind of
/// statement of conformity ILAC-G8:09/2019 asks to be explicit about: a limit not tested is not met).
/// </summary>
public class EvidenceTests
{
    private static string ProfilePath(string name) => TestData.Repo("profiles", name);

    private static LimitProfile LandMobile => LimitProfile.Load(ProfilePath("land-mobile-12k5-vhf.json"));

    /// <summary>Issue 23: a profile states the RF range it is for; a carrier outside it cannot PASS, and each check
    /// cites its own limit's paragraph.</summary>
    [Fact]
    public void A_carrier_outside_the_profile_range_is_not_a_pass_and_checks_cite_their_paragraph()
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            PeakDeviationHz = 2000,
            SampleRateHz = 48000,
            DurationS = 1,
            CenterFrequencyHz = 155.3125e6,
            SnrDb = 40,
        };
        AnalysisResult inside = Measuring.Analyze(tmp, spec);
        IReadOnlyList<LimitCheck> checks = Judgement.Check(inside, LandMobile);
        LimitCheck range = Assert.Single(checks, c => c.Measurement.Contains("frequency range"));
        Assert.Equal(Verdict.Pass, range.Verdict);
        Assert.Contains(
            "90.213(a) Table 1, 150-174 MHz, mobile",
            Assert.Single(checks, c => c.Measurement.StartsWith("carrier frequency error")).Basis
        );
        Assert.Contains("common practice", Assert.Single(checks, c => c.Measurement == "FM peak deviation").Basis);
        AnalysisResult outside = Measuring.Analyze(tmp, spec with { CenterFrequencyHz = 146.52e6 });
        checks = Judgement.Check(outside, LandMobile);
        range = Assert.Single(checks, c => c.Measurement.Contains("frequency range"));
        Assert.Equal(Verdict.Inconclusive, range.Verdict);
        Assert.Contains("lies outside the range", range.Reason);
        Assert.NotEqual(Verdict.Pass, Judgement.Overall(checks));
    }

    [Fact]
    public void An_AM_transmitter_judged_by_an_FM_profile_is_not_a_pass()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Am,
                AmDepth = 0.8,
                SampleRateHz = 48000,
                DurationS = 1,
                CenterFrequencyHz = 155.3125e6,
                SnrDb = 40,
            }
        );
        Assert.Equal(ModulationKind.Am, r.Classification.Kind);
        IReadOnlyList<LimitCheck> checks = Judgement.Check(r, LandMobile);
        LimitCheck cls = Assert.Single(checks, c => c.Measurement == "modulation class");
        Assert.Equal(Verdict.Inconclusive, cls.Verdict);
        Assert.Contains("classed am", cls.Reason);
        LimitCheck dev = Assert.Single(checks, c => c.Measurement == "FM peak deviation");
        Assert.Equal(Verdict.NotTested, dev.Verdict);
        Assert.Contains("does not apply to the class found (am)", dev.Reason);
        Assert.NotEqual(Verdict.Pass, Judgement.Overall(checks));
        // The deviation limit is named even though nothing could be read against it.
        Assert.Equal(9, checks.Count); // class, range, tolerance, deviation, OBW, transient t1 t2 t3, mask
    }

    [Fact]
    public void No_signal_leaves_every_limit_not_tested_with_its_reason_and_exit_code_4()
    {
        using var tmp = new TempDir();
        string path = tmp.File("quiet.sigmf");
        Synthesizer.Write(
            new SignalSpec
            {
                Kind = SignalKind.Noise,
                SampleRateHz = 48000,
                DurationS = 1,
                Amplitude = 0.01,
                CenterFrequencyHz = 155.3125e6,
            },
            path,
            SignalInspect.Capture.SampleFormat.Parse("cf32_le")
        );
        string report = tmp.File("quiet.pdf");
        var (code, stdout, stderr) = CliRunner.Run(
            "analyze",
            path,
            "--limits",
            ProfilePath("land-mobile-12k5-vhf.json"),
            "--report",
            report
        );
        Assert.True(code == 4, stderr);
        Assert.Matches(@"(?m)^verdict +NOT TESTED$", stdout);
        Assert.Contains("NOT TESTED    FM peak deviation: limit <= 2500 Hz: no signal was found", stdout);
        JsonElement model = JsonDocument.Parse(File.ReadAllText(Path.ChangeExtension(report, ".json"))).RootElement;
        Assert.Equal("NOT TESTED", model.GetProperty("verdict").GetString());
        foreach (JsonElement c in model.GetProperty("checks").EnumerateArray())
        {
            Assert.Equal("NOT TESTED", c.GetProperty("verdict").GetString());
            Assert.StartsWith("no signal was found", c.GetProperty("reason").GetString());
        }
    }

    [Fact]
    public void The_overall_verdict_is_pass_only_when_every_limit_passed()
    {
        LimitCheck Of(Verdict v) => new("x", 1, "Hz", 0.1, 2, "<= 2 Hz", 1, v, "test");
        Assert.Equal(Verdict.Pass, Judgement.Overall([Of(Verdict.Pass), Of(Verdict.Pass)]));
        Assert.Equal(Verdict.NotTested, Judgement.Overall([Of(Verdict.Pass), Of(Verdict.NotTested)]));
        Assert.Equal(Verdict.Inconclusive, Judgement.Overall([Of(Verdict.NotTested), Of(Verdict.Inconclusive)]));
        Assert.Equal(Verdict.Fail, Judgement.Overall([Of(Verdict.Inconclusive), Of(Verdict.Fail)]));
        Assert.Equal(Verdict.NotTested, Judgement.Overall([])); // a profile with no limit shows nothing
    }

    [Fact]
    public void A_profile_names_its_modulation_strictly()
    {
        var e = Assert.Throws<ProfileException>(() => LimitProfile.Parse("{\"name\": \"x\", \"modulation\": \"fmx\"}"));
        Assert.Contains("modulation 'fmx' is not one of", e.Message);
        Assert.Equal(
            [ModulationKind.Fm, ModulationKind.Fsk],
            LimitProfile.Parse("{\"name\": \"x\", \"modulation\": [\"fm\", \"FSK\"]}").Modulation
        );
    }

    [Fact]
    public void Analyze_with_limits_writes_the_checks_and_the_verdict_in_its_JSON()
    {
        var (code, stdout, stderr) = CliRunner.Run(
            "analyze",
            TestData.Path("measure", "nbfm-151625.sigmf-meta"),
            "--limits",
            ProfilePath("land-mobile-12k5-vhf.json"),
            "--json",
            "-"
        );
        Assert.True(code == 4, stderr); // the deviation is INCONCLUSIVE (ReportTests)
        JsonElement j = JsonDocument.Parse(stdout).RootElement;
        Assert.Equal("INCONCLUSIVE", j.GetProperty("verdict").GetString());
        JsonElement[] checks = [.. j.GetProperty("checks").EnumerateArray()];
        Assert.Equal(9, checks.Length); // class, range, tolerance, deviation, OBW, transient t1 t2 t3, mask
        Assert.Contains(checks, c =>
            c.GetProperty("verdict").GetString() == "INCONCLUSIVE"
            && c.GetProperty("measurement").GetString() == "FM peak deviation"
        );
        Assert.Equal("fm", j.GetProperty("modulation").GetString()); // the analysis's own keys are all still there
    }
}
