using System.Runtime.Intrinsics;
using SignalInspect.Dsp;

namespace SignalInspect.Spectrum;

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

    // In the folded order of the transform (see ScrambledFold); _fold.SlotOf[k] is bin k's slot.
    private readonly double[] _sum;
    private readonly ScrambledFold _fold;
    private readonly Window _window;
    private long _segments;

    /// <summary>Creates the accumulator.</summary>
    /// <param name="fftSize">Segment size, a power of two from 16.</param>
    /// <param name="sampleRateHz">Rate of the stream.</param>
    /// <exception cref="ArgumentOutOfRangeException">The size is not a power of two from 16.</exception>
    public LineSpectrum(int fftSize, double sampleRateHz)
    {
        _fold = ScrambledFold.For(fftSize);
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

    /// <summary>A bin's power (<see cref="Power"/>) to the stream's variance: 2 / (N sum w^2) for a windowed
    /// one-sided periodogram.</summary>
    public double VarianceScale => 2.0 / (_n * _window.SumOfSquares);

    /// <summary>Segments accumulated.</summary>
    public long Segments => _segments;

    /// <summary>FFT plan and buffers for <see cref="AddSegment"/>; one per thread.</summary>
    public sealed class Workspace
    {
        internal readonly FftPlan Fft;
        internal readonly double[] Re,
            Im;
        internal readonly ScrambledFold Fold;
        private double[] _pair = [];

        /// <summary>Room for two interleaved segments (made on first use: the demodulation pass transforms straight out
        /// of its rings).</summary>
        internal double[] Pair => _pair.Length != 0 ? _pair : _pair = new double[2 * Re.Length];

        /// <summary>Creates the plan and buffers for segments of <paramref name="fftSize"/> samples.</summary>
        /// <exception cref="ArgumentOutOfRangeException">The size is not a power of two from 16.</exception>
        public Workspace(int fftSize)
        {
            Fold = ScrambledFold.For(fftSize);
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
    /// Adds one segment to each of two accumulators of the same size with one complex transform:
    /// z = a + i b, then A[k] = (Z[k] + conj Z[N-k]) / 2 and B[k] = (Z[k] - conj Z[N-k]) / 2i (both
    /// streams are real). The same sums as two calls of <see cref="AddSegment"/>, to rounding;
    /// <paramref name="a"/> and <paramref name="b"/> may be one accumulator (two segments of one stream).
    /// The transform leaves its bins bit-reversed (<see cref="FftPlan.ForwardWindowedScrambled"/>);
    /// they are read in that order and summed in the folded order (see <see cref="ScrambledFold"/>). A pair with
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

    /// <summary>Adds the two streams' powers from the pair's scrambled transform in the workspace.</summary>
    private static void FoldPair(LineSpectrum a, LineSpectrum b, Workspace ws)
    {
        ws.Fold.AddPairPowers(ws.Re, ws.Im, a._sum, b._sum);
        a._segments++;
        b._segments++;
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
        ScrambledFold f = ws.Fold;
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

    private double Refine(int k) => k + PeakInterpolation.LogParabolic(Raw(k - 1), Raw(k), Raw(k + 1));
}
