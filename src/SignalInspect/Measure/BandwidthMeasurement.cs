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
/// <param name="EdgesOnLines">How many of the occupied band's edges (0 to 2) fell within a spectral line's main
/// lobe and were set on the line itself (see <see cref="BandwidthMeasurement"/>).</param>
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
    double CentroidHz,
    int EdgesOnLines = 0
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
        int lobe = (int)Math.Ceiling((double)psd.Window.MainLobeHalfWidthBins);
        var lowEdge = Edge(p, f, bw, target, fromLow: true);
        var upEdge = Edge(p, f, bw, target, fromLow: false);
        var (lower, lowOnLine, lowLine) = OnLine(p, f, bw, lobe, lowEdge);
        var (upper, upOnLine, upLine) = OnLine(p, f, bw, lobe, upEdge);
        // Both edges on one line: the emission is narrower than the resolution shows (a carrier); it keeps the
        // window's width rather than reading zero.
        if (lowOnLine && upOnLine && lowLine == upLine)
            (lower, lowOnLine, upper, upOnLine) = (lowEdge.Hz, false, upEdge.Hz, false);
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
            den > 0 ? num / den : f[peak],
            (lowOnLine ? 1 : 0) + (upOnLine ? 1 : 0)
        );
    }

    /// <summary>A line stands this many times above the spectrum just outside its main lobe (10 dB).</summary>
    public const double LineProminence = 10;

    /// <summary>
    /// An edge that falls within the main lobe of a spectral line is set on the line's frequency: a line's power
    /// sits at one frequency, so the cumulative power jumps there and the beta/2 point is the line itself (the
    /// window only smears it over the lobe, and reading the crossing inside the lobe reads a line spectrum's
    /// occupied bandwidth short). A line: the largest bin within the lobe of the crossing, at least
    /// <see cref="LineProminence"/> times the mean of the bins one to two lobe widths beyond it on both sides; its
    /// frequency by Gaussian (log-parabolic) interpolation of the three bins about it.
    /// </summary>
    private static (double Hz, bool OnLine, int Line) OnLine(
        double[] p,
        ReadOnlySpan<double> f,
        double bw,
        int lobe,
        (double Hz, int Bin) edge
    )
    {
        int n = p.Length,
            i = edge.Bin;
        if (i < 0 || lobe < 1)
            return (edge.Hz, false, -1);
        int k = i;
        for (int j = Math.Max(1, i - lobe); j <= Math.Min(n - 2, i + lobe); j++)
            if (p[j] > p[k])
                k = j;
        if (k <= 0 || k >= n - 1 || !(p[k] > 0))
            return (edge.Hz, false, -1);
        double ring = 0;
        int count = 0;
        for (int d = 2 * lobe; d <= 4 * lobe; d++)
            foreach (int j in (int[])[k - d, k + d])
                if (j >= 0 && j < n)
                    (ring, count) = (ring + p[j], count + 1);
        if (count == 0 || p[k] < LineProminence * ring / count)
            return (edge.Hz, false, -1);
        double a = Math.Log(Math.Max(p[k - 1], 1e-300)),
            b = Math.Log(p[k]),
            c = Math.Log(Math.Max(p[k + 1], 1e-300));
        double den = a - 2 * b + c,
            delta = den < 0 ? Math.Clamp(0.5 * (a - c) / den, -0.5, 0.5) : 0;
        return (f[k] + delta * bw, true, k);
    }

    private static (double Hz, int Bin) Edge(double[] p, ReadOnlySpan<double> f, double bw, double target, bool fromLow)
    {
        int n = p.Length;
        double cum = 0;
        for (int j = 0; j < n; j++)
        {
            int i = fromLow ? j : n - 1 - j;
            if (cum + p[i] >= target && p[i] > 0)
            {
                double frac = (target - cum) / p[i];
                return (fromLow ? f[i] - bw / 2 + frac * bw : f[i] + bw / 2 - frac * bw, i);
            }
            cum += p[i];
        }
        return (fromLow ? f[n - 1] : f[0], -1);
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
    /// Standard uncertainty of the occupied bandwidth, Hz, the root sum of squares of each edge's: an edge set on a
    /// line (<see cref="BandwidthResult.EdgesOnLines"/>) is as good as the line's interpolated frequency
    /// (<see cref="TypeB.LineEdgeBins"/> of a bin for the Hann window, <see cref="TypeB.LineEdgeBinsOther"/> for
    /// the others); any other edge lies anywhere in the window's main lobe, +/- its half-width, a rectangular
    /// distribution (GUM 4.3.7), with <see cref="TypeB.OccupiedFraction"/> of the reading beside it.
    /// </summary>
    public static double OccupiedUncertaintyHz(PowerSpectrum psd, BandwidthResult bw) =>
        Math.Sqrt(OccupiedBudget(psd, bw).Sum(c => c.StandardUncertainty * c.StandardUncertainty));

    /// <summary>The components of <see cref="OccupiedUncertaintyHz"/>, each named with its source (zero ones
    /// left out).</summary>
    public static IReadOnlyList<UncertaintyComponent> OccupiedBudget(PowerSpectrum psd, BandwidthResult bw)
    {
        int onLines = bw.EdgesOnLines,
            off = 2 - onLines;
        bool hann = psd.Window.Kind == Dsp.WindowKind.Hann;
        double line = (hann ? TypeB.LineEdgeBins : TypeB.LineEdgeBinsOther) * psd.BinWidthHz,
            lobe = psd.Window.MainLobeHalfWidthBins * psd.BinWidthHz / Math.Sqrt(3);
        var list = new List<UncertaintyComponent>();
        if (onLines > 0)
            list.Add(
                new(
                    "edges on spectral lines (interpolated line)",
                    Math.Sqrt(onLines) * line,
                    hann ? "TypeB.LineEdgeBins of a bin, each edge on a line" : "TypeB.LineEdgeBinsOther"
                )
            );
        if (off > 0)
        {
            list.Add(
                new(
                    "edges within the window's main lobe (resolution)",
                    Math.Sqrt(off) * lobe,
                    "the main lobe's half-width, rectangular (GUM 4.3.7), each edge not on a line"
                )
            );
            list.Add(new("reading's share", TypeB.OccupiedFraction * bw.OccupiedHz, "TypeB.OccupiedFraction"));
        }
        return list;
    }
}
