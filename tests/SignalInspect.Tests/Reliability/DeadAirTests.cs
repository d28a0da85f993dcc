using SignalInspect.Measure;
using SignalInspect.Synthesis;
using SignalInspect.Tests.Measure;

namespace SignalInspect.Tests.Reliability;

/// <summary>
/// Silence and non-signals (issue 27 item 6): digital zeros and a DC offset must not be read as a transmitter, and
/// zeros after the end of a key-up must not be read as modulation.
/// </summary>
public class DeadAirTests
{
    [Fact]
    public void An_all_zero_capture_has_no_spectrum_either()
    {
        using var tmp = new TempDir();
        string path = tmp.File("zeros.cf32");
        File.WriteAllBytes(path, new byte[8 * 48000]);
        foreach (string command in new[] { "spectrum", "analyze" })
        {
            var (code, stdout, stderr) = CliRunner.Run(command, path, "--sample-rate", "48k");
            Assert.Equal(2, code);
            Assert.Contains("only zero", stderr);
            Assert.DoesNotContain("Infinity", stdout);
        }
    }

    [Fact]
    public void A_DC_only_capture_is_warned_about_twice()
    {
        // A constant complex value: no noise at all, and a "carrier" exactly where a receiver's DC offset sits.
        using var tmp = new TempDir();
        string path = tmp.File("dc.cf32");
        var bytes = new byte[8 * 48000];
        for (int i = 0; i < 48000; i++)
            BitConverter.TryWriteBytes(bytes.AsSpan(8 * i), 0.3f);
        File.WriteAllBytes(path, bytes);
        var (code, _, stderr) = CliRunner.Run("analyze", path, "--sample-rate", "48k");
        Assert.Equal(0, code);
        Assert.Contains("no noise was found beside the signal", stderr);
        Assert.Contains("the carrier sits at the capture's centre", stderr);
    }

    [Fact]
    public void Digital_silence_after_a_key_up_is_not_modulation()
    {
        // FM 2.5 kHz keyed 0-9 s in a 10 s capture with no noise: the last second is exact zeros (a recorder's
        // silence). Before the timeline work this read 10.7 kHz and FAILed a 2.5 kHz profile.
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 48000,
                DurationS = 10,
                PeakDeviationHz = 2500,
                Bursts = [new Burst(0, 9)],
            }
        );
        Transmission t = Assert.Single(r.Transmissions);
        Near.Equal(9, t.EndS, 0.01, "key-down, s");
        Near.Equal(2500, r.Fm!.PeakDeviationHz.Value, 0.02 * 2500, "deviation");
    }

    /// <summary>Issue 27 item 10: a float capture not scaled to +/-1 got a false "probably clipped" warning; a
    /// float capture clipped at full scale (components held at exactly 1) still gets it.</summary>
    [Theory]
    [InlineData(5.0, false, false)] // a tone of amplitude 5: floats, not clipped
    [InlineData(1.5, true, true)] // amplitude 1.5 with I and Q clamped at +/-1: clipped
    public void Float_clipping_is_full_scale_held_not_values_beyond_one(double amplitude, bool clamp, bool warned)
    {
        using var tmp = new TempDir();
        string path = tmp.File("f.cf32");
        var bytes = new byte[8 * 48000];
        for (int k = 0; k < 48000; k++)
        {
            double ph = 2 * Math.PI * 3000 * k / 48000.0;
            double i = amplitude * Math.Cos(ph),
                q = amplitude * Math.Sin(ph);
            if (clamp)
                (i, q) = (Math.Clamp(i, -1, 1), Math.Clamp(q, -1, 1));
            BitConverter.TryWriteBytes(bytes.AsSpan(8 * k), (float)i);
            BitConverter.TryWriteBytes(bytes.AsSpan(8 * k + 4), (float)q);
        }
        File.WriteAllBytes(path, bytes);
        var (_, _, stderr) = CliRunner.Run("analyze", path, "--sample-rate", "48k");
        Assert.Equal(warned, stderr.Contains("probably clipped"));
    }
}
