using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// A band-limited receiver (issue 27, item 10): its filter leaves noise only within +/-60 kHz of a 240 kS/s capture,
/// half the band. The floor was the filtered-off edges' (the 20 % quantile of all bins): SNR 148.6 dB for an FM
/// handheld at 30 dB over the band, and its deviation read 2 % high without the noise correction. Expected from the
/// construction: 30 dB of SNR over the receiver's 240 kHz is 30 + 10 log10(240 / 7.92) = 44.8 dB in the 99 %
/// occupied bandwidth of FM 2.5 kHz by 1 kHz (7.92 kHz measured; 8.0 kHz by the Bessel sums,
/// testdata/REFERENCE-VALUES.md [D]).
/// </summary>
public class ReceiverPassbandTests
{
    private static SignalSpec Handheld(double? noiseBandHz) =>
        new()
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 240_000,
            DurationS = 1,
            CenterFrequencyHz = 155.3125e6,
            CarrierOffsetHz = 20_000,
            PeakDeviationHz = 2500,
            SnrDb = 30,
            Seed = 17,
            NoiseBandHz = noiseBandHz,
        };

    [Fact]
    public void The_noise_floor_is_taken_within_the_receiver_passband()
    {
        using var tmp = new TempDir();
        AnalysisResult limited = Measuring.Analyze(tmp, Handheld(60_000));
        AnalysisResult whole = Measuring.Analyze(tmp, Handheld(null));
        double expected = 30 + 10 * Math.Log10(240_000 / limited.Bandwidth.OccupiedHz);
        Near.Equal(expected, limited.ChannelSnrDb, 1.5, "SNR in the occupied bandwidth, band-limited receiver");
        Near.Equal(expected, whole.ChannelSnrDb, 1.5, "SNR in the occupied bandwidth, whole-band noise");
        Near.Equal(2500, limited.Fm!.PeakDeviationHz.Value, 25, "peak deviation (1 %)");
        Assert.Contains(limited.Notes, n => n.Contains("the receiver's filter"));
        Assert.DoesNotContain(whole.Notes, n => n.Contains("the receiver's filter"));
    }

    [Fact]
    public void A_noise_band_needs_complex_output_inside_the_band()
    {
        Assert.Throws<SettingException>(() => (Handheld(125_000) with { }).Validate());
        Assert.Throws<SettingException>(() => (Handheld(60_000) with { IsComplex = false }).Validate());
    }
}
