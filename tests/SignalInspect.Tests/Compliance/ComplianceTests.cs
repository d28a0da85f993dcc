using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Measure;

namespace SignalInspect.Tests.Compliance;

public class ComplianceTests
{
    [Theory]
    // 47 CFR 90.210(d) mask D [R]; checks [D] from testdata/REFERENCE-VALUES.md: fd 10 kHz -> 51.76 dB, 12.5 kHz ->
    // 69.94 dB.
    [InlineData(3000, 0)]
    [InlineData(5625, 0)]
    [InlineData(10000, 51.7624)]
    [InlineData(12500, 69.9374)]
    [InlineData(-10000, 51.7624)]
    [InlineData(20000, 70)]
    public void Mask_D_follows_90_210_d(double offsetHz, double db)
    {
        var mask = new EmissionMask { Name = "D", Rule = "47cfr90.210d" };
        Near.Equal(db, mask.RequiredAttenuationDb(offsetHz), 1e-3, $"{offsetHz} Hz");
    }

    [Fact]
    public void Mask_D_floor_uses_the_transmitter_power_when_given()
    {
        // 50 + 10 log10(5 W) = 56.99 dB, below the 70 dB cap.
        var mask = new EmissionMask
        {
            Name = "D",
            Rule = "47cfr90.210d",
            TransmitterPowerW = 5,
        };
        Near.Equal(56.9897, mask.RequiredAttenuationDb(30000), 1e-3);
    }

    [Fact]
    public void Point_masks_interpolate_and_hold()
    {
        var mask = new EmissionMask { Name = "p", Points = [(1000, 0), (2000, 20), (4000, 60)] };
        Assert.Equal(10, mask.RequiredAttenuationDb(1500));
        Assert.Equal(60, mask.RequiredAttenuationDb(9000));
    }

    [Theory]
    // Guarded acceptance with w = U (common practice, a rule of the kind ILAC-G8:09/2019 describes).
    [InlineData(2400, 50, 2500, Verdict.Pass)]
    [InlineData(2450, 50, 2500, Verdict.Pass)]
    [InlineData(2480, 50, 2500, Verdict.Inconclusive)]
    [InlineData(2530, 50, 2500, Verdict.Inconclusive)]
    [InlineData(2551, 50, 2500, Verdict.Fail)]
    public void The_guard_band_is_the_expanded_uncertainty(double value, double u, double limit, Verdict verdict) =>
        Assert.Equal(verdict, Judgement.UpperVerdict(value, u, limit));

    [Fact]
    public void Overall_verdict_is_the_worst()
    {
        LimitCheck C(Verdict v) => new("x", 1, "Hz", 0, 2, "<= 2", 1, v, "");
        Assert.Equal(Verdict.Fail, Judgement.Overall([C(Verdict.Pass), C(Verdict.Fail), C(Verdict.Inconclusive)]));
        Assert.Equal(Verdict.Inconclusive, Judgement.Overall([C(Verdict.Pass), C(Verdict.Inconclusive)]));
        Assert.Equal(Verdict.Pass, Judgement.Overall([C(Verdict.Pass)]));
    }

