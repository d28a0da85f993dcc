using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>How the noise floor is treated when summing power for the occupied bandwidth.</summary>
public enum NoiseFloorTreatment
{
    /// <summary>
    /// The floor (the 10th percentile of the PSD bins, taken as the receiver noise density) is
    /// subtracted from every bin before summing, bins below it counting as zero: noise spread over
    /// the whole capture bandwidth then does not widen the result. Default.
    /// </summary>
    Subtract,

    /// <summary>Power is summed as measured, noise included (the plain SM.443 beta-% summation).</summary>
    Keep,
}

/// <summary>Occupied and x-dB bandwidth of a spectrum, with their edges.</summary>
/// <param name="OccupiedHz">Occupied bandwidth: the band outside which each side holds beta/2 of the total
/// power.</param>
/// <param name="LowerEdgeHz">Lower edge of the occupied bandwidth (spectrum axis: offset or audio frequency).</param>
/// <param name="UpperEdgeHz">Upper edge of the occupied bandwidth.</param>
/// <param name="Beta">Fraction of power outside (0.01 for the 99 % bandwidth).</param>
/// <param name="XdbHz">x-dB bandwidth: between the outermost points at x dB below the spectrum's maximum.</param>
/// <param name="XdbLowerEdgeHz">Lower edge of the x-dB bandwidth.</param>
/// <param name="XdbUpperEdgeHz">Upper edge of the x-dB bandwidth.</param>
/// <param name="Xdb">The x of the x-dB bandwidth (dB).</param>
/// <param name="NoiseFloorDensity">Noise floor density taken (full-scale^2/Hz), as subtracted or not.</param>
/// <param name="Treatment">How the noise floor was treated.</param>
/// <param name="SignalPower">Power summed (full-scale^2), after any floor subtraction.</param>
/// <param name="CentroidHz">Power-weighted mean frequency inside the occupied bandwidth.</param>
public sealed record BandwidthResult(
    double OccupiedHz,
    double LowerEdgeHz,
    double UpperEdgeHz,
    double Beta,
    double XdbHz,
    double XdbLowerEdgeHz,
    double XdbUpperEdgeHz,
    double Xdb,
    double NoiseFloorDensity,
    NoiseFloorTreatment Treatment,
    double SignalPower,
    double CentroidHz
);

/// <summary>
/// Occupied bandwidth by the beta-% method (ITU Radio Regulations No. 1.153, ITU-R SM.328,
/// SM.443 Annex 1): power is summed from each edge of the spectrum inwards until it reaches beta/2
/// of the total; the edges are interpolated within the bin (each bin holding its power uniformly
/// over its width). The x-dB bandwidth follows SM.443 Annex 2: the outermost frequencies at which
/// the spectrum is x dB below its maximum, interpolated between bins.
/// </summary>
public static class BandwidthMeasurement
{
    /// <summary>Measures a density spectrum.</summary>
    /// <param name="psd">The spectrum (density scaling).</param>
    /// <param name="beta">Fraction of power outside the band, 0 &lt; beta &lt; 1 (0.01 for 99 %).</param>
    /// <param name="xdb">The x of the x-dB bandwidth, positive (26 by default in the tools that call this).</param>
    /// <param name="treatment">Noise-floor treatment.</param>
    /// <param name="floor">The noise density, when already estimated (<see cref="NoiseFloor.Estimate"/>); null to
    /// estimate it here.</param>
    public static BandwidthResult Measure(
        PowerSpectrum psd,
        double beta = 0.01,
        double xdb = 26,
        NoiseFloorTreatment treatment = NoiseFloorTreatment.Subtract,
        double? floor = null
    )
    {
        if (!(beta > 0 && beta < 1))
            throw new SettingException(
                nameof(AnalysisOptions.ObwPercent),
                (1 - beta) * 100,
                "must lie between 0 and 100"
            );
        if (!(xdb > 0 && double.IsFinite(xdb)))
            throw new SettingException(nameof(AnalysisOptions.Xdb), xdb, "must be a positive number of dB");
        if (psd.Scaling != SpectrumScaling.DensityPerHz)
            psd = psd.In(SpectrumScaling.DensityPerHz);
        int n = psd.Count;
        ReadOnlySpan<double> v = psd.Values;
        ReadOnlySpan<double> f = psd.FrequenciesHz;
        double bw = psd.BinWidthHz;
        double noise = floor ?? NoiseFloor.Estimate(psd);
        var p = new double[n];
        for (int i = 0; i < n; i++)
            p[i] = treatment == NoiseFloorTreatment.Subtract ? Math.Max(0, v[i] - noise) * bw : v[i] * bw;
        double total = p.Sum();
        if (total <= 0)
        {
            for (int i = 0; i < n; i++)
                p[i] = v[i] * bw;
            total = p.Sum();
        }
        double target = beta / 2 * total;
        double lower = Edge(p, f, bw, target, fromLow: true);
        double upper = Edge(p, f, bw, target, fromLow: false);
        double num = 0,
            den = 0;
        for (int i = 0; i < n; i++)
        {
            if (f[i] < lower || f[i] > upper)
                continue;
            num += p[i] * f[i];
            den += p[i];
        }
        int peak = psd.PeakIndex();
        double limit = v[peak] * Math.Pow(10, -xdb / 10);
        int lo = 0,
            hi = n - 1;
        while (lo < peak && v[lo] < limit)
            lo++;
        while (hi > peak && v[hi] < limit)
            hi--;
        double xl = lo > 0 ? Cross(f[lo - 1], v[lo - 1], f[lo], v[lo], limit) : f[0];
        double xu = hi < n - 1 ? Cross(f[hi + 1], v[hi + 1], f[hi], v[hi], limit) : f[n - 1];
        return new BandwidthResult(
            upper - lower,
            lower,
            upper,
            beta,
            xu - xl,
            xl,
            xu,
            xdb,
            noise,
            treatment,
            total,
            den > 0 ? num / den : f[peak]
        );
    }

