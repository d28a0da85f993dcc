using MathNet.Numerics.Distributions;

namespace SignalInspect.Spectrum;

/// <summary>
/// The noise density of a Welch spectrum, estimated so that it holds whatever share of the band a signal
/// fills (up to about four fifths): a low quantile of the bins, divided by that quantile of the
/// distribution a bin of pure noise follows. A Welch bin of white noise is its density times
/// chi-square(nu) / nu, with nu = 2K / (1 + 2 sum_m rho(m)^2) equivalent degrees of freedom for K
/// segments whose windows overlap with correlation rho(m) (Welch 1967; Percival and Walden,
/// Spectral Analysis for Physical Applications, 1993, 6.17). The uncorrected low quantile reads the
/// floor low by a factor that depends on K; the median would read it high once a signal fills half
/// the band.
/// </summary>
public static class NoiseFloor
{
    /// <summary>The quantile of the bins that is read.</summary>
    public const double Quantile = 0.2;

    /// <summary>The noise density of <paramref name="psd"/> (density per Hz).</summary>
    public static double Estimate(PowerSpectrum psd)
    {
        ReadOnlySpan<double> v = psd.Values;
        double[] sorted = v.ToArray();
        Array.Sort(sorted);
        double q = sorted[(int)(Quantile * (sorted.Length - 1))];
        return q / QuantileOfNoise(EquivalentDof(psd));
    }

    /// <summary>The <see cref="Quantile"/> of chi-square(nu) / nu.</summary>
    public static double QuantileOfNoise(double nu) => ChiSquared.InvCDF(nu, Quantile) / nu;

    /// <summary>
    /// Equivalent degrees of freedom of a bin: 2K / (1 + 2 sum_m rho(m)^2), rho(m) the correlation of the
    /// window with itself shifted by m steps, for the segments actually averaged (at least 2).
    /// </summary>
    public static double EquivalentDof(PowerSpectrum psd)
    {
        long k = Math.Max(1, psd.Segments);
        ReadOnlySpan<double> w = psd.Window.Coefficients;
        int step = psd.Settings.StepSamples;
        double sum = 0;
        for (int m = 1; m < k && m * step < w.Length; m++)
        {
            double c = 0;
            for (int i = 0; i + m * step < w.Length; i++)
                c += w[i] * w[i + m * step];
            double rho = c / psd.Window.SumOfSquares;
            sum += (1 - (double)m / k) * rho * rho;
        }
        return Math.Max(2, 2.0 * k / (1 + 2 * sum));
    }
}
