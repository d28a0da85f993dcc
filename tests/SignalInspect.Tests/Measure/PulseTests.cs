using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// Pulsed and keyed carriers (issue 22, item 4). Expected values from the construction (SignalSpec's pulse train:
/// pulse k on from k T + D sin(2 pi fm k T) for W with amplitude A (1 + m cos(2 pi fm k T))). Tolerance from the
/// issue's acceptance: width, period and duty cycle within 2 %. The averaging correction is 47 CFR 15.35(c)'s
/// 20 log10(duty cycle over the worst 0.1 s).
/// </summary>
public class PulseTests
{
    private static SignalSpec Beacon(double snrDb = 30) =>
        new()
        {
            Kind = SignalKind.Pulse,
            SampleRateHz = 1e6,
            DurationS = 0.5,
            CarrierOffsetHz = 50_000,
            PulseWidthS = 0.0012,
            PulsePeriodS = 0.004,
            SnrDb = snrDb,
            Seed = 230,
        };

    [Theory]
    [InlineData(30)]
    [InlineData(15)]
    public void A_pulsed_beacon_gets_width_period_and_duty_cycle(double snrDb)
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(tmp, Beacon(snrDb));
        // Not FM with tens of kHz of "deviation": a keyed carrier.
        Assert.Equal(ModulationKind.Ook, r.Classification.Kind);
        PulseResult p = r.Ook!.Pulses!;
        Assert.InRange(p.Count, 123, 125); // 125 pulses start in 0.5 s; the first may be cut by the filters' start
        Near.Equal(0.0012, p.WidthS.Value, 0.02 * 0.0012, "width, s");
        Near.Equal(0.004, p.PeriodS.Value, 0.02 * 0.004, "period, s");
        Near.Equal(30, p.DutyCyclePercent.Value, 0.02 * 30, "duty cycle, %");
        Near.Equal(250, p.PrfHz, 0.02 * 250, "PRF, Hz");
        // 15.35(c): 20 log10(0.3) = -10.46 dB.
        Near.Equal(20 * Math.Log10(0.3), p.AveragingCorrectionDb, 0.2, "averaging correction, dB");
        Assert.Null(p.BitRateBd); // one width, one gap: not data
        Assert.Null(r.Timeline); // a keyed carrier's blocks do not give its frequency
    }

    [Fact]
    public void Amplitude_and_position_modulated_pulses_show_their_spreads()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            Beacon() with
            {
                PulseAmDepth = 0.3,
                PulsePositionS = 100e-6,
                ModulatingFrequencyHz = 20,
            }
        );
        Assert.Equal(ModulationKind.Ook, r.Classification.Kind);
        PulseResult p = r.Ook!.Pulses!;
        // (max - min) / (max + min) of A (1 + 0.3 cos): 30 %, the pulses sampling the cosine at 250 Hz.
        Near.Equal(30, p.AmplitudeSpreadPercent, 1.5, "amplitude spread, %");
        // Starts at k T + 100 us sin(2 pi 20 k T); the spread is the peak distance from the least-squares line
        // through them, which takes a little of the sine over 10 cycles: 106.3 us worked out from the construction
        // here (numpy.linalg.lstsq on the same 125 starts gives 106.31 us).
        double[] k = [.. Enumerable.Range(0, 125).Select(i => (double)i)];
        double[] starts = [.. k.Select(i => i * 0.004 + 100e-6 * Math.Sin(2 * Math.PI * 20 * i * 0.004))];
        double mk = k.Average(),
            ms = starts.Average();
        double slope = k.Zip(starts).Sum(x => (x.First - mk) * (x.Second - ms)) / k.Sum(x => (x - mk) * (x - mk));
        double expected = k.Zip(starts).Max(x => Math.Abs(x.Second - ms - slope * (x.First - mk)));
        Near.Equal(106.31e-6, expected, 0.01e-6, "the construction's spread");
        Near.Equal(expected, p.PositionSpreadS, 2e-6, "position spread, s");
        Near.Equal(0.0012, p.WidthS.Value, 0.02 * 0.0012, "width, s");
    }

    [Fact]
    public void Keyed_data_gets_its_bit_rate()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Ook,
                SampleRateHz = 240_000,
                DurationS = 1,
                CarrierOffsetHz = 20_000,
                SymbolRateBd = 2400,
                SnrDb = 30,
                Seed = 231,
            }
        );
        PulseResult p = r.Ook!.Pulses!;
        Near.Equal(2400, p.BitRateBd!.Value, 0.01 * 2400, "bit rate, Bd");
        // Random bits: on half the time.
        Near.Equal(50, p.DutyCyclePercent.Value, 5, "duty cycle, %");
    }

    [Fact]
    public void Overmodulated_AM_is_not_taken_for_pulses()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Am,
                AmDepth = 1.5,
                Amplitude = 0.3,
                CarrierOffsetHz = 5000,
                SampleRateHz = 48000,
                DurationS = 1,
                SnrDb = 40,
                Seed = 232,
            }
        );
        Assert.Equal(ModulationKind.Am, r.Classification.Kind);
    }

    [Fact]
    public void A_pulse_wider_than_its_period_is_refused()
    {
        var spec = Beacon() with { PulseWidthS = 0.005 };
        Assert.Throws<SettingException>(spec.Validate);
    }
}