    private static double Edge(double[] p, ReadOnlySpan<double> f, double bw, double target, bool fromLow)
    {
        int n = p.Length;
        double cum = 0;
        for (int j = 0; j < n; j++)
        {
            int i = fromLow ? j : n - 1 - j;
            if (cum + p[i] >= target && p[i] > 0)
            {
                double frac = (target - cum) / p[i];
                return fromLow ? f[i] - bw / 2 + frac * bw : f[i] + bw / 2 - frac * bw;
            }
            cum += p[i];
        }
        return fromLow ? f[n - 1] : f[0];
    }

    /// <summary>Frequency where the level crosses <paramref name="limit"/> between an outer bin (below) and an inner
    /// bin (above), interpolated in dB.</summary>
    private static double Cross(double fOut, double vOut, double fIn, double vIn, double limit)
    {
        double a = 10 * Math.Log10(Math.Max(vOut, 1e-300)),
            b = 10 * Math.Log10(vIn),
            l = 10 * Math.Log10(limit);
        double t = b - a > 0 ? (l - a) / (b - a) : 1;
        return fOut + Math.Clamp(t, 0, 1) * (fIn - fOut);
    }

    /// <summary>SNR reported when no noise is measured, and the most any reading reports, dB.</summary>
    public const double MaxSnrDb = 200;

    /// <summary>
    /// Signal-to-noise ratio in the occupied bandwidth, dB: the signal power summed by
    /// <see cref="Measure"/> over the noise floor's density times the occupied bandwidth (at least one
    /// RBW); at most <see cref="MaxSnrDb"/>.
    /// </summary>
    public static double SnrDb(PowerSpectrum psd, BandwidthResult bw)
    {
        double noiseInBand = bw.NoiseFloorDensity * Math.Max(bw.OccupiedHz, psd.RbwHz);
        return noiseInBand > 0
            ? Math.Min(MaxSnrDb, 10 * Math.Log10(Math.Max(bw.SignalPower, 1e-300) / noiseInBand))
            : MaxSnrDb;
    }

    /// <summary>
    /// Standard uncertainty of the occupied bandwidth, Hz: the root sum of squares of the edges' resolution
    /// (each edge anywhere in the window's main lobe, +/- its half-width, a rectangular distribution: GUM 4.3.7;
    /// two edges: sqrt 2 of one) and <see cref="TypeB.OccupiedFraction"/> of the reading.
    /// </summary>
    public static double OccupiedUncertaintyHz(PowerSpectrum psd, BandwidthResult bw)
    {
        double edges = Math.Sqrt(2) * psd.Window.MainLobeHalfWidthBins * psd.BinWidthHz / Math.Sqrt(3);
        return Math.Sqrt(Math.Pow(edges, 2) + Math.Pow(TypeB.OccupiedFraction * bw.OccupiedHz, 2));
    }
}
