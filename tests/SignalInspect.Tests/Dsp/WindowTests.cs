using SignalInspect.Dsp;

namespace SignalInspect.Tests.Dsp;

/// <summary>
/// Window figures of merit against Harris (1978), "On the use of windows for harmonic analysis
/// with the discrete Fourier transform", Proc. IEEE 66(1), Table 1 (values as listed in
/// testdata/REFERENCE-VALUES.md: [D], agreeing with Harris [mem]).
/// </summary>
public class WindowTests
{
    [Theory]
    // kind, coherent gain, ENBW (bins), scalloping loss (dB)
    [InlineData(WindowKind.Rectangular, 1.0, 1.000, 3.92)]
    [InlineData(WindowKind.Hann, 0.5, 1.500, 1.42)]
    [InlineData(WindowKind.Hamming, 0.54, 1.363, 1.75)]
    [InlineData(WindowKind.BlackmanHarris, 0.35875, 2.004, 0.83)]
    [InlineData(WindowKind.FlatTop, 0.2156, 3.770, 0.01)]
    public void Figures_of_merit_match_Harris_table_1(WindowKind kind, double gain, double enbw, double scallopDb)
    {
        Window w = Window.Create(kind, 4096);
        // The table gives 3 to 4 significant figures: compare within half a unit of its last digit.
        Near.Equal(gain, w.CoherentGain, 5e-5, "coherent gain");
        Near.Equal(enbw, w.EnbwBins, 5e-4, "ENBW");
        Near.Equal(scallopDb, w.ScallopingLossDb, 5e-3, "scalloping loss");
    }

    [Fact]
    public void Kaiser_beta_3pi_matches_Harris_Kaiser_Bessel_alpha_3()
    {
        // Harris 1978 Table 1, Kaiser-Bessel alpha = 3 (beta = pi alpha): coherent gain 0.40,
        // ENBW 1.80 bins, scalloping loss 1.02 dB [mem: not in testdata/REFERENCE-VALUES.md].
        Window w = Window.Create(WindowKind.Kaiser, 4096, 3 * Math.PI);
        Near.Equal(0.40, w.CoherentGain, 5e-3, "coherent gain");
        Near.Equal(1.80, w.EnbwBins, 5e-3, "ENBW");
        Near.Equal(1.02, w.ScallopingLossDb, 5e-3, "scalloping loss");
    }

    [Fact]
    public void Periodic_form_is_the_symmetric_window_of_N_plus_1_points_without_the_last()
    {
        // scipy.signal.get_window('hann', 8) (fftbins=True): 0, 0.1464, 0.5, 0.8536, 1, 0.8536, 0.5, 0.1464
        Window w = Window.Create(WindowKind.Hann, 8);
        double[] want =
        [
            0,
            0.14644660940672624,
            0.5,
            0.8535533905932737,
            1,
            0.8535533905932737,
            0.5,
            0.14644660940672624,
        ];
        for (int i = 0; i < 8; i++)
            Near.Equal(want[i], w.Coefficients[i], 1e-15);
    }

    [Theory]
    [InlineData("hann", WindowKind.Hann)]
    [InlineData("Blackman-Harris", WindowKind.BlackmanHarris)]
    [InlineData("flattop", WindowKind.FlatTop)]
    [InlineData("rectangular", WindowKind.Rectangular)]
    [InlineData("kaiser:5", WindowKind.Kaiser)]
    public void Names_parse(string name, WindowKind kind) => Assert.Equal(kind, Window.ParseName(name).Kind);

    [Fact]
    public void Unknown_names_are_refused() => Assert.Throws<ArgumentException>(() => Window.ParseName("gaussian"));

    [Fact]
    public void ENBW_in_Hz_scales_with_the_rate()
    {
        Window w = Window.Create(WindowKind.Hann, 1024);
        Near.Equal(1.5 * 48000 / 1024, w.EnbwHz(48000), 1e-9);
    }
}
