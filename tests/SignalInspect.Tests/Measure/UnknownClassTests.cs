using SignalInspect.Compliance;
using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// A signal of none of the classes (issue 27, item 10): 16-QAM keys both the envelope and the phase (its symbols
/// lie on three amplitude rings and twelve phases: the construction). It was forced into fm with a telephony
/// designator; now it is unknown, with its bandwidths measured, no carrier (its mean frequency is no carrier) and no
/// designator, and a profile's deviation limit is NOT TESTED.
/// </summary>
public class UnknownClassTests
{
    [Theory]
    [InlineData(40)]
    [InlineData(20)]
    public void Envelope_and_phase_both_keyed_is_unknown(double snrDb)
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Qam,
                SymbolRateBd = 2400,
                SampleRateHz = 48000,
                DurationS = 1,
                CenterFrequencyHz = 460e6,
                CarrierOffsetHz = 3000,
                SnrDb = snrDb,
            }
        );
        Assert.Equal(ModulationKind.Unknown, r.Classification.Kind);
        Assert.Null(r.Carrier);
        Assert.Null(r.EmissionDesignator);
        Assert.Null(r.Fm);
        Assert.True(r.Bandwidth.OccupiedHz > 2400);
        LimitProfile p = LimitProfile.Parse(
            "{\"name\": \"x\", \"maxPeakDeviationHz\": 2500, \"maxOccupiedBandwidthHz\": 11250}"
        );
        IReadOnlyList<LimitCheck> checks = Judgement.Check(r, p);
        Assert.Equal(Verdict.NotTested, checks.Single(c => c.Measurement == "FM peak deviation").Verdict);
        Assert.Equal(Verdict.Fail, checks.Single(c => c.Measurement.StartsWith("occupied bandwidth")).Verdict);
    }
}
