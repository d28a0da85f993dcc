using MathNet.Numerics;
using MathNet.Numerics.Distributions;
using SignalInspect.Measure;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// The noise-corrected sine peak. Without noise it is the arcsine law: a sine of peak D exceeds
/// D cos(pi p) a fraction p of the time (a textbook property of the sine's amplitude distribution).
/// With Gaussian noise the returned peak is checked by computing the exceedance of D sin(theta) + n
/// independently, with MathNet's Gauss-Kronrod quadrature and its normal distribution.
/// </summary>
public class SinePeakTests
{
    [Fact]
    public void Without_noise_the_arcsine_law()
    {
        Near.Equal(
            1 / Math.Cos(Math.PI * 0.001),
            SinePeak.FromPercentile(1.0, 0),
            1e-12,
            "peak from the 99.9th percentile of a unit sine"
        );
    }

    [Theory]
    [InlineData(1.0, 0.01)]
    [InlineData(1.0, 1e-4)]
    [InlineData(75_000.0, 300.0)]
    [InlineData(0.5, 0.08)]
    public void With_noise_the_peak_exceeds_the_level_one_time_in_a_thousand(double level, double sigma)
    {
        double d = SinePeak.FromPercentile(level, sigma);
        // P(D sin(theta) + n > level), theta uniform on [0, 2 pi): (1/pi) int_0^pi Q((level - D cos phi) / sigma) dphi.
        double p =
            Integrate.GaussKronrod(
                phi => 1 - Normal.CDF(0, 1, (level - d * Math.Cos(phi)) / sigma),
                0,
                Math.PI,
                1e-12,
                20,
                61
            ) / Math.PI;
        Near.Equal(0.001, p, 2e-9, $"exceedance of the level {level} by the returned peak {d}");
    }

    [Fact]
    public void Side_by_side_equals_one_at_a_time()
    {
        var (up, down) = SinePeak.FromPercentiles(1.2, 0.9, 0.05);
        Assert.Equal(SinePeak.FromPercentile(1.2, 0.05), up);
        Assert.Equal(SinePeak.FromPercentile(0.9, 0.05), down);
    }
}
