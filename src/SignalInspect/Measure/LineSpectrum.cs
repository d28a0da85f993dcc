using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
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
    private readonly double[] _sum; // in the folded order of the transform (see Fold); _fold.SlotOf[k] is bin k's
    private readonly Fold _fold;
    private readonly Window _window;
    private long _segments;

    /// <summary>Creates the accumulator.</summary>
    /// <param name="fftSize">Segment size, a power of two from 16.</param>
    /// <param name="sampleRateHz">Rate of the stream.</param>
    /// <exception cref="ArgumentOutOfRangeException">The size is not a power of two from 16.</exception>
    public LineSpectrum(int fftSize, double sampleRateHz)
    {
        _fold = Fold.For(fftSize);
        _n = fftSize;
        _fs = sampleRateHz;
        _sum = new double[fftSize / 2 + 1];
        // Written once now so that its pages are first touched by a write. A fresh page that is
        // first read is mapped to the kernel's shared zero page, and the first add then pays a
        // second fault and a TLB flush on every core (perf: 14 ms of CPU in a 10 s analyze).
        _sum.AsSpan().Fill(0);
        _window = Window.Create(WindowKind.BlackmanHarris, fftSize);
    }

    /// <summary>Lowest bin searched for lines: above the Blackman-Harris main lobe of the mean (+/-4 bins) and its
    /// first sidelobe.</summary>
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
        internal readonly double[] Re,
            Im;
        internal readonly Fold Fold;
        private double[] _pair = [];

        /// <summary>Room for two interleaved segments (made on first use: the demodulation pass transforms straight out
        /// of its rings).</summary>
        internal double[] Pair => _pair.Length != 0 ? _pair : _pair = new double[2 * Re.Length];

        /// <summary>Creates the plan and buffers for segments of <paramref name="fftSize"/> samples.</summary>
        /// <exception cref="ArgumentOutOfRangeException">The size is not a power of two from 16.</exception>
        public Workspace(int fftSize)
        {
            Fold = Fold.For(fftSize);
            Fft = new FftPlan(fftSize);
            Re = new double[fftSize];
            Im = new double[fftSize];
        }

        /// <summary>The windowed transform of a segment, its bins left scrambled (<see
        /// cref="FftPlan.ScrambledIndex"/>). False when an input is not finite.</summary>
        internal bool Transform(ReadOnlySpan<double> samples, bool complex, ReadOnlySpan<double> window) =>
            double.IsFinite(Fft.ForwardWindowedScrambled(samples, complex, window, Re, Im));
    }

    /// <summary>
    /// Where the sums are kept: in the order the scrambled transform leaves its bins, folded, so that
    /// adding a transform reads it front to back and writes the sums in order. The bins k = i N/16
    /// (i = 0 .. 8) lie in the transform's first 16 places and are kept in slots 0 .. 7 and N/2. Every
    /// later block of places [h, 2h) (h = 16, 32 .. N/2) holds pairs of bins k and N - k at places
    /// h + r and 2h - 1 - r (r &lt; h/2; bit reversal maps N - k to the complement of k's place within
    /// its block, and the transposed last pass only permutes the low four bits), kept in slot h/2 + r.
    /// A place in those blocks holds a bin below N/2 when its bit <see cref="LowHalfBit"/> is clear.
    /// </summary>
    internal sealed class Fold
    {
        private static readonly System.Collections.Concurrent.ConcurrentDictionary<int, Fold> Made = new();

        /// <summary>Slot of bin k (0 .. N/2).</summary>
        public readonly int[] SlotOf;

        /// <summary>Places of the bins i N/16 and N - i N/16, i = 0 .. 8.</summary>
        public readonly int[] HeadPlace = new int[9],
            HeadMirror = new int[9];
        public readonly int LowHalfBit;

        private Fold(int n)
        {
            var plan = new FftPlan(n);
            var binAt = new int[n];
            for (int k = 0; k < n; k++)
                binAt[plan.ScrambledIndex(k)] = k;
            SlotOf = new int[n / 2 + 1];
            for (int i = 0; i <= 8; i++)
            {
                int k = i * (n / 16);
                HeadPlace[i] = plan.ScrambledIndex(k);
                HeadMirror[i] = plan.ScrambledIndex((n - k) & (n - 1));
                SlotOf[k] = i < 8 ? i : n / 2;
            }
            for (int h = 16; h < n; h *= 2)
                for (int r = 0; r < h / 2; r++)
                {
                    int k = binAt[h + r];
                    SlotOf[Math.Min(k, n - k)] = h / 2 + r;
                }
            LowHalfBit = plan.ScrambledIndex(n / 2);
        }

        public static Fold For(int n)
        {
            if (n < 16 || (n & (n - 1)) != 0)
                throw new ArgumentOutOfRangeException(nameof(n), n, "line spectra need a power-of-two size from 16");
            return Made.GetOrAdd(n, static n => new Fold(n));
        }
    }

    /// <summary>
    /// Adds one segment to each of two accumulators of the same size with one complex transform:
    /// z = a + i b, then A[k] = (Z[k] + conj Z[N-k]) / 2 and B[k] = (Z[k] - conj Z[N-k]) / 2i (both
    /// streams are real). The same sums as two calls of <see cref="AddSegment"/>, to rounding;
    /// <paramref name="a"/> and <paramref name="b"/> may be one accumulator (two segments of one stream).
    /// The transform leaves its bins bit-reversed (<see cref="FftPlan.ForwardWindowedScrambled"/>);
    /// they are read in that order and summed in the folded order (see <see cref="Fold"/>). A pair with
    /// a non-finite sample is left out.
    /// </summary>
    /// <exception cref="ArgumentException">The sizes differ.</exception>
    public static void AddSegments(
        LineSpectrum a,
        ReadOnlySpan<double> sa,
        LineSpectrum b,
        ReadOnlySpan<double> sb,
        Workspace ws
    ) => AddSegments(a, sa, default, b, sb, default, ws);

    /// <summary>
    /// <see cref="AddSegments(LineSpectrum, ReadOnlySpan{double}, LineSpectrum, ReadOnlySpan{double}, Workspace)"/>
    /// with each segment in two pieces, <paramref name="a1"/> then <paramref name="a2"/> and
    /// <paramref name="b1"/> then <paramref name="b2"/> (a1 and b1 of one length): segments read
    /// straight out of ring buffers.
    /// </summary>
    /// <exception cref="ArgumentException">The sizes differ.</exception>
    public static void AddSegments(
        LineSpectrum a,
        ReadOnlySpan<double> a1,
        ReadOnlySpan<double> a2,
        LineSpectrum b,
        ReadOnlySpan<double> b1,
        ReadOnlySpan<double> b2,
        Workspace ws
    )
    {
        int n = a._n;
        if (
            b._n != n
            || a1.Length + a2.Length != n
            || b1.Length != a1.Length
            || b2.Length != a2.Length
            || ws.Re.Length != n
        )
            throw new ArgumentException($"the segments and the workspace must hold {n} samples");
        Span<double> z = ws.Pair;
        VectorMath.Interleave(a1, b1, z);
        VectorMath.Interleave(a2, b2, z[(2 * a1.Length)..]);
        if (!ws.Transform(z, complex: true, a._window.Coefficients))
            return;
        FoldPair(a, b, ws);
    }

    /// <summary>
    /// <see cref="AddSegments(LineSpectrum, ReadOnlySpan{double}, LineSpectrum, ReadOnlySpan{double}, Workspace)"/>
    /// with each segment read straight out of a ring of N values (<see cref="FftPlan.ForwardWindowedScrambledPair"/>):
    /// a's segment is <paramref name="ringA"/> from <paramref name="startA"/> on, then from 0, each
    /// start a multiple of N / 4. The same sums as the segments copied out and added, bit for bit.
    /// </summary>
    /// <exception cref="ArgumentException">The sizes differ or a start is not a multiple of N / 4.</exception>
    internal static void AddRingSegments(
        LineSpectrum a,
        double[] ringA,
        int startA,
        LineSpectrum b,
        double[] ringB,
        int startB,
        Workspace ws
    )
    {
        int n = a._n;
        if (b._n != n || ws.Re.Length != n)
            throw new ArgumentException($"the spectra and the workspace must be of {n} points");
        if (
            !double.IsFinite(
                ws.Fft.ForwardWindowedScrambledPair(ringA, startA, ringB, startB, a._window.Coefficients, ws.Re, ws.Im)
            )
        )
            return;
        FoldPair(a, b, ws);
    }

    /// <summary>Adds the two streams' powers from the pair's scrambled transform in the workspace (see <see
    /// cref="Fold"/>).</summary>
    private static void FoldPair(LineSpectrum a, LineSpectrum b, Workspace ws)
    {
        int n = a._n;
        ref double re = ref MemoryMarshal.GetArrayDataReference(ws.Re),
            im = ref MemoryMarshal.GetArrayDataReference(ws.Im);
        double[] sumA = a._sum,
            sumB = b._sum;
        Fold f = ws.Fold;
        for (int i = 0; i <= 8; i++)
        {
            int slot = i < 8 ? i : n / 2;
            Pair(
                Unsafe.Add(ref re, f.HeadPlace[i]),
                Unsafe.Add(ref im, f.HeadPlace[i]),
                Unsafe.Add(ref re, f.HeadMirror[i]),
                Unsafe.Add(ref im, f.HeadMirror[i]),
                ref sumA[slot],
                ref sumB[slot]
            );
        }
        var quarter = Vector256.Create(0.25);
        for (int h = 16; h < n; h *= 2)
        {
            int half = h / 2,
                r = 0;
            ref double sa = ref sumA[half],
                sb = ref sumB[half];
            if (Vector256.IsHardwareAccelerated)
                for (; r + 4 <= half; r += 4)
                {
                    // Places h + r .. h + r + 3 and, reversed, their mirrors 2h - 1 - r .. 2h - 4 - r.
                    Vector256<double> zr = Vector256.LoadUnsafe(ref re, (nuint)(h + r)),
                        zi = Vector256.LoadUnsafe(ref im, (nuint)(h + r));
                    Vector256<double> cr = Reverse(Vector256.LoadUnsafe(ref re, (nuint)(2 * h - 4 - r)));
                    Vector256<double> ci = -Reverse(Vector256.LoadUnsafe(ref im, (nuint)(2 * h - 4 - r)));
                    Vector256<double> ar = zr + cr,
                        ai = zi + ci,
                        br = zr - cr,
                        bi = zi - ci;
                    (Vector256.LoadUnsafe(ref sa, (nuint)r) + quarter * (ar * ar + ai * ai)).StoreUnsafe(
                        ref sa,
                        (nuint)r
                    );
                    (Vector256.LoadUnsafe(ref sb, (nuint)r) + quarter * (br * br + bi * bi)).StoreUnsafe(
                        ref sb,
                        (nuint)r
                    );
                }
            for (; r < half; r++)
                Pair(
                    Unsafe.Add(ref re, h + r),
                    Unsafe.Add(ref im, h + r),
                    Unsafe.Add(ref re, 2 * h - 1 - r),
                    Unsafe.Add(ref im, 2 * h - 1 - r),
                    ref Unsafe.Add(ref sa, r),
                    ref Unsafe.Add(ref sb, r)
                );
        }
        a._segments++;
        b._segments++;

        static Vector256<double> Reverse(Vector256<double> v) => Vector256.Shuffle(v, Vector256.Create(3L, 2, 1, 0));

        // The two streams' powers at a bin from Z there (zr, zi) and at its mirror (mr, mi).
        static void Pair(double zr, double zi, double mr, double mi, ref double sa, ref double sb)
        {
            double cr = mr,
                ci = -mi;
            double ar = zr + cr,
                ai = zi + ci,
                br = zr - cr,
                bi = zi - ci;
            sa += 0.25 * (ar * ar + ai * ai);
            sb += 0.25 * (br * br + bi * bi);
        }
    }

    /// <summary>Adds the periodogram of one segment of exactly <see cref="FftSize"/> samples (a segment with a
    /// non-finite sample is left out).</summary>
    /// <exception cref="ArgumentException">The segment or the workspace has another size.</exception>
    public void AddSegment(ReadOnlySpan<double> segment, Workspace ws)
    {
        if (segment.Length != _n || ws.Re.Length != _n)
            throw new ArgumentException($"the segment and the workspace must hold {_n} samples");
        if (!ws.Transform(segment, complex: false, _window.Coefficients))
            return;
        double[] re = ws.Re,
            im = ws.Im;
        Fold f = ws.Fold;
        for (int i = 0; i <= 8; i++)
        {
            int p = f.HeadPlace[i];
            _sum[i < 8 ? i : _n / 2] += re[p] * re[p] + im[p] * im[p];
        }
        // Of each pair of places, the one of the bin below N/2 (the sums are one-sided).
        for (int h = 16; h < _n; h *= 2)
            for (int r = 0; r < h / 2; r++)
            {
                int p = h + r;
                if ((p & f.LowHalfBit) != 0)
                    p = 2 * h - 1 - r;
                _sum[h / 2 + r] += re[p] * re[p] + im[p] * im[p];
            }
        _segments++;
    }

    /// <summary>Adds the sums of another accumulator of the same size and rate, then clears it.</summary>
    /// <exception cref="ArgumentException">The sizes differ.</exception>
    public void Take(LineSpectrum other)
    {
        if (other._n != _n)
            throw new ArgumentException("the spectra differ in size");
        if (other._segments == 0)
            return; // nothing was added to it: its sums are all zero
        // Added and cleared in one sweep.
        Span<double> into = _sum,
            from = other._sum;
        int k = 0;
        if (Vector256.IsHardwareAccelerated)
            for (; k + 4 <= into.Length; k += 4)
            {
                (Vector256.Create<double>(into[k..]) + Vector256.Create<double>(from[k..])).CopyTo(into[k..]);
                Vector256<double>.Zero.CopyTo(from[k..]);
            }
        for (; k < into.Length; k++)
        {
            into[k] += from[k];
            from[k] = 0;
        }
        _segments += other._segments;
        other._segments = 0;
    }

    // The raw sum of bin k.
    private double Raw(int k) => _sum[_fold.SlotOf[k]];

    /// <summary>Power of bin k (relative units).</summary>
    public double Power(int k) => _segments == 0 ? 0 : Raw(k) / _segments;

    /// <summary>
    /// The strongest line between <paramref name="minHz"/> and <paramref name="maxHz"/>, its frequency
    /// refined by Gaussian (log-parabolic) interpolation over the peak bin and its neighbours (near
    /// unbiased for the smooth Blackman-Harris main lobe); null when no segment was accumulated.
    /// </summary>
    public (double FrequencyHz, double Power)? Peak(double minHz, double maxHz)
    {
        if (_segments == 0)
            return null;
        int k0 = Math.Max(MinBin, (int)Math.Ceiling(minHz / BinWidthHz));
        int k1 = Math.Min(_sum.Length - 2, (int)Math.Floor(maxHz / BinWidthHz));
        if (k1 < k0)
            return null;
        int best = k0;
        for (int k = k0; k <= k1; k++)
            if (Raw(k) > Raw(best))
                best = k;
        return (Refine(best) * BinWidthHz, Power(best));
    }

    /// <summary>All local maxima of at least <paramref name="fraction"/> of the strongest in the range, lowest
    /// frequency first.</summary>
    public IReadOnlyList<(double FrequencyHz, double Power)> Peaks(double minHz, double maxHz, double fraction)
    {
        var list = new List<(double, double)>();
        if (Peak(minHz, maxHz) is not { } top)
            return list;
        int k0 = Math.Max(MinBin, (int)Math.Ceiling(minHz / BinWidthHz));
        int k1 = Math.Min(_sum.Length - 2, (int)Math.Floor(maxHz / BinWidthHz));
        for (int k = k0; k <= k1; k++)
            if (Raw(k) >= Raw(k - 1) && Raw(k) > Raw(k + 1) && Power(k) >= fraction * top.Power)
                list.Add((Refine(k) * BinWidthHz, Power(k)));
        return list;
    }

    private double Refine(int k) => k + Spectrum.PeakInterpolation.LogParabolic(Raw(k - 1), Raw(k), Raw(k + 1));
}