    [Fact]
    public void Shipped_profiles_parse()
    {
        string dir = Path.Combine(Path.GetDirectoryName(TestData.Path("x"))!, "..", "profiles");
        string[] files = Directory.GetFiles(dir, "*.json");
        Assert.True(files.Length >= 5);
        foreach (string f in files)
            Assert.False(string.IsNullOrWhiteSpace(LimitProfile.Load(f).Name));
        LimitProfile vhf = LimitProfile.Load(Path.Combine(dir, "land-mobile-12k5-vhf.json"));
        Assert.Equal(2500, vhf.MaxPeakDeviationHz);
        Assert.Equal("47cfr90.210d", vhf.Mask!.Rule);
        // Station classes, 47 CFR 90.213(a) Table 1 (text read; testdata/REFERENCE-VALUES.md [R]): 150-174 MHz mobile
        // stations 5 ppm, fixed and base stations with 12.5 kHz channels 2.5 ppm (footnote 5); 421-512 MHz fixed and
        // base stations with 12.5 kHz channels 1.5 ppm (footnote 7), mobile 12.5 kHz 2.5 ppm (footnote 8, from
        // memory). The handheld profile had the base stations' figure.
        Assert.Equal(5, vhf.FrequencyTolerancePpm);
        Assert.Equal(2.5, LimitProfile.Load(Path.Combine(dir, "land-mobile-12k5-vhf-base.json")).FrequencyTolerancePpm);
        Assert.Equal(1.5, LimitProfile.Load(Path.Combine(dir, "land-mobile-12k5-uhf.json")).FrequencyTolerancePpm);
        Assert.Equal(
            2.5,
            LimitProfile.Load(Path.Combine(dir, "land-mobile-12k5-uhf-mobile.json")).FrequencyTolerancePpm
        );
        Assert.Equal((150e6, 174e6), vhf.FrequencyRangeHz);
        Assert.Contains("90.213(a) Table 1", vhf.SourceOf("frequencyTolerance"));
        // Every limit of the land-mobile profiles names its own paragraph, or says it is from memory or practice.
        foreach (string f in files.Where(f => Path.GetFileName(f).StartsWith("land-mobile")))
        {
            LimitProfile p = LimitProfile.Load(f);
            foreach (string field in new[] { "frequencyTolerance", "maxPeakDeviationHz", "maxOccupiedBandwidthHz" })
                Assert.True(p.Sources.ContainsKey(field), $"{Path.GetFileName(f)}: {field} has no source");
        }
    }

    [Theory]
    [InlineData("{\"maxPeakDeviationHz\": 2500}", "name is missing")]
    [InlineData("{\"name\": \"x\", \"maxPeakDeviationHz\": \"2.5k\"}", "maxPeakDeviationHz must be a number")]
    [InlineData("{\"name\": \"x\", \"maxPeakDeviationHz\": -1}", "maxPeakDeviationHz must be a positive number")]
    [InlineData("{\"name\": \"x\", \"frequencyTolerance\": {}}", "frequencyTolerance needs")]
    [InlineData("{\"name\": \"x\", \"mask\": {\"rule\": \"90.210z\"}}", "mask.rule '90.210z' is not a known rule")]
    [InlineData(
        "{\"name\": \"x\", \"mask\": {\"points\": [[1000, 0], [500, 10]]}}",
        "mask.points[1] offsets must be 0 or more and ascending"
    )]
    [InlineData("{\"name\": \"x\", \"maxDeviation\": 2500}", "maxDeviation is not a profile field")]
    [InlineData(
        "{\"name\": \"x\", \"am\": {\"maxPositivePeakPercent\": true}}",
        "am.maxPositivePeakPercent must be a number"
    )]
    // Issue 27: misspelt nested keys dropped their limit silently (a PASS with no checks), contradictory
    // tolerances and a negative mask attenuation were taken.
    [InlineData(
        "{\"name\": \"x\", \"am\": {\"maxPositivePeakPercnt\": 125}}",
        "am.maxPositivePeakPercnt is not a field of am"
    )]
    [InlineData(
        "{\"name\": \"x\", \"mask\": {\"rule\": \"47cfr90.210d\", \"refBandwidthHz\": 300}}",
        "mask.refBandwidthHz is not a field of mask"
    )]
    [InlineData(
        "{\"name\": \"x\", \"frequencyTolerance\": {\"ppm\": 2.5, \"ppb\": 2500}}",
        "frequencyTolerance.ppb is not a field"
    )]
    [InlineData("{\"name\": \"x\", \"frequencyTolerance\": {\"ppm\": 2.5, \"hz\": 400}}", "not both")]
    [InlineData(
        "{\"name\": \"x\", \"mask\": {\"points\": [[0, 0], [10000, -20]]}}",
        "mask.points[1] the attenuation must be 0 dB or more"
    )]
    [InlineData(
        "{\"name\": \"x\", \"transient\": {\"t1Ms\": 5, \"t1MaxHz\": 1, \"t2Ms\": 5, \"t2MaxHz\": 1, "
            + "\"t3Ms\": 5, \"t3MaxHz\": 1, \"t4Ms\": 3}}",
        "transient.t4Ms is not a field of transient"
    )]
    // Issue 23: a malformed frequency range, a source for an unknown or absent limit.
    [InlineData(
        "{\"name\": \"x\", \"frequencyRangeHz\": [174e6, 150e6]}",
        "frequencyRangeHz must be [lowest, highest]"
    )]
    [InlineData("{\"name\": \"x\", \"frequencyRangeHz\": \"150-174M\"}", "frequencyRangeHz must be [lowest, highest]")]
    [InlineData(
        "{\"name\": \"x\", \"sources\": {\"maxDeviation\": \"90.210\"}}",
        "sources.maxDeviation is not a limit field"
    )]
    [InlineData(
        "{\"name\": \"x\", \"sources\": {\"maxPeakDeviationHz\": \"90.210\"}}",
        "sources.maxPeakDeviationHz names a limit the profile does not set"
    )]
    [InlineData("{\"name\": \"x\", \"decisionRule\": \"lenient\"}", "decisionRule 'lenient' is not guarded or simple")]
    public void A_bad_profile_gives_one_line_naming_the_field(string json, string message)
    {
        using var tmp = new TempDir();
        string path = tmp.File("p.json");
        File.WriteAllText(path, json);
        var e = Assert.Throws<ProfileException>(() => LimitProfile.Load(path));
        Assert.Contains(message, e.Message);
        Assert.DoesNotContain('\n', e.Message);
    }

