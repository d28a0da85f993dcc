using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Spectrum;
using SignalInspect.Synthesis;
using SignalInspect.Tests.Measure;

namespace SignalInspect.Tests.Synthesis;

/// <summary>
/// Rounding to an integer datatype. The references are textbook facts, from memory: the error of rounding to a
/// step q is uniform over one step when the signal is busy enough, variance q^2 / 12 (W. R. Bennett, "Spectra of
/// quantized signals", Bell System Technical Journal 27, 1948); triangular (TPDF) dither spanning +/- q has
/// variance q^2 / 6 and makes the total error's variance q^2 / 12 + q^2 / 6 = q^2 / 4 whatever the signal
/// (Lipshitz, Wannamaker and Vanderkooy, "Quantization and dither: a theoretical survey", JAES 40, 1992).
/// </summary>
public class DitherTests
{
    private static SignalSpec EightBitFm =>
        new()
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 250_000,
            DurationS = 0.5,
            PeakDeviationHz = 2500,
            ModulatingFrequencyHz = 1000,
        };

    [Fact]
    public void Dithered_rounding_leaves_a_white_floor_of_q_squared_over_4()
    {
        // A noiseless FM tone written as cu8 with dither: the spectrum far from the emission is the rounding
        // error alone, I and Q each q^2 / 4 (q = 1/128), a density of 2 (q^2 / 4) / fs for the complex pair.
        using var tmp = new TempDir();
        string path = tmp.File("d.cu8");
        Synthesizer.Write(EightBitFm, path, SampleFormat.Parse("cu8"), dither: true);
        PowerSpectrum psd = WelchEstimator
            .Estimate(CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 250_000 }), new SpectrumSettings())
            .Mean;
        double q = 1 / 128.0;
        double expected = 2 * (q * q / 4) / 250_000;
        var far = new List<double>();
        for (int i = 0; i < psd.Count; i++)
            if (Math.Abs(psd.FrequenciesHz[i]) > 20_000)
                far.Add(psd.Values[i]);
        double measuredDb = 10 * Math.Log10(far.Average()),
            expectedDb = 10 * Math.Log10(expected);
        // About 1900 bins of 23 averaged segments: the mean is good to a few hundredths of a dB.
        Assert.InRange(measuredDb - expectedDb, -0.2, 0.2);
    }

    [Fact]
    public void Undithered_rounding_of_a_noiseless_tone_is_flagged_and_dithered_rounding_reads_right()
    {
        using var tmp = new TempDir();
        AnalysisResult exact = Measuring.Analyze(tmp, EightBitFm, datatype: "cu8");
        // Undithered: the rounding error's comb reads as modulation. The tool cannot take it out; it must say so.
        Assert.Contains(exact.Warnings, w => w.Contains("below the cu8 datatype's rounding noise"));

        string path = tmp.File("d.cu8");
        Synthesizer.Write(EightBitFm, path, SampleFormat.Parse("cu8"), dither: true);
        AnalysisResult dithered = Analyzer.Analyze(
            CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 250e3 })
        );
        Assert.DoesNotContain(dithered.Warnings, w => w.Contains("rounding noise"));
        // The synthesised deviation (2500 Hz) lies within the reading's expanded uncertainty.
        Measured dev = dithered.Fm!.PeakDeviationHz;
        Assert.InRange(2500, dev.Value - 2 * dev.StandardUncertainty, dev.Value + 2 * dev.StandardUncertainty);
    }

    [Fact]
    public void A_float_datatype_and_a_receiver_noise_floor_are_not_flagged()
    {
        using var tmp = new TempDir();
        AnalysisResult f32 = Measuring.Analyze(tmp, EightBitFm, datatype: "cf32_le");
        Assert.DoesNotContain(f32.Warnings, w => w.Contains("rounding noise"));
        // A receiver's noise well above one code (SNR 30 dB over the band at amplitude 0.5: noise rms about
        // 0.011 per component, 1.4 codes of cu8) dithers the rounding itself.
        AnalysisResult noisy = Measuring.Analyze(tmp, EightBitFm with { SnrDb = 30 }, datatype: "cu8");
        Assert.DoesNotContain(noisy.Warnings, w => w.Contains("rounding noise"));
    }
}