/// <summary>Variance estimates from a <see cref="LineSpectrum"/>: how much of a stream is a tone and how much is
/// noise.</summary>
public static class LineSpectrumVariance
{
    /// <summary>
    /// Variance of the stream between <paramref name="minHz"/> and <paramref name="maxHz"/>, split into
    /// the part in the lines at the harmonics of <paramref name="toneHz"/> (within +/- guard bins) and
    /// the rest, the noise; the noise in the guarded bins is filled in from the mean of the others.
    /// For a windowed periodogram, variance = 2 / (N sum w^2) x the sum of one-sided |X|^2.
    /// The guard of 6 bins covers the Blackman-Harris main lobe (+/-4 bins) and its first sidelobes.
    /// </summary>
    public static (double Tone, double Noise) Split(
        this LineSpectrum s,
        double toneHz,
        double minHz,
        double maxHz,
        int guard = 6
    )
    {
        int n = s.FftSize;
        double sumW2 = s.WindowSumOfSquares;
        // Bins within the guard of 0 Hz hold the leakage of the mean (for an envelope, the carrier): left out.
        int k0 = Math.Max(guard + 1, (int)Math.Ceiling(minHz / s.BinWidthHz)),
            k1 = Math.Min(n / 2 - 1, (int)Math.Floor(maxHz / s.BinWidthHz));
        double tone = 0,
            noise = 0;
        int noiseBins = 0,
            all = 0;
        for (int k = k0; k <= k1; k++)
        {
            all++;
            double f = k * s.BinWidthHz;
            bool near =
                toneHz > 0
                && Math.Abs(f - Math.Round(f / toneHz) * toneHz) <= guard * s.BinWidthHz
                && Math.Round(f / toneHz) >= 1;
            if (near)
                tone += s.Power(k);
            else
            {
                noise += s.Power(k);
                noiseBins++;
            }
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
        if (!(level > 0))
            return level;
        if (!(sigma > 0))
            return level / Math.Cos(Math.PI * tail);
        // P = (1/pi) int_0^pi Q((level - d cos phi) / sigma) dphi, integrated only where the
        // integrand is not negligible (d cos phi above level - 9 sigma), by the midpoint rule. The
        // integrand is even about phi = 0 and dies away at the upper end, so the rule converges
        // far faster than its h^2 (Euler-Maclaurin): checked against scipy.integrate.quad for
        // sigma / level from 1e-5 to 2 and d across the search's bracket, 512 steps were within
        // 2e-11 relative (4000 before: the same to 1e-11, eight times the erfc calls).
        double Exceed(double d)
        {
            double c = (level - 9 * sigma) / d;
            double phiMax =
                c <= -1 ? Math.PI
                : c >= 1 ? 0
                : Math.Acos(c);
            if (phiMax <= 0)
                return 0;
            const int steps = 512;
            double s = 0,
                h = phiMax / steps;
            for (int i = 0; i < steps; i++)
                s += UpperTail((level - d * Math.Cos((i + 0.5) * h)) / sigma);
            return s * h / Math.PI;
        }
        double lo = Math.Max(0, level - 6 * sigma),
            hi = level / Math.Cos(Math.PI * tail) + 1e-12;
        // The root of ln(exceedance / tail), increasing in d and close to a straight line where the
        // tail's exponential has been taken out, bracketed to 1e-10 of the bracket's top by the
        // Illinois method (false position, the value of an end kept twice in a row halved; a halving
        // while an end's value is not finite): 9 to 16 integrations where bisection took 35.
        double flo = Math.Log(Exceed(lo) / tail);
        if (flo > 0)
            return lo;
        double fhi = Math.Log(Exceed(hi) / tail);
        if (!(fhi > 0))
            return hi;
        int kept = 0; // +1: the top was kept last time, -1: the bottom
        for (int it = 0; it < 100 && hi - lo > 1e-10 * hi; it++)
        {
            double x = lo - flo * (hi - lo) / (fhi - flo);
            if (!(x > lo && x < hi) || !double.IsFinite(flo))
                x = (lo + hi) / 2;
            double fx = Math.Log(Exceed(x) / tail);
            if (fx == 0)
                return x;
            if (fx < 0)
            {
                lo = x;
                flo = fx;
                if (kept == 1)
                    fhi /= 2;
                kept = 1;
            }
            else
            {
                hi = x;
                fhi = fx;
                if (kept == -1)
                    flo /= 2;
                kept = -1;
            }
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