    [Fact]
    public void A_profile_with_a_syntax_error_names_the_line()
    {
        using var tmp = new TempDir();
        string path = tmp.File("p.json");
        File.WriteAllText(path, "{\n \"name\": \"x\",\n \"maxPeakDeviationHz\" 2500\n}");
        var e = Assert.Throws<ProfileException>(() => LimitProfile.Load(path));
        Assert.Contains("line 3", e.Message);
    }

    /// <summary>
    /// Issue 23: a lab must be able to choose and name its decision rule (ILAC-G8:09/2019). The capture's deviation
    /// (2500 Hz true, testdata/MANIFEST.md) reads just inside the 2500 Hz limit but within its U: guarded acceptance
    /// says INCONCLUSIVE, simple acceptance (w = 0) says PASS on the reading. A check that is INCONCLUSIVE for
    /// another reason (the mask under the capture's noise floor) stays so under either rule.
    /// </summary>
    [Fact]
    public void Simple_acceptance_settles_readings_within_U_and_nothing_else()
    {
        AnalysisResult r = Analyzer.Analyze(CaptureSource.Open(TestData.Path("measure", "nbfm-151625.sigmf-meta")));
        const string limits = "\"maxPeakDeviationHz\": 2500, \"mask\": {\"rule\": \"47cfr90.210d\"}";
        LimitProfile guarded = LimitProfile.Parse("{\"name\": \"g\", " + limits + "}");
        LimitProfile simple = LimitProfile.Parse("{\"name\": \"s\", \"decisionRule\": \"simple\", " + limits + "}");
        LimitCheck g = Judgement.Check(r, guarded).Single(c => c.Measurement == "FM peak deviation");
        LimitCheck s = Judgement.Check(r, simple).Single(c => c.Measurement == "FM peak deviation");
        Assert.Equal(Verdict.Inconclusive, g.Verdict);
        Assert.True(g.ByUncertainty);
        Assert.Equal(g.Margin >= 0 ? Verdict.Pass : Verdict.Fail, s.Verdict);
        Assert.Contains("simple acceptance", s.Basis);
        Assert.Equal(
            Judgement.Check(r, guarded).Single(c => c.Measurement.StartsWith("emission mask")).Verdict,
            Judgement.Check(r, simple).Single(c => c.Measurement.StartsWith("emission mask")).Verdict
        );
        Assert.StartsWith("Simple acceptance", Judgement.RuleText(simple));
        Assert.StartsWith("Guarded acceptance", Judgement.RuleText(guarded));
        Assert.Throws<ProfileException>(() => LimitProfile.Parse("{\"name\": \"x\", \"decisionRule\": \"lenient\"}"));
    }

