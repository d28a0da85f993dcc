using SignalInspect.Compliance;
using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// The carrier against time (issue 22, item 2). Expected values from the construction: SignalSpec's carrier is
/// f0 + d t (instantaneous frequency of the phase 2 pi (f0 t + d t^2 / 2)), so a window's mean carrier is the
/// line's value at the window's centre. Tolerances from the acceptance: the worst window's offset within
/// 3 %, the deviation of a drifting carrier within 2 %.
/// </summary>
public class TimelineTests
{
    /// <summary>A mobile at 155.2 MHz drifting from -600 Hz to +1000 Hz over a 5 s key-up, 2 kHz deviation.</summary>
    private static SignalSpec Drifting(double driftHzPerS = 320) =>
        new()
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 48000,
            DurationS = 5,
            CenterFrequencyHz = 155.2e6,
            CarrierOffsetHz = -600,
            DriftHzPerS = driftHzPerS,
            PeakDeviationHz = 2000,
            SnrDb = 30,
            Seed = 227,
        };

    /// <summary>The 2.5 ppm tolerance at 155.2 MHz: 388 Hz (47 CFR 90.213's figure for mobile stations above 50 W in
    /// 150-174 MHz, as the land-mobile VHF profile uses it; here only a number to judge against).</summary>
    private static readonly LimitProfile Tolerance = new()
    {
        Name = "2.5 ppm",
        NominalFrequencyHz = 155.2e6,
        FrequencyTolerancePpm = 2.5,
    };

    [Fact]
    public void A_drifting_carrier_is_followed_window_by_window()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(tmp, Drifting());
        Timeline t = r.Timeline!;
        Assert.Equal(0.1, t.WindowS, 6); // 100 periods of the 1 kHz tone
        Assert.Equal(50, t.Windows.Count);
        // The last window's centre is at 4.95 s: -600 + 320 * 4.95 = 984 Hz.
        TrackWindow last = t.Windows[^1];
        Near.Equal(984, last.CarrierOffsetHz, 0.03 * 984, "worst window's offset");
        Near.Equal(984 / 155.2, last.OffsetPpm!.Value, 0.03 * 984 / 155.2, "its ppm");
        Near.Equal(320, t.DriftHzPerS!.Value.Value, 3, "drift, Hz/s");
        // The mean is the middle of the line (+200 Hz): the figure that passed before.
        Near.Equal(200, r.Carrier!.OffsetHz, 5, "whole-capture offset");
        // The drift no longer widens the deviation (2698 Hz read before for 2000 Hz).
        Assert.True(t.Detrended);
        Near.Equal(2000, r.Fm!.PeakDeviationHz.Value, 0.02 * 2000, "deviation about the local carrier");
    }

    [Fact]
    public void The_tolerance_fails_on_the_worst_window_where_the_mean_passes()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(tmp, Drifting());
        LimitCheck c = Assert.Single(Judgement.Check(r, Tolerance));
        // The mean offset (+200 Hz) is inside 388 Hz; the last window (+984 Hz) is not.
        Assert.True(Math.Abs(r.Carrier!.OffsetHz) < 388);
        Assert.Equal(Verdict.Fail, c.Verdict);
        Near.Equal(984, c.Value, 0.03 * 984, "the judged reading");
        Assert.Contains("4.9-5 s", c.Where);
    }

    [Fact]
    public void A_steady_carrier_passes_and_is_not_measured_twice()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(tmp, Drifting(0) with { CarrierOffsetHz = 200 });
        Timeline t = r.Timeline!;
        Assert.False(t.Detrended);
        Assert.Equal(0, t.DriftHzPerS!.Value.Value, 2 * t.DriftHzPerS.Value.StandardUncertainty + 0.5);
        LimitCheck c = Assert.Single(Judgement.Check(r, Tolerance));
        Assert.Equal(Verdict.Pass, c.Verdict);
        Near.Equal(200, c.Value, 10, "the worst window's offset");
    }

    [Fact]
    public void An_AM_carrier_gets_its_depth_and_level_per_window()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Am,
                SampleRateHz = 48000,
                DurationS = 1,
                CarrierOffsetHz = 5000,
                AmDepth = 0.6,
                Amplitude = 0.5,
                SnrDb = 40,
                Seed = 228,
            }
        );
        Timeline t = r.Timeline!;
        TrackWindow w = t.Windows[t.Windows.Count / 2];
        // Depth (max - min) / (max + min) of A (1 + m cos): m = 60 %, read raw (noise at 40 dB adds a little).
        Near.Equal(60, w.RawDepthPercent!.Value, 2, "raw depth, %");
        Assert.Null(w.RawPeakDeviationHz);
        // Mean |z|^2 of A (1 + m cos) is A^2 (1 + m^2 / 2) = 0.25 * 1.18: -5.29 dBFS (the channel passes the
        // carrier and both sidebands at unit gain).
        Near.Equal(10 * Math.Log10(0.25 * 1.18), w.LevelDbfs, 0.2, "level, dBFS");
    }

    [Fact]
    public void The_window_follows_the_tone_and_the_option()
    {
        // A whole number of periods nearest 100 ms, in whole 1 ms blocks; an explicit length wins.
        Assert.Equal(0.101, TimelineMeasurement.WindowS(null, 118.8, 0.001), 9); // 12 periods = 101.0 ms
        Assert.Equal(0.1, TimelineMeasurement.WindowS(null, null, 0.001), 9);
        Assert.Equal(0.25, TimelineMeasurement.WindowS(0.25, 1000, 0.001), 9);
    }

    [Fact]
    public void A_window_longer_than_the_capture_is_refused()
    {
        using var tmp = new TempDir();
        var e = Assert.Throws<SettingException>(() =>
            Measuring.Analyze(tmp, Drifting(), new AnalysisOptions { TrackIntervalS = 6 })
        );
        Assert.Contains("must not be longer than the analysed window", e.Message);
    }

    /// <summary>The local carrier taken off a drifting FM capture: linear between knots, held beyond them.</summary>
    [Fact]
    public void The_carrier_track_interpolates_between_its_knots()
    {
        var t = new SignalInspect.Demodulation.CarrierTrack([(100, -10.0), (300, 30.0)]);
        Assert.Equal(-10, t.At(0));
        Assert.Equal(10, t.At(200), 12);
        Assert.Equal(30, t.At(1000));
        double[] f = [0, 0, 0];
        t.Subtract(199, f);
        Assert.Equal([-9.8, -10, -10.2], f.Select(v => Math.Round(v, 9)));
    }

    /// <summary>FSK: a window's carrier is the centre of its two tones, not its mean frequency (which leans to the
    /// tone its random bits favour: +/- shift / 2 / sqrt(bits), about 45 Hz at 1200 Bd in 0.1 s). A 40 Hz/s drift
    /// from +640 Hz (the demo's telemetry modem): each window within its U of the line at its centre.</summary>
    [Fact]
    public void An_FSK_carrier_is_followed_by_the_centre_of_its_tones()
    {
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fsk,
                SampleRateHz = 96_000,
                DurationS = 1.5,
                CarrierOffsetHz = 640,
                FskShiftHz = 1000,
                SymbolRateBd = 1200,
                DriftHzPerS = 40,
                SnrDb = 40,
                Seed = 3,
            }
        );
        Timeline t = r.Timeline!;
        Assert.True(t.Windows.Count >= 12, $"{t.Windows.Count} windows");
        int outside = 0;
        foreach (TrackWindow w in t.Windows)
        {
            double truth = 640 + 40 * (w.StartS + w.EndS) / 2;
            Assert.True(w.StandardUncertaintyHz < 20, $"u {w.StandardUncertaintyHz} Hz at {w.StartS} s");
            if (Math.Abs(w.CarrierOffsetHz - truth) > 2 * w.StandardUncertaintyHz + 2)
                outside++;
        }
        Assert.True(outside <= 2, $"{outside} of {t.Windows.Count} windows off the line by more than U");
        Near.Equal(40, t.DriftHzPerS!.Value.Value, 3 * t.DriftHzPerS.Value.StandardUncertainty + 2, "drift, Hz/s");
    }
}
