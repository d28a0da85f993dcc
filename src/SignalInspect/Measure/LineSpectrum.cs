using SignalInspect.Dsp;

namespace SignalInspect.Measure;

/// <summary>
/// Welch power spectrum of a real stream, built from segments handed in whole (4-term
/// Blackman-Harris, whose 92 dB sidelobes keep a strong tone from leaking into the noise estimate;
/// power-per-bin scaling, one-sided), for finding spectral lines in demodulated signals: the
/// modulating tone, an FSK symbol-rate line. The caller chooses the segments (the demodulation
/// pass takes at most a fixed number, 50 % overlapped, spread over the capture). Bounded memory:
/// one accumulator.
/// </summary>
public sealed class LineSpectrum
{
    private readonly int _n;
    private readonly double _fs;
    private readonly double[] _sum;
    private readonly Window _window;
    private long _segments;

    /// <summary>Creates the accumulator.</summary>
    /// <param name="fftSize">Segment size, a power of two from 16.</param>
    /// <param name="sampleRateHz">Rate of the stream.</param>
    public LineSpectrum(int fftSize, double sampleRateHz)
    {
        _n = fftSize;
        _fs = sampleRateHz;
        _sum = new double[fftSize / 2 + 1];
        _window = Window.Create(WindowKind.BlackmanHarris, fftSize);
    }

    /// <summary>Lowest bin searched for lines: above the Blackman-Harris main lobe of the mean (+/-4 bins) and its first sidelobe.</summary>
    public const int MinBin = 6;

    /// <summary>Bin width fs / N in Hz.</summary>
    public double BinWidthHz => _fs / _n;

    /// <summary>The FFT size N.</summary>
    public int FftSize => _n;

    /// <summary>Sum of the squared window coefficients.</summary>
    public double WindowSumOfSquares => _window.SumOfSquares;


    /// <summary>Segments accumulated.</summary>
    public long Segments => _segments;

    /// <summary>FFT plan and buffers for <see cref="AddSegment"/>; one per thread.</summary>
    public sealed class Workspace
    {
        internal readonly FftPlan Fft;
        internal readonly double[] Re, Im, Pair;
        /// <summary>Where the scrambled transform leaves bin k and bin N - k (k = 0 .. N/2); null when the size cannot be scrambled.</summary>
        internal readonly int[]? At, Mirror;

        /// <summary>Creates the plan and buffers for segments of <paramref name="fftSize"/> samples.</summary>
        public Workspace(int fftSize)
        {
            Fft = new FftPlan(fftSize);
            Re = new double[fftSize];
            Im = new double[fftSize];
            Pair = new double[2 * fftSize];
            if (!Fft.CanScramble) return;
            At = new int[fftSize / 2 + 1];
            Mirror = new int[fftSize / 2 + 1];
            for (int k = 0; k <= fftSize / 2; k++)
            {
                At[k] = Fft.ScrambledIndex(k);
                Mirror[k] = Fft.ScrambledIndex((fftSize - k) & (fftSize - 1));
            }
        }

        /// <summary>The windowed transform of a segment; bin k is at (<see cref="At"/>[k]) when scrambled. False when an input is not finite.</summary>
        internal bool Transform(ReadOnlySpan<double> samples, bool complex, ReadOnlySpan<double> window) =>
            double.IsFinite(At is null ? Fft.ForwardWindowed(samples, complex, window, Re, Im) : Fft.ForwardWindowedScrambled(samples, complex, window, Re, Im));

        internal int Bin(int k) => At is null ? k : At[k];

        internal int MirrorBin(int k) => Mirror is null ? (k == 0 ? 0 : Re.Length - k) : Mirror[k];
    }

