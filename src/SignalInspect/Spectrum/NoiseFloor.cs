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
        var (first, last) = Passband(psd) ?? (0, psd.Count - 1);
        ReadOnlySpan<double> v = psd.Values[first..(last + 1)];
        double[] sorted = v.ToArray();
        Array.Sort(sorted);
        double q = sorted[(int)(Quantile * (sorted.Length - 1))];
        return q / QuantileOfNoise(EquivalentDof(psd));
    }

    /// <summary>Blocks the spectrum is cut into to find a receiver's passband.</summary>
    public const int PassbandBlocks = 32;

    /// <summary>A block this far below the passband's level (6 dB) is outside it.</summary>
    public const double PassbandDrop = 4;

    /// <summary>The stop band must lie this far below the passband (10 dB) to count as a receiver's filter.</summary>
    public const double StopbandDepth = 10;

    /// <summary>
    /// The passband of a band-limited receiver (bins first to last), or null when the noise fills the band. A
    /// receiver that filters before it decimates leaves its noise flat about the centre and falling off toward the
    /// band's edges; the floor must then be taken within the passband (from the filtered-off edges the SNR reads tens
    /// of dB high). Taken as a passband only when the spectrum (complex, two-sided) shows one: the medians of
    /// <see cref="PassbandBlocks"/> blocks form a flat shelf (within 3 dB) about 0 Hz spanning at least 40 % of the
    /// band, and the blocks at both edges stand <see cref="StopbandDepth"/> below it. A wide emission centred on 0 Hz
    /// with a flat top (a noise-like digital signal over half the band) would look the same; the analysis then
    /// notes the passband it used.
    /// </summary>
    public static (int First, int Last)? Passband(PowerSpectrum psd)
    {
        ReadOnlySpan<double> v = psd.Values;
        int n = v.Length,
            w = n / PassbandBlocks;
        if (psd.IsOneSided || w < 4)
            return null;
        var med = new double[PassbandBlocks];
        var block = new double[w];
        for (int k = 0; k < PassbandBlocks; k++)
        {
            v.Slice(k * w, w).CopyTo(block);
            Array.Sort(block);
            med[k] = block[w / 2];
        }
        // The shelf: the median of the middle half's block medians.
        double[] middle = med[(PassbandBlocks / 4)..(3 * PassbandBlocks / 4)];
        Array.Sort(middle);
        double shelf = middle[middle.Length / 2];
        if (!(shelf > 0))
            return null;
        int lo = PassbandBlocks / 2,
            hi = PassbandBlocks / 2 - 1;
        while (lo > 0 && med[lo - 1] >= shelf / PassbandDrop)
            lo--;
        while (hi < PassbandBlocks - 1 && med[hi + 1] >= shelf / PassbandDrop)
            hi++;
        if (lo == 0 && hi == PassbandBlocks - 1)
            return null;
        bool wide = hi - lo + 1 >= 0.4 * PassbandBlocks,
            centred = Math.Abs(lo - (PassbandBlocks - 1 - hi)) <= 2,
            deep = med[0] * StopbandDepth <= shelf && med[^1] * StopbandDepth <= shelf;
        if (!(wide && centred && deep))
            return null;
        // Flat: the inner blocks' medians (the transition blocks at its ends left out) within 3 dB between their
        // quartiles (an emission may raise a few blocks).
        double[] inner = med[(lo + 1)..hi];
        Array.Sort(inner);
        bool flat = inner.Length >= 4 && inner[3 * inner.Length / 4] <= 2 * inner[inner.Length / 4];
        return flat ? (lo * w, (hi + 1) * w - 1) : null;
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