    /// <summary>Issue 23 acceptance: each rule on a reading inside, on and outside its limit with U crossing it
    /// (ILAC-G8:09/2019 4.2: guarded, w = U, leaves all three INCONCLUSIVE; simple acceptance, w = 0, passes a
    /// reading at or inside the limit and fails one beyond it). The limits are set about the capture's own reading,
    /// a few Hz away, well within its U of about 13 Hz.</summary>
    [Theory]
    [InlineData(+5, Verdict.Pass)] // limit 5 Hz above the reading: inside
    [InlineData(0, Verdict.Pass)] // on the limit
    [InlineData(-5, Verdict.Fail)] // limit 5 Hz below: outside
    public void Each_rule_on_readings_inside_on_and_outside_the_limit(double limitAboveReading, Verdict simple)
    {
        AnalysisResult r = Analyzer.Analyze(CaptureSource.Open(TestData.Path("measure", "nbfm-151625.sigmf-meta")));
        double limit = r.Fm!.PeakDeviationHz.Value + limitAboveReading;
        Assert.True(2 * r.Fm.PeakDeviationHz.StandardUncertainty > 5);
        string json = string.Create(
            System.Globalization.CultureInfo.InvariantCulture,
            $"\"maxPeakDeviationHz\": {limit:R}"
        );
        LimitCheck Of(string rule) =>
            Judgement
                .Check(r, LimitProfile.Parse($"{{\"name\": \"x\", \"decisionRule\": \"{rule}\", {json}}}"))
                .Single();
        Assert.Equal(Verdict.Inconclusive, Of("guarded").Verdict);
        Assert.Equal(simple, Of("simple").Verdict);
    }

    /// <summary>Issue 23: --decision-rule chooses the rule over the profile's, is stated in the console and the JSON,
    /// and sets the exit code: the same capture and profile (FRS: 2500 Hz, 2.5 ppm) exit 4 (INCONCLUSIVE) guarded and
    /// 0 (PASS) simple. Without a profile it is refused.</summary>
    [Fact]
    public void The_decision_rule_is_chosen_on_the_command_line_and_stated()
    {
        string capture = TestData.Path("measure", "nbfm-151625.sigmf-meta"),
            frs = TestData.Repo("profiles", "frs.json");
        var (guarded, gOut, _) = CliRunner.Run("analyze", capture, "--limits", frs);
        var (simple, sOut, _) = CliRunner.Run("analyze", capture, "--limits", frs, "--decision-rule", "simple");
        Assert.Equal(4, guarded);
        Assert.Contains("decision rule: guarded acceptance", gOut);
        Assert.Equal(0, simple);
        Assert.Contains("decision rule: simple acceptance", sOut);
        var (_, json, _) = CliRunner.Run(
            "analyze",
            capture,
            "--limits",
            frs,
            "--decision-rule",
            "simple",
            "--json",
            "-"
        );
        Assert.StartsWith(
            "Simple acceptance",
            System
                .Text.Json.JsonDocument.Parse(json)
                .RootElement.GetProperty("limits")
                .GetProperty("decisionRule")
                .GetString()
        );
        var (bad, _, err) = CliRunner.Run("analyze", capture, "--decision-rule", "simple");
        Assert.Equal(2, bad);
        Assert.Contains("give --limits too", err);
    }
}