    /// <summary>
    /// Adds one segment to each of two accumulators of the same size with one complex transform:
    /// z = a + i b, then A[k] = (Z[k] + conj Z[N-k]) / 2 and B[k] = (Z[k] - conj Z[N-k]) / 2i (both
    /// streams are real). The same sums as two calls of <see cref="AddSegment"/>, to rounding;
    /// <paramref name="a"/> and <paramref name="b"/> may be one accumulator (two segments of one stream).
    /// The transform leaves its bins bit-reversed (<see cref="FftPlan.ForwardWindowedScrambled"/>);
    /// they are read through the workspace's index tables. A pair with a non-finite sample is left out.
    /// </summary>
    /// <exception cref="ArgumentException">The sizes differ.</exception>
    public static void AddSegments(LineSpectrum a, ReadOnlySpan<double> sa, LineSpectrum b, ReadOnlySpan<double> sb, Workspace ws)
    {
        int n = a._n;
        if (b._n != n || sa.Length != n || sb.Length != n || ws.Re.Length != n) throw new ArgumentException($"the segments and the workspace must hold {n} samples");
        Span<double> z = ws.Pair;
        VectorMath.Interleave(sa, sb, z);
        if (!ws.Transform(z, complex: true, a._window.Coefficients)) return;
        double[] re = ws.Re, im = ws.Im;
        for (int k = 0; k < a._sum.Length; k++)
        {
            int p = ws.Bin(k), m = ws.MirrorBin(k);
            double zr = re[p], zi = im[p], cr = re[m], ci = -im[m];
            double ar = zr + cr, ai = zi + ci, br = zr - cr, bi = zi - ci;
            a._sum[k] += 0.25 * (ar * ar + ai * ai);
            b._sum[k] += 0.25 * (br * br + bi * bi);
        }
        a._segments++;
        b._segments++;
    }

    /// <summary>Adds the periodogram of one segment of exactly <see cref="FftSize"/> samples (a segment with a non-finite sample is left out).</summary>
    /// <exception cref="ArgumentException">The segment or the workspace has another size.</exception>
    public void AddSegment(ReadOnlySpan<double> segment, Workspace ws)
    {
        if (segment.Length != _n || ws.Re.Length != _n) throw new ArgumentException($"the segment and the workspace must hold {_n} samples");
        if (!ws.Transform(segment, complex: false, _window.Coefficients)) return;
        double[] re = ws.Re, im = ws.Im;
        for (int k = 0; k < _sum.Length; k++)
        {
            int p = ws.Bin(k);
            _sum[k] += re[p] * re[p] + im[p] * im[p];
        }
        _segments++;
    }

    /// <summary>Adds the sums of another accumulator of the same size and rate, then clears it.</summary>
    /// <exception cref="ArgumentException">The sizes differ.</exception>
    public void Take(LineSpectrum other)
    {
        if (other._n != _n) throw new ArgumentException("the spectra differ in size");
        if (other._segments == 0) return;   // nothing was added to it: its sums are all zero
        for (int k = 0; k < _sum.Length; k++) _sum[k] += other._sum[k];
        _segments += other._segments;
        Array.Clear(other._sum);
        other._segments = 0;
    }

    /// <summary>Power of bin k (relative units).</summary>
    public double Power(int k) => _segments == 0 ? 0 : _sum[k] / _segments;

    /// <summary>
    /// The strongest line between <paramref name="minHz"/> and <paramref name="maxHz"/>, its frequency
    /// refined by Gaussian (log-parabolic) interpolation over the peak bin and its neighbours (near
    /// unbiased for the smooth Blackman-Harris main lobe); null when no segment was accumulated.
    /// </summary>
    public (double FrequencyHz, double Power)? Peak(double minHz, double maxHz)
    {
        if (_segments == 0) return null;
        int k0 = Math.Max(MinBin, (int)Math.Ceiling(minHz / BinWidthHz));
        int k1 = Math.Min(_sum.Length - 2, (int)Math.Floor(maxHz / BinWidthHz));
        if (k1 < k0) return null;
        int best = k0;
        for (int k = k0; k <= k1; k++) if (_sum[k] > _sum[best]) best = k;
        return (Refine(best) * BinWidthHz, Power(best));
    }

    /// <summary>All local maxima of at least <paramref name="fraction"/> of the strongest in the range, lowest frequency first.</summary>
    public IReadOnlyList<(double FrequencyHz, double Power)> Peaks(double minHz, double maxHz, double fraction)
    {
        var list = new List<(double, double)>();
        if (Peak(minHz, maxHz) is not { } top) return list;
        int k0 = Math.Max(MinBin, (int)Math.Ceiling(minHz / BinWidthHz));
        int k1 = Math.Min(_sum.Length - 2, (int)Math.Floor(maxHz / BinWidthHz));
        for (int k = k0; k <= k1; k++)
            if (_sum[k] >= _sum[k - 1] && _sum[k] > _sum[k + 1] && Power(k) >= fraction * top.Power)
                list.Add((Refine(k) * BinWidthHz, Power(k)));
        return list;
    }

    private double Refine(int k) => k + Spectrum.PeakInterpolation.LogParabolic(_sum[k - 1], _sum[k], _sum[k + 1]);
}

