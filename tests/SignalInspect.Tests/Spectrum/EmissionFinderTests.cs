using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Tests.Spectrum;

/// <summary>
/// The emission finder's joining of mirrored regions on constructed spectra (2048 bins of 100 Hz, a flat floor of
/// 1, 1000 segments so the detection threshold is near the floor): sidebands are mirror images of like width and
/// shape about an emission in its own right (AM and single-tone angle modulation have symmetric magnitude spectra,
/// a fact of the trade); emissions placed symmetrically by chance are not.
/// </summary>
public class EmissionFinderTests
{
    private const int N = 2048;
    private const double Bin = 100;

    private static PowerSpectrum Spectrum(double[] v)
    {
        var settings = new SpectrumSettings { FftSize = N };
        double[] f = [.. Enumerable.Range(0, N).Select(i => (i - N / 2) * Bin)];
        return new PowerSpectrum(
            f,
            v,
            SpectrumScaling.DensityPerHz,
            SpectrumAveraging.Mean,
            settings,
            Window.Create(WindowKind.Hann, N),
            N * Bin,
            null,
            false,
            1000
        );
    }

    private static double[] Floor() => [.. Enumerable.Repeat(1.0, N)];

    private static void Add(double[] v, int centre, int halfWidth, double level)
    {
        for (int i = centre - halfWidth; i <= centre + halfWidth; i++)
            v[i] += level;
    }

    [Fact]
    public void A_carrier_and_a_two_tone_signal_placed_symmetrically_about_an_AM_carrier_are_not_its_sidebands()
    {
        double[] v = Floor();
        int c = N / 2;
        Add(v, c, 1, 1e4); // AM carrier
        Add(v, c - 8, 1, 1e3); // and its sidebands at +/-800 Hz
        Add(v, c + 8, 1, 1e3);
        Add(v, c - 300, 1, 1e3); // a carrier 30 kHz below
        Add(v, c + 295, 1, 500); // a two-tone (FSK) signal 30 kHz above: tones +/-500 Hz, nothing at its centre
        Add(v, c + 305, 1, 500);
        IReadOnlyList<Emission> found = EmissionFinder.Find(Spectrum(v), 1.0);
        Assert.Equal(3, found.Count);
        Emission am = Assert.Single(found, e => e.FirstBin <= c && e.LastBin >= c);
        Assert.True(am.WidthHz < 2500, $"AM emission {am.WidthHz} Hz wide");
    }

    [Fact]
    public void Sidebands_far_out_still_join_their_carrier()
    {
        double[] v = Floor();
        int c = N / 2;
        Add(v, c, 1, 1e4);
        Add(v, c - 150, 1, 2e3); // lines 15 kHz either side, beyond the 3.5 kHz that joins regions
        Add(v, c + 150, 1, 2e3);
        Emission e = Assert.Single(EmissionFinder.Find(Spectrum(v), 1.0));
        Assert.Equal(c - 151, e.FirstBin);
        Assert.Equal(c + 151, e.LastBin);
    }

    [Fact]
    public void A_few_bins_of_noise_do_not_anchor_two_emissions_about_them()
    {
        double[] v = Floor();
        int c = N / 2;
        v[c] = v[c + 1] = 1.5; // two bins over the threshold: noise, far below an emission's 6 dB
        Add(v, c - 300, 5, 100); // two like emissions symmetric about it
        Add(v, c + 301, 5, 100);
        IReadOnlyList<Emission> found = EmissionFinder.Find(Spectrum(v), 1.0);
        Assert.Equal(2, found.Count);
        Assert.All(found, e => Assert.True(e.WidthHz < 2000, $"{e.WidthHz} Hz wide"));
    }
}