/// <summary>Variance estimates from a <see cref="LineSpectrum"/>: how much of a stream is a tone and how much is noise.</summary>
public static class LineSpectrumVariance
{
    /// <summary>
    /// Variance of the stream between <paramref name="minHz"/> and <paramref name="maxHz"/>, split into
    /// the part in the lines at the harmonics of <paramref name="toneHz"/> (within +/- guard bins) and
    /// the rest, the noise; the noise in the guarded bins is filled in from the mean of the others.
    /// For a windowed periodogram, variance = 2 / (N sum w^2) x the sum of one-sided |X|^2.
    /// The guard of 6 bins covers the Blackman-Harris main lobe (+/-4 bins) and its first sidelobes.
    /// </summary>
    public static (double Tone, double Noise) Split(this LineSpectrum s, double toneHz, double minHz, double maxHz, int guard = 6)
    {
        int n = s.FftSize;
        double sumW2 = s.WindowSumOfSquares;
        // Bins within the guard of 0 Hz hold the leakage of the mean (for an envelope, the carrier): left out.
        int k0 = Math.Max(guard + 1, (int)Math.Ceiling(minHz / s.BinWidthHz)), k1 = Math.Min(n / 2 - 1, (int)Math.Floor(maxHz / s.BinWidthHz));
        double tone = 0, noise = 0;
        int noiseBins = 0, all = 0;
        for (int k = k0; k <= k1; k++)
        {
            all++;
            double f = k * s.BinWidthHz;
            bool near = toneHz > 0 && Math.Abs(f - Math.Round(f / toneHz) * toneHz) <= guard * s.BinWidthHz && Math.Round(f / toneHz) >= 1;
            if (near) tone += s.Power(k);
            else { noise += s.Power(k); noiseBins++; }
        }
        double scale = 2.0 / (n * sumW2);
        double noisePerBin = noiseBins > 0 ? noise / noiseBins : 0;
        double guardedNoise = noisePerBin * (all - noiseBins);
        return (Math.Max(0, tone - guardedNoise) * scale, (noise + guardedNoise) * scale);
    }
}

/// <summary>The peak of a sine from a high percentile when Gaussian noise is added to it.</summary>
public static class SinePeak
{
    /// <summary>
    /// The peak D of a sine such that D sin(theta) + n, theta uniform and n Gaussian of standard
    /// deviation <paramref name="sigma"/>, exceeds <paramref name="level"/> a fraction
    /// <paramref name="tail"/> of the time. With sigma = 0 this is level / cos(pi tail) (the
    /// arcsine law). Used to read a tone's peak from the 99.9th percentile without the noise that
    /// raises the percentile.
    /// </summary>
    public static double FromPercentile(double level, double sigma, double tail = 0.001)
    {
        if (!(level > 0)) return level;
        if (!(sigma > 0)) return level / Math.Cos(Math.PI * tail);
        // P = (1/pi) int_0^pi Q((level - d cos phi) / sigma) dphi, integrated only where the
        // integrand is not negligible (d cos phi above level - 9 sigma), finely.
        double Exceed(double d)
        {
            double c = (level - 9 * sigma) / d;
            double phiMax = c <= -1 ? Math.PI : c >= 1 ? 0 : Math.Acos(c);
            if (phiMax <= 0) return 0;
            const int steps = 4000;
            double s = 0, h = phiMax / steps;
            for (int i = 0; i < steps; i++) s += UpperTail((level - d * Math.Cos((i + 0.5) * h)) / sigma);
            return s * h / Math.PI;
        }
        double lo = Math.Max(0, level - 6 * sigma), hi = level / Math.Cos(Math.PI * tail) + 1e-12;
        if (Exceed(lo) > tail) return lo;
        // Bisection to 1e-10 of the bracket's top (about 35 halvings rather than a fixed 60).
        for (int it = 0; it < 60 && hi - lo > 1e-10 * hi; it++)
        {
            double mid = (lo + hi) / 2;
            if (Exceed(mid) < tail) lo = mid; else hi = mid;
        }
        return (lo + hi) / 2;
    }

    /// <summary>
    /// <see cref="FromPercentile"/> of an upper and a lower excursion with the same noise, the two
    /// computed side by side (each integrates the tail a few hundred thousand times).
    /// </summary>
    public static (double Upper, double Lower) FromPercentiles(double upper, double lower, double sigma)
    {
        Task<double> up = Task.Run(() => FromPercentile(upper, sigma));
        double low = FromPercentile(lower, sigma);
        return (up.Result, low);
    }

    private static double UpperTail(double z) => 0.5 * MathNet.Numerics.SpecialFunctions.Erfc(z / Math.Sqrt(2));
}
