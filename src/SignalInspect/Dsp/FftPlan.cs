using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Dsp;

/// <summary>
/// A complex discrete Fourier transform of one size, X[k] = sum_n x[n] exp(-2 pi i n k / N),
/// on split real/imaginary arrays, in place. Powers of two use an iterative radix-2
/// decimation-in-time FFT with per-stage twiddle tables and SIMD butterflies
/// (<see cref="Vector{T}"/>); other sizes use Bluestein's chirp-z algorithm on a power-of-two
/// FFT. A plan holds its tables and scratch buffers: create it once, call it per block. Not
/// thread-safe: give each thread its own plan.
/// </summary>
/// <remarks>
/// Chosen over MathNet.Numerics' FFT after measuring both (see tests/Benchmarks/RESULTS.md);
/// tested against MathNet and a direct DFT (tests/SignalInspect.Tests/Dsp/FftPlanTests.cs).
/// </remarks>
public sealed class FftPlan
{
    /// <summary>Largest size a plan accepts.</summary>
    public const int MaxSize = 1 << 24;

    private readonly int _n;
    private readonly int _log2;
    private readonly bool _wide = Simd.Wide;
    private readonly int[] _bitReverse = [];
    private readonly double[] _twRe = [];
    private readonly double[] _twIm = [];
    private readonly int[] _stageOffset = [];

    // Bluestein
    private readonly FftPlan? _inner;
    private readonly double[] _chirpRe = [];
    private readonly double[] _chirpIm = [];
    private readonly double[] _kernelRe = [];
    private readonly double[] _kernelIm = [];
    private readonly double[] _workRe = [];
    private readonly double[] _workIm = [];

    private static readonly System.Collections.Concurrent.ConcurrentDictionary<
        int,
        (int[], int[], double[], double[])
    > Tables = new();

    /// <summary>Creates a plan for transforms of <paramref name="size"/> points.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Size below 1 or above <see cref="MaxSize"/>.</exception>
    public FftPlan(int size)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(size, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(size, MaxSize);
        _n = size;
        if (BitOperations.IsPow2(size))
        {
            _log2 = BitOperations.Log2((uint)size);
            // The tables of a size are immutable: built once per process and shared by its plans.
            if (Tables.TryGetValue(size, out var t))
            {
                (_bitReverse, _stageOffset, _twRe, _twIm) = t;
                return;
            }
            _bitReverse = new int[size];
            for (int i = 0; i < size; i++)
                _bitReverse[i] = (int)(ReverseBits((uint)i) >> (32 - _log2)) & (size - 1);
            if (_log2 == 0)
                _bitReverse[0] = 0;
            // Stage with half-length h uses w_k = exp(-2 pi i k / (2h)), k < h, stored contiguously.
            _stageOffset = new int[_log2 + 1];
            int total = 0;
            for (int s = 1, h = 1; s <= _log2; s++, h <<= 1)
            {
                _stageOffset[s] = total;
                total += h;
            }
            _twRe = new double[Math.Max(total, 1)];
            _twIm = new double[Math.Max(total, 1)];
            // The last stage's factors are computed; every earlier stage's are every (N/2)/h-th of them.
            // Exactly the values computed directly: -pi k m / (h m) rounds as -pi k / h for m a power of two.
            if (_log2 > 0)
            {
                int top = _stageOffset[_log2],
                    half = size / 2;
                for (int k = 0; k < half; k++)
                {
                    double a = -Math.PI * k / half;
                    _twRe[top + k] = Math.Cos(a);
                    _twIm[top + k] = Math.Sin(a);
                }
                for (int s = 1, h = 1; s < _log2; s++, h <<= 1)
                    for (int k = 0, step = half / h; k < h; k++)
                    {
                        _twRe[_stageOffset[s] + k] = _twRe[top + k * step];
                        _twIm[_stageOffset[s] + k] = _twIm[top + k * step];
                    }
            }
            Tables.TryAdd(size, (_bitReverse, _stageOffset, _twRe, _twIm));
        }
        else
        {
            int m = (int)BitOperations.RoundUpToPowerOf2((uint)(2 * size - 1));
            _inner = new FftPlan(m);
            _chirpRe = new double[size];
            _chirpIm = new double[size];
            long twoN = 2L * size;
            for (int i = 0; i < size; i++)
            {
                long sq = (long)i * i % twoN; // exact: keeps the chirp's angle small
                double a = -Math.PI * sq / size;
                _chirpRe[i] = Math.Cos(a);
                _chirpIm[i] = Math.Sin(a);
            }
            _kernelRe = new double[m];
            _kernelIm = new double[m];
            for (int i = 0; i < size; i++)
            {
                _kernelRe[i] = _chirpRe[i];
                _kernelIm[i] = -_chirpIm[i];
                if (i > 0)
                {
                    _kernelRe[m - i] = _chirpRe[i];
                    _kernelIm[m - i] = -_chirpIm[i];
                }
            }
            _inner.Forward(_kernelRe, _kernelIm);
            _workRe = new double[m];
            _workIm = new double[m];
        }
    }

    /// <summary>Transform size N.</summary>
    public int Size => _n;

    /// <summary>Forward transform in place (no scaling).</summary>
    /// <exception cref="ArgumentException">A span is not exactly <see cref="Size"/> long.</exception>
    public void Forward(Span<double> re, Span<double> im)
    {
        if (re.Length != _n || im.Length != _n)
            throw new ArgumentException($"both spans must hold {_n} values");
        if (_inner is null)
            Radix2(re, im);
        else
            Bluestein(re, im);
    }

    /// <summary>Inverse transform in place, scaled by 1/N so that Inverse(Forward(x)) = x.</summary>
    public void Inverse(Span<double> re, Span<double> im)
    {
        if (re.Length != _n || im.Length != _n)
            throw new ArgumentException($"both spans must hold {_n} values");
        // IDFT(x) = conj(DFT(conj(x))) / N
        for (int i = 0; i < _n; i++)
            im[i] = -im[i];
        Forward(re, im);
        double s = 1.0 / _n;
        for (int i = 0; i < _n; i++)
        {
            re[i] *= s;
            im[i] = -im[i] * s;
        }
    }

    private void Bluestein(Span<double> re, Span<double> im)
    {
        int m = _workRe.Length;
        Span<double> wr = _workRe,
            wi = _workIm;
        for (int i = 0; i < _n; i++)
        {
            wr[i] = re[i] * _chirpRe[i] - im[i] * _chirpIm[i];
            wi[i] = re[i] * _chirpIm[i] + im[i] * _chirpRe[i];
        }
        wr[_n..].Clear();
        wi[_n..].Clear();
        _inner!.Forward(wr, wi);
        for (int i = 0; i < m; i++)
        {
            double r = wr[i] * _kernelRe[i] - wi[i] * _kernelIm[i];
            double q = wr[i] * _kernelIm[i] + wi[i] * _kernelRe[i];
            wr[i] = r;
            wi[i] = q;
        }
        _inner.Inverse(wr, wi);
        for (int k = 0; k < _n; k++)
        {
            re[k] = wr[k] * _chirpRe[k] - wi[k] * _chirpIm[k];
            im[k] = wr[k] * _chirpIm[k] + wi[k] * _chirpRe[k];
        }
    }

    /// <summary>
    /// Forward transform of a windowed segment: X = DFT(w[n] x[n]). The samples are interleaved
    /// I, Q (complex) or real; the result lands in <paramref name="re"/>, <paramref name="im"/>.
    /// For powers of two the windowing is fused with the input permutation (one pass fewer).
    /// Returns the sum of the windowed values, which is not finite when an input was NaN or infinite.
    /// </summary>
    public double ForwardWindowed(
        ReadOnlySpan<double> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im
    )
    {
        int n = _n;
        if (re.Length != n || im.Length != n || window.Length != n || samples.Length < (complex ? 2 * n : n))
            throw new ArgumentException($"spans must hold {n} points");
        double check = 0;
        if (_inner is not null || n < 4)
        {
            for (int i = 0; i < n; i++)
            {
                re[i] = (complex ? samples[2 * i] : samples[i]) * window[i];
                im[i] = complex ? samples[2 * i + 1] * window[i] : 0;
                check += re[i] + im[i];
            }
            Forward(re, im);
            return check;
        }
        // Bit-reversed load, window and the first two stages in one pass: output group g..g+3
        // takes the inputs rev[g], rev[g] + n/2, rev[g] + n/4, rev[g] + 3n/4.
        ref int rev = ref MemoryMarshal.GetArrayDataReference(_bitReverse);
        ref double x = ref MemoryMarshal.GetReference(samples);
        ref double w = ref MemoryMarshal.GetReference(window);
        ref double r = ref MemoryMarshal.GetReference(re);
        ref double q = ref MemoryMarshal.GetReference(im);
        int half = n / 2,
            quarter = n / 4;
        for (int g = 0; g < n; g += 4)
        {
            int j0 = Unsafe.Add(ref rev, g),
                j1 = j0 + half,
                j2 = j0 + quarter,
                j3 = j2 + half;
            double w0 = Unsafe.Add(ref w, j0),
                w1 = Unsafe.Add(ref w, j1),
                w2 = Unsafe.Add(ref w, j2),
                w3 = Unsafe.Add(ref w, j3);
            double x0r,
                x0i,
                x1r,
                x1i,
                x2r,
                x2i,
                x3r,
                x3i;
            if (complex)
            {
                x0r = Unsafe.Add(ref x, 2 * j0) * w0;
                x0i = Unsafe.Add(ref x, 2 * j0 + 1) * w0;
                x1r = Unsafe.Add(ref x, 2 * j1) * w1;
                x1i = Unsafe.Add(ref x, 2 * j1 + 1) * w1;
                x2r = Unsafe.Add(ref x, 2 * j2) * w2;
                x2i = Unsafe.Add(ref x, 2 * j2 + 1) * w2;
                x3r = Unsafe.Add(ref x, 2 * j3) * w3;
                x3i = Unsafe.Add(ref x, 2 * j3 + 1) * w3;
            }
            else
            {
                x0r = Unsafe.Add(ref x, j0) * w0;
                x1r = Unsafe.Add(ref x, j1) * w1;
                x2r = Unsafe.Add(ref x, j2) * w2;
                x3r = Unsafe.Add(ref x, j3) * w3;
                x0i = x1i = x2i = x3i = 0;
            }
            check += x0r + x1r + x2r + x3r + x0i + x1i + x2i + x3i;
            double r0 = x0r + x1r,
                i0 = x0i + x1i,
                r1 = x0r - x1r,
                i1 = x0i - x1i;
            double r2 = x2r + x3r,
                i2 = x2i + x3i,
                r3 = x2r - x3r,
                i3 = x2i - x3i;
            Unsafe.Add(ref r, g) = r0 + r2;
            Unsafe.Add(ref q, g) = i0 + i2;
            Unsafe.Add(ref r, g + 2) = r0 - r2;
            Unsafe.Add(ref q, g + 2) = i0 - i2;
            Unsafe.Add(ref r, g + 1) = r1 + i3;
            Unsafe.Add(ref q, g + 1) = i1 - r3;
            Unsafe.Add(ref r, g + 3) = r1 - i3;
            Unsafe.Add(ref q, g + 3) = i1 + r3;
        }
        LaterStages(re, im);
        return check;
    }

    /// <summary>True when <see cref="ForwardWindowedScrambled"/> is available (powers of two from 4).</summary>
    public bool CanScramble => _inner is null && _n >= 4;

    /// <summary>
    /// Where <see cref="ForwardWindowedScrambled"/> leaves bin <paramref name="bin"/>: the
    /// bit-reversed index (the permutation is its own inverse).
    /// </summary>
    public int ScrambledIndex(int bin)
    {
        int s = _bitReverse[bin];
        if (!TransposedTail)
            return s;
        // The last radix-4 pass leaves each block of 16 transposed (see ForwardWindowedScrambled).
        return (s & ~15) | ((s & 3) << 2) | ((s >> 2) & 3);
    }

    /// <summary>The bit-reversed index of <paramref name="i"/> (powers of two only).</summary>
    internal int BitReversed(int i) => _bitReverse[i];

    /// <summary>
    /// Forward transform of data already in bit-reversed order (decimation in time without the
    /// input permutation), natural-order result. With <see cref="ForwardWindowedScrambled"/> it makes
    /// a convolution with no permutation pass: scrambled spectrum, pointwise product, this.
    /// </summary>
    /// <exception cref="InvalidOperationException">The size is not a power of two.</exception>
    internal void ForwardFromBitReversed(Span<double> re, Span<double> im)
    {
        if (_inner is not null)
            throw new InvalidOperationException("needs a power-of-two size");
        if (re.Length != _n || im.Length != _n)
            throw new ArgumentException($"both spans must hold {_n} values");
        if (_n > 1)
            Butterflies(re, im);
    }

    /// <summary>
    /// For a fast convolution: out[q] = conj(Z(k) H[q]) for every bit-reversed position q, where
    /// k = bitrev(q), Z is the output of <see cref="ForwardWindowedScrambled"/> (bin k at
    /// <see cref="ScrambledIndex"/>(k)) and H is given in bit-reversed order. The result is ready
    /// for <see cref="ForwardFromBitReversed"/>, which then yields N conj(IDFT(Z H)).
    /// </summary>
    internal void ConjugateProductToBitReversed(
        ReadOnlySpan<double> zr,
        ReadOnlySpan<double> zi,
        ReadOnlySpan<double> hr,
        ReadOnlySpan<double> hi,
        Span<double> outR,
        Span<double> outI
    )
    {
        int n = _n;
        if (
            zr.Length != n
            || zi.Length != n
            || hr.Length != n
            || hi.Length != n
            || outR.Length != n
            || outI.Length != n
        )
            throw new ArgumentException($"spans must hold {n} points");
        ref double a = ref MemoryMarshal.GetReference(zr),
            b = ref MemoryMarshal.GetReference(zi);
        ref double c = ref MemoryMarshal.GetReference(hr),
            d = ref MemoryMarshal.GetReference(hi);
        ref double o = ref MemoryMarshal.GetReference(outR),
            p = ref MemoryMarshal.GetReference(outI);
        if (TransposedTail)
        {
            // Each block of 16 holds its bins 4 x 4 transposed: transposing it back gives bit-reversed order.
            for (int g = 0; g < n; g += 16)
            {
                var (r0, r1, r2, r3) = Transpose(
                    LoadV4(ref a, g),
                    LoadV4(ref a, g + 4),
                    LoadV4(ref a, g + 8),
                    LoadV4(ref a, g + 12)
                );
                var (i0, i1, i2, i3) = Transpose(
                    LoadV4(ref b, g),
                    LoadV4(ref b, g + 4),
                    LoadV4(ref b, g + 8),
                    LoadV4(ref b, g + 12)
                );
                ConjProduct(r0, i0, ref c, ref d, ref o, ref p, g);
                ConjProduct(r1, i1, ref c, ref d, ref o, ref p, g + 4);
                ConjProduct(r2, i2, ref c, ref d, ref o, ref p, g + 8);
                ConjProduct(r3, i3, ref c, ref d, ref o, ref p, g + 12);
            }
            return;
        }
        for (int q = 0; q < n; q++)
        {
            double x = Unsafe.Add(ref a, q),
                y = Unsafe.Add(ref b, q),
                hc = Unsafe.Add(ref c, q),
                hd = Unsafe.Add(ref d, q);
            Unsafe.Add(ref o, q) = x * hc - y * hd;
            Unsafe.Add(ref p, q) = -(x * hd + y * hc);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void ConjProduct(
        Vector256<double> x,
        Vector256<double> y,
        ref double c,
        ref double d,
        ref double o,
        ref double p,
        int at
    )
    {
        Vector256<double> hc = LoadV4(ref c, at),
            hd = LoadV4(ref d, at);
        (x * hc - y * hd).StoreUnsafe(ref o, (nuint)at);
        (-(x * hd + y * hc)).StoreUnsafe(ref p, (nuint)at);
    }

    /// <summary>Whether the scrambled transform's last pass runs on 4 x 4 transposed blocks (AVX, 16 points or
    /// more).</summary>
    private bool TransposedTail => _n >= 16 && Avx.IsSupported;

    /// <summary>
    /// Forward transform of a windowed segment, X = DFT(w[n] x[n]), with the bins left in
    /// bit-reversed order: bin k lands at <see cref="ScrambledIndex"/>(k). For sums of |X|^2
    /// (Welch) the order does not matter until the end, so the permutation is skipped: the input
    /// is read in natural order (decimation in frequency, Gentleman and Sande 1966), radix-2^2
    /// passes with SIMD. Returns the sum of the windowed values; when that is not finite (NaN or
    /// infinite input) the transform is not computed. Powers of two from 4 only (<see cref="CanScramble"/>).
    /// </summary>
    /// <exception cref="InvalidOperationException">The size is not a power of two from 4.</exception>
    public double ForwardWindowedScrambled(
        ReadOnlySpan<double> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im
    )
    {
        Check(samples.Length, complex, window, re, im);
        return Scrambled(samples, complex, window, re, im, default);
    }

    private void Check(int samples, bool complex, ReadOnlySpan<double> window, Span<double> re, Span<double> im)
    {
        int n = _n;
        if (!CanScramble)
            throw new InvalidOperationException("the scrambled transform needs a power-of-two size from 4");
        if (re.Length != n || im.Length != n || window.Length != n || samples < (complex ? 2 * n : n))
            throw new ArgumentException($"spans must hold {n} points");
    }

    /// <summary>
    /// The scrambled transform; with active <paramref name="sums"/> the last pass adds |X|^2 into
    /// them instead of storing X. Stops after loading when the windowed sum is not finite.
    /// </summary>
    private double Scrambled<T>(
        ReadOnlySpan<T> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im,
        PowerSums sums
    )
        where T : unmanaged
    {
        int n = _n;
        ref double reRef = ref MemoryMarshal.GetReference(re);
        ref double imRef = ref MemoryMarshal.GetReference(im);
        int vw = Vector<double>.Count,
            h = n / 2;
        double check;
        if (complex && Avx2.IsSupported && vw == 4 && n >= 16)
        {
            // The window, the I/Q split and the first radix-2^2 pass in one sweep over the samples.
            check = FirstPassWindowed(samples, window, ref reRef, ref imRef);
            h /= 4;
        }
        else
            check = LoadWindowed(AsDoubles(samples), complex, window, re, im);
        if (!double.IsFinite(check))
            return check;
        LaterPasses(ref reRef, ref imRef, h, sums);
        return check;
    }

    /// <summary>
    /// <see cref="ForwardWindowedScrambled"/> of z = a + i b for two real segments read straight
    /// out of rings of N values each (no interleaved copy): a's segment is <paramref name="a"/> from
    /// <paramref name="aStart"/> on, then from 0 (the same for b), each start a multiple of N / 4.
    /// The same values as interleaving the two segments and transforming them, bit for bit.
    /// Returns the sum of the windowed values; when that is not finite the transform is not computed.
    /// </summary>
    /// <exception cref="ArgumentException">A ring is not N long or a start is not a multiple of N / 4 below
    /// N.</exception>
    internal double ForwardWindowedScrambledPair(
        ReadOnlySpan<double> a,
        int aStart,
        ReadOnlySpan<double> b,
        int bStart,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im
    )
    {
        int n = _n;
        Check(2 * n, complex: true, window, re, im);
        int q = n / 4;
        if (
            a.Length != n
            || b.Length != n
            || q == 0
            || aStart % q != 0
            || bStart % q != 0
            || (uint)aStart >= (uint)n
            || (uint)bStart >= (uint)n
        )
            throw new ArgumentException(
                $"rings must hold {n} values and segments start at multiples of {Math.Max(q, 1)}"
            );
        if (!(Avx2.IsSupported && Vector<double>.Count == 4 && n >= 16))
        {
            if (_pairScratch.Length != 2 * n)
                _pairScratch = new double[2 * n];
            for (int i = 0; i < n; i++)
            {
                _pairScratch[2 * i] = a[(aStart + i) & (n - 1)];
                _pairScratch[2 * i + 1] = b[(bStart + i) & (n - 1)];
            }
            return Scrambled<double>(_pairScratch, complex: true, window, re, im, default);
        }
        ref double reRef = ref MemoryMarshal.GetReference(re);
        ref double imRef = ref MemoryMarshal.GetReference(im);
        double check = FirstPassPair(a, aStart / q, b, bStart / q, window, ref reRef, ref imRef);
        if (!double.IsFinite(check))
            return check;
        LaterPasses(ref reRef, ref imRef, n / 8, default);
        return check;
    }

    private double[] _pairScratch = [];

    /// <summary>
    /// <see cref="FirstPassWindowed{T}"/> for z = a + i b read out of two rings: quarter j of a's
    /// segment is quarter (j + <paramref name="aTurn"/>) mod 4 of its ring (the segment starts
    /// <paramref name="aTurn"/> quarters in), so every load is a plain vector load. The same
    /// products and sums as the interleaved pass.
    /// </summary>
    private double FirstPassPair(
        ReadOnlySpan<double> a,
        int aTurn,
        ReadOnlySpan<double> b,
        int bTurn,
        ReadOnlySpan<double> window,
        ref double reRef,
        ref double imRef
    )
    {
        int n = _n,
            h = n / 2,
            q = h / 2;
        ref double ra = ref MemoryMarshal.GetReference(a),
            rb = ref MemoryMarshal.GetReference(b);
        ref double w = ref MemoryMarshal.GetReference(window);
        int a0 = (aTurn & 3) * q,
            a1 = ((aTurn + 1) & 3) * q,
            a2 = ((aTurn + 2) & 3) * q,
            a3 = ((aTurn + 3) & 3) * q;
        int b0 = (bTurn & 3) * q,
            b1 = ((bTurn + 1) & 3) * q,
            b2 = ((bTurn + 2) & 3) * q,
            b3 = ((bTurn + 3) & 3) * q;
        Vector256<double> acc = Vector256<double>.Zero;
        for (int k = 0; k < q; k += 4)
        {
            Vector256<double> w0 = LoadV4(ref w, k),
                w1 = LoadV4(ref w, k + q),
                w2 = LoadV4(ref w, k + 2 * q),
                w3 = LoadV4(ref w, k + 3 * q);
            Vector256<double> a0r = LoadV4(ref ra, a0 + k) * w0,
                a0i = LoadV4(ref rb, b0 + k) * w0;
            Vector256<double> a1r = LoadV4(ref ra, a1 + k) * w1,
                a1i = LoadV4(ref rb, b1 + k) * w1;
            Vector256<double> a2r = LoadV4(ref ra, a2 + k) * w2,
                a2i = LoadV4(ref rb, b2 + k) * w2;
            Vector256<double> a3r = LoadV4(ref ra, a3 + k) * w3,
                a3i = LoadV4(ref rb, b3 + k) * w3;
            acc += (a0r + a0i) + (a1r + a1i) + (a2r + a2i) + (a3r + a3i);
            FirstButterfly(a0r, a0i, a1r, a1i, a2r, a2i, a3r, a3i, k, q, ref reRef, ref imRef);
        }
        return Vector256.Sum(acc);
    }

    /// <summary>
    /// The butterfly of the first double pass (half-size N/2, one group) on the windowed points
    /// a0..a3 at k, k + q, k + 2q, k + 3q, stored at those places.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private void FirstButterfly(
        Vector256<double> a0r,
        Vector256<double> a0i,
        Vector256<double> a1r,
        Vector256<double> a1i,
        Vector256<double> a2r,
        Vector256<double> a2i,
        Vector256<double> a3r,
        Vector256<double> a3i,
        int k,
        int q,
        ref double reRef,
        ref double imRef
    )
    {
        int h = 2 * q;
        ref double wAr = ref _twRe[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref double wAi = ref _twIm[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref double wBr = ref _twRe[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref double wBi = ref _twIm[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        Butterfly22(
            a0r,
            a0i,
            a1r,
            a1i,
            a2r,
            a2i,
            a3r,
            a3i,
            LoadV4(ref wAr, k),
            LoadV4(ref wAi, k),
            LoadV4(ref wBr, k),
            LoadV4(ref wBi, k),
            out var y0r,
            out var y0i,
            out var y1r,
            out var y1i,
            out var y2r,
            out var y2i,
            out var y3r,
            out var y3i
        );
        y0r.StoreUnsafe(ref reRef, (nuint)k);
        y0i.StoreUnsafe(ref imRef, (nuint)k);
        y1r.StoreUnsafe(ref reRef, (nuint)(k + q));
        y1i.StoreUnsafe(ref imRef, (nuint)(k + q));
        y2r.StoreUnsafe(ref reRef, (nuint)(k + 2 * q));
        y2i.StoreUnsafe(ref imRef, (nuint)(k + 2 * q));
        y3r.StoreUnsafe(ref reRef, (nuint)(k + 3 * q));
        y3i.StoreUnsafe(ref imRef, (nuint)(k + 3 * q));
    }

    /// <summary>The passes after the first, from half-size <paramref name="h"/> down (see <see
    /// cref="Scrambled{T}"/>).</summary>
    private void LaterPasses(ref double reRef, ref double imRef, int h, PowerSums sums)
    {
        int n = _n,
            vw = Vector<double>.Count;
        // Passes whose groups span more than a block (16 KiB of re and im, which stays in the L1
        // cache) run over the whole array; the rest run block by block, all passes on one block
        // before the next.
        const int block = 1024;
        for (; 2 * h > block && h >= 2 * vw; h /= 4)
            Radix22Pass(ref reRef, ref imRef, 0, n, h);
        int len = Math.Min(n, block);
        for (int start = 0; start < n; start += len)
            ScrambledStages(ref reRef, ref imRef, start, len, h, sums);
    }

    /// <summary>The passes of the scrambled transform from half-size <paramref name="h"/> down, on the groups within
    /// [start, start + len).</summary>
    private void ScrambledStages(
        ref double reRef,
        ref double imRef,
        int start,
        int len,
        int h,
        PowerSums sums = default
    )
    {
        int vw = Vector<double>.Count,
            end = start + len;
        for (; h >= 2 * vw && h >= 2; h /= 4)
        {
            if (h == 8 && vw == 4 && TransposedTail)
            {
                // The pass of half-size 8 and the last radix-4 both work on blocks of 16: done in registers together.
                LastTwoPasses(ref reRef, ref imRef, start, end, sums);
                return;
            }
            Radix22Pass(ref reRef, ref imRef, start, len, h);
        }
        // What is left: radix-2 stages down to half-size 4, then a last radix-4 (half-sizes 2 and 1) or radix-2 (1).
        for (; h > 2; h /= 2)
        {
            ref double wr0 = ref _twRe[_stageOffset[BitOperations.Log2((uint)h) + 1]];
            ref double wi0 = ref _twIm[_stageOffset[BitOperations.Log2((uint)h) + 1]];
            for (int g = start; g < end; g += 2 * h)
            {
                for (int k = 0; k < h; k++)
                {
                    int a = g + k,
                        b = a + h;
                    double dr = Unsafe.Add(ref reRef, a) - Unsafe.Add(ref reRef, b),
                        di = Unsafe.Add(ref imRef, a) - Unsafe.Add(ref imRef, b);
                    Unsafe.Add(ref reRef, a) += Unsafe.Add(ref reRef, b);
                    Unsafe.Add(ref imRef, a) += Unsafe.Add(ref imRef, b);
                    double wr = Unsafe.Add(ref wr0, k),
                        wi = Unsafe.Add(ref wi0, k);
                    Unsafe.Add(ref reRef, b) = dr * wr - di * wi;
                    Unsafe.Add(ref imRef, b) = dr * wi + di * wr;
                }
            }
        }
        if (h == 2 && TransposedTail)
        {
            // Four groups of four at once, the results left transposed (for sums of |X|^2 the order is immaterial).
            for (int g = start; g < end; g += 16)
            {
                TransposedRadix4(
                    LoadV4(ref reRef, g),
                    LoadV4(ref reRef, g + 4),
                    LoadV4(ref reRef, g + 8),
                    LoadV4(ref reRef, g + 12),
                    LoadV4(ref imRef, g),
                    LoadV4(ref imRef, g + 4),
                    LoadV4(ref imRef, g + 8),
                    LoadV4(ref imRef, g + 12),
                    ref reRef,
                    ref imRef,
                    g,
                    sums
                );
            }
        }
        else if (h == 2)
        {
            for (int g = start; g < end; g += 4)
            {
                double x0r = Unsafe.Add(ref reRef, g),
                    x0i = Unsafe.Add(ref imRef, g),
                    x1r = Unsafe.Add(ref reRef, g + 1),
                    x1i = Unsafe.Add(ref imRef, g + 1);
                double x2r = Unsafe.Add(ref reRef, g + 2),
                    x2i = Unsafe.Add(ref imRef, g + 2),
                    x3r = Unsafe.Add(ref reRef, g + 3),
                    x3i = Unsafe.Add(ref imRef, g + 3);
                double b0r = x0r + x2r,
                    b0i = x0i + x2i,
                    b2r = x0r - x2r,
                    b2i = x0i - x2i;
                double b1r = x1r + x3r,
                    b1i = x1i + x3i,
                    b3r = x1i - x3i,
                    b3i = x3r - x1r; // (x1 - x3)(-i)
                Unsafe.Add(ref reRef, g) = b0r + b1r;
                Unsafe.Add(ref imRef, g) = b0i + b1i;
                Unsafe.Add(ref reRef, g + 1) = b0r - b1r;
                Unsafe.Add(ref imRef, g + 1) = b0i - b1i;
                Unsafe.Add(ref reRef, g + 2) = b2r + b3r;
                Unsafe.Add(ref imRef, g + 2) = b2i + b3i;
                Unsafe.Add(ref reRef, g + 3) = b2r - b3r;
                Unsafe.Add(ref imRef, g + 3) = b2i - b3i;
            }
        }
        else if (h == 1)
        {
            for (int g = start; g < end; g += 2)
            {
                double ar = Unsafe.Add(ref reRef, g),
                    ai = Unsafe.Add(ref imRef, g),
                    br = Unsafe.Add(ref reRef, g + 1),
                    bi = Unsafe.Add(ref imRef, g + 1);
                Unsafe.Add(ref reRef, g) = ar + br;
                Unsafe.Add(ref imRef, g) = ai + bi;
                Unsafe.Add(ref reRef, g + 1) = ar - br;
                Unsafe.Add(ref imRef, g + 1) = ai - bi;
            }
        }
        if (sums.Active && !(h == 2 && TransposedTail))
            for (int i = start; i < end; i++)
                sums.Add(Unsafe.Add(ref reRef, i), Unsafe.Add(ref imRef, i), i);
    }

    /// <summary>
    /// The radix-2^2 pass of half-size 8 followed by the transposed last radix-4 pass (see
    /// <see cref="ScrambledStages"/>), block of 16 by block of 16 with the values kept in registers
    /// between them: the same operations in the same order as the two passes one after the other,
    /// so the same results bit for bit, without storing and reloading the array in between.
    /// </summary>
    private void LastTwoPasses(ref double reRef, ref double imRef, int start, int end, PowerSums sums)
    {
        Vector256<double> ar = LoadV4(ref _twRe[_stageOffset[4]], 0),
            ai = LoadV4(ref _twIm[_stageOffset[4]], 0); // W_16^k, k < 4
        Vector256<double> br = LoadV4(ref _twRe[_stageOffset[3]], 0),
            bi = LoadV4(ref _twIm[_stageOffset[3]], 0); // W_8^k
        for (int g = start; g < end; g += 16)
        {
            // Radix22Pass with h = 8, q = 4: one group, k = 0..3; then the last radix-4 on the block
            // (on the values Radix22Pass would have stored at g, g + 4, g + 8, g + 12).
            Butterfly22(
                LoadV4(ref reRef, g),
                LoadV4(ref imRef, g),
                LoadV4(ref reRef, g + 4),
                LoadV4(ref imRef, g + 4),
                LoadV4(ref reRef, g + 8),
                LoadV4(ref imRef, g + 8),
                LoadV4(ref reRef, g + 12),
                LoadV4(ref imRef, g + 12),
                ar,
                ai,
                br,
                bi,
                out var y0r,
                out var y0i,
                out var y1r,
                out var y1i,
                out var y2r,
                out var y2i,
                out var y3r,
                out var y3i
            );
            TransposedRadix4(y0r, y1r, y2r, y3r, y0i, y1i, y2i, y3i, ref reRef, ref imRef, g, sums);
        }
    }

    /// <summary>
    /// One radix-2^2 decimation-in-frequency butterfly on four vectors of points a0..a3 (a quarter
    /// apart): the stage of half-size 2q with twiddles a (W_4q^k, and -i W_4q^k for the second pair),
    /// then the stage of half-size q with twiddles b (W_2q^k). y0..y3 are the values for a0..a3's places.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Butterfly22<T>(
        Vector256<T> a0r,
        Vector256<T> a0i,
        Vector256<T> a1r,
        Vector256<T> a1i,
        Vector256<T> a2r,
        Vector256<T> a2i,
        Vector256<T> a3r,
        Vector256<T> a3i,
        Vector256<T> ar,
        Vector256<T> ai,
        Vector256<T> br,
        Vector256<T> bi,
        out Vector256<T> y0r,
        out Vector256<T> y0i,
        out Vector256<T> y1r,
        out Vector256<T> y1i,
        out Vector256<T> y2r,
        out Vector256<T> y2i,
        out Vector256<T> y3r,
        out Vector256<T> y3i
    )
    {
        Vector256<T> b0r = a0r + a2r,
            b0i = a0i + a2i,
            b1r = a1r + a3r,
            b1i = a1i + a3i;
        Vector256<T> dr = a0r - a2r,
            di = a0i - a2i;
        Vector256<T> er = a1i - a3i,
            ei = a3r - a1r; // (a1 - a3)(-i)
        Vector256<T> b2r = dr * ar - di * ai,
            b2i = dr * ai + di * ar;
        Vector256<T> b3r = er * ar - ei * ai,
            b3i = er * ai + ei * ar;
        Vector256<T> fr = b0r - b1r,
            fi = b0i - b1i,
            gr = b2r - b3r,
            gi = b2i - b3i;
        y0r = b0r + b1r;
        y0i = b0i + b1i;
        y1r = fr * br - fi * bi;
        y1i = fr * bi + fi * br;
        y2r = b2r + b3r;
        y2i = b2i + b3i;
        y3r = gr * br - gi * bi;
        y3i = gr * bi + gi * br;
    }

    /// <summary>
    /// The last radix-4 pass (half-sizes 2 and 1) on a block of 16 given as its four rows of four:
    /// a 4 x 4 transpose puts element j of each group in vector j, the butterflies run across the
    /// vectors, and the results stay transposed (ScrambledIndex accounts for it). They are added into
    /// the power sums when those are active, else stored at g.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void TransposedRadix4(
        Vector256<double> x0r,
        Vector256<double> x1r,
        Vector256<double> x2r,
        Vector256<double> x3r,
        Vector256<double> x0i,
        Vector256<double> x1i,
        Vector256<double> x2i,
        Vector256<double> x3i,
        ref double reRef,
        ref double imRef,
        int g,
        PowerSums sums
    )
    {
        var (r0, r1, r2, r3) = Transpose(x0r, x1r, x2r, x3r);
        var (i0, i1, i2, i3) = Transpose(x0i, x1i, x2i, x3i);
        Vector256<double> c0r = r0 + r2,
            c0i = i0 + i2,
            c2r = r0 - r2,
            c2i = i0 - i2;
        Vector256<double> c1r = r1 + r3,
            c1i = i1 + i3,
            c3r = i1 - i3,
            c3i = r3 - r1; // (x1 - x3)(-i)
        if (sums.Active)
        {
            sums.Add(c0r + c1r, c0i + c1i, g);
            sums.Add(c0r - c1r, c0i - c1i, g + 4);
            sums.Add(c2r + c3r, c2i + c3i, g + 8);
            sums.Add(c2r - c3r, c2i - c3i, g + 12);
            return;
        }
        (c0r + c1r).StoreUnsafe(ref reRef, (nuint)g);
        (c0i + c1i).StoreUnsafe(ref imRef, (nuint)g);
        (c0r - c1r).StoreUnsafe(ref reRef, (nuint)(g + 4));
        (c0i - c1i).StoreUnsafe(ref imRef, (nuint)(g + 4));
        (c2r + c3r).StoreUnsafe(ref reRef, (nuint)(g + 8));
        (c2i + c3i).StoreUnsafe(ref imRef, (nuint)(g + 8));
        (c2r - c3r).StoreUnsafe(ref reRef, (nuint)(g + 12));
        (c2i - c3i).StoreUnsafe(ref imRef, (nuint)(g + 12));
    }

    /// <summary>
    /// One radix-2^2 decimation-in-frequency pass on the groups of 2h points within [start, start + len):
    /// stage of half-size h = 2q (twiddle W_4q^k, and -i W_4q^k for the second pair), then stage of
    /// half-size q (twiddle W_2q^k).
    /// </summary>
    private void Radix22Pass(ref double reRef, ref double imRef, int start, int len, int h)
    {
        if (_wide && h >= 16)
        {
            Radix22PassWide(ref reRef, ref imRef, start, len, h, _twRe, _twIm);
            return;
        }
        int vw = Vector<double>.Count,
            q = h / 2;
        ref double wAr = ref _twRe[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref double wAi = ref _twIm[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref double wBr = ref _twRe[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref double wBi = ref _twIm[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        for (int g = start; g < start + len; g += 4 * q)
        {
            for (int k = 0; k < q; k += vw)
            {
                int i0 = g + k,
                    i1 = i0 + q,
                    i2 = i1 + q,
                    i3 = i2 + q;
                Vector<double> a0r = VectorMath.Load(ref reRef, i0),
                    a0i = VectorMath.Load(ref imRef, i0);
                Vector<double> a1r = VectorMath.Load(ref reRef, i1),
                    a1i = VectorMath.Load(ref imRef, i1);
                Vector<double> a2r = VectorMath.Load(ref reRef, i2),
                    a2i = VectorMath.Load(ref imRef, i2);
                Vector<double> a3r = VectorMath.Load(ref reRef, i3),
                    a3i = VectorMath.Load(ref imRef, i3);
                Vector<double> ar = VectorMath.Load(ref wAr, k),
                    ai = VectorMath.Load(ref wAi, k);
                Vector<double> b0r = a0r + a2r,
                    b0i = a0i + a2i,
                    b1r = a1r + a3r,
                    b1i = a1i + a3i;
                Vector<double> dr = a0r - a2r,
                    di = a0i - a2i;
                // (a1 - a3)(-i) = (a1i - a3i) - i (a1r - a3r)
                Vector<double> er = a1i - a3i,
                    ei = a3r - a1r;
                Vector<double> b2r = dr * ar - di * ai,
                    b2i = dr * ai + di * ar;
                Vector<double> b3r = er * ar - ei * ai,
                    b3i = er * ai + ei * ar;
                Vector<double> br = VectorMath.Load(ref wBr, k),
                    bi = VectorMath.Load(ref wBi, k);
                Vector<double> fr = b0r - b1r,
                    fi = b0i - b1i,
                    gr = b2r - b3r,
                    gi = b2i - b3i;
                VectorMath.Store(b0r + b1r, ref reRef, i0);
                VectorMath.Store(b0i + b1i, ref imRef, i0);
                VectorMath.Store(fr * br - fi * bi, ref reRef, i1);
                VectorMath.Store(fr * bi + fi * br, ref imRef, i1);
                VectorMath.Store(b2r + b3r, ref reRef, i2);
                VectorMath.Store(b2i + b3i, ref imRef, i2);
                VectorMath.Store(gr * br - gi * bi, ref reRef, i3);
                VectorMath.Store(gr * bi + gi * br, ref imRef, i3);
            }
        }
    }

    /// <summary>
    /// <see cref="Radix22Pass"/> on 512-bit vectors (q of 8 or more): the same operations, eight lanes
    /// at a time, so the same results bit for bit (tested). Also the single-precision passes (T float,
    /// sixteen lanes, twiddles <paramref name="twRe"/>, <paramref name="twIm"/> rounded to float).
    /// </summary>
    private void Radix22PassWide<T>(ref T reRef, ref T imRef, int start, int len, int h, T[] twRe, T[] twIm)
    {
        int vw = Vector512<T>.Count,
            q = h / 2;
        ref T wAr = ref twRe[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref T wAi = ref twIm[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref T wBr = ref twRe[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref T wBi = ref twIm[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        for (int g = start; g < start + len; g += 4 * q)
        {
            for (int k = 0; k < q; k += vw)
            {
                int i0 = g + k,
                    i1 = i0 + q,
                    i2 = i1 + q,
                    i3 = i2 + q;
                Butterfly22Wide(
                    Vector512.LoadUnsafe(ref reRef, (nuint)i0),
                    Vector512.LoadUnsafe(ref imRef, (nuint)i0),
                    Vector512.LoadUnsafe(ref reRef, (nuint)i1),
                    Vector512.LoadUnsafe(ref imRef, (nuint)i1),
                    Vector512.LoadUnsafe(ref reRef, (nuint)i2),
                    Vector512.LoadUnsafe(ref imRef, (nuint)i2),
                    Vector512.LoadUnsafe(ref reRef, (nuint)i3),
                    Vector512.LoadUnsafe(ref imRef, (nuint)i3),
                    Vector512.LoadUnsafe(ref wAr, (nuint)k),
                    Vector512.LoadUnsafe(ref wAi, (nuint)k),
                    Vector512.LoadUnsafe(ref wBr, (nuint)k),
                    Vector512.LoadUnsafe(ref wBi, (nuint)k),
                    out var y0r,
                    out var y0i,
                    out var y1r,
                    out var y1i,
                    out var y2r,
                    out var y2i,
                    out var y3r,
                    out var y3i
                );
                y0r.StoreUnsafe(ref reRef, (nuint)i0);
                y0i.StoreUnsafe(ref imRef, (nuint)i0);
                y1r.StoreUnsafe(ref reRef, (nuint)i1);
                y1i.StoreUnsafe(ref imRef, (nuint)i1);
                y2r.StoreUnsafe(ref reRef, (nuint)i2);
                y2i.StoreUnsafe(ref imRef, (nuint)i2);
                y3r.StoreUnsafe(ref reRef, (nuint)i3);
                y3i.StoreUnsafe(ref imRef, (nuint)i3);
            }
        }
    }

    /// <summary>The single-precision radix-2^2 pass on 256-bit vectors (no AVX-512): the operations of <see
    /// cref="Radix22PassWide{T}"/>, eight lanes at a time.</summary>
    private void Radix22Pass256(ref float reRef, ref float imRef, int start, int len, int h, float[] twRe, float[] twIm)
    {
        int q = h / 2;
        ref float wAr = ref twRe[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wAi = ref twIm[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wBr = ref twRe[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref float wBi = ref twIm[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        for (int g = start; g < start + len; g += 4 * q)
        {
            for (int k = 0; k < q; k += 8)
            {
                int i0 = g + k,
                    i1 = i0 + q,
                    i2 = i1 + q,
                    i3 = i2 + q;
                Butterfly22(
                    Vector256.LoadUnsafe(ref reRef, (nuint)i0),
                    Vector256.LoadUnsafe(ref imRef, (nuint)i0),
                    Vector256.LoadUnsafe(ref reRef, (nuint)i1),
                    Vector256.LoadUnsafe(ref imRef, (nuint)i1),
                    Vector256.LoadUnsafe(ref reRef, (nuint)i2),
                    Vector256.LoadUnsafe(ref imRef, (nuint)i2),
                    Vector256.LoadUnsafe(ref reRef, (nuint)i3),
                    Vector256.LoadUnsafe(ref imRef, (nuint)i3),
                    Vector256.LoadUnsafe(ref wAr, (nuint)k),
                    Vector256.LoadUnsafe(ref wAi, (nuint)k),
                    Vector256.LoadUnsafe(ref wBr, (nuint)k),
                    Vector256.LoadUnsafe(ref wBi, (nuint)k),
                    out var y0r,
                    out var y0i,
                    out var y1r,
                    out var y1i,
                    out var y2r,
                    out var y2i,
                    out var y3r,
                    out var y3i
                );
                y0r.StoreUnsafe(ref reRef, (nuint)i0);
                y0i.StoreUnsafe(ref imRef, (nuint)i0);
                y1r.StoreUnsafe(ref reRef, (nuint)i1);
                y1i.StoreUnsafe(ref imRef, (nuint)i1);
                y2r.StoreUnsafe(ref reRef, (nuint)i2);
                y2i.StoreUnsafe(ref imRef, (nuint)i2);
                y3r.StoreUnsafe(ref reRef, (nuint)i3);
                y3i.StoreUnsafe(ref imRef, (nuint)i3);
            }
        }
    }

    /// <summary><see cref="Butterfly22{T}"/> on 512-bit vectors: the same operations. A copy per vector width: keep the
    /// two alike.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Butterfly22Wide<T>(
        Vector512<T> a0r,
        Vector512<T> a0i,
        Vector512<T> a1r,
        Vector512<T> a1i,
        Vector512<T> a2r,
        Vector512<T> a2i,
        Vector512<T> a3r,
        Vector512<T> a3i,
        Vector512<T> ar,
        Vector512<T> ai,
        Vector512<T> br,
        Vector512<T> bi,
        out Vector512<T> y0r,
        out Vector512<T> y0i,
        out Vector512<T> y1r,
        out Vector512<T> y1i,
        out Vector512<T> y2r,
        out Vector512<T> y2i,
        out Vector512<T> y3r,
        out Vector512<T> y3i
    )
    {
        Vector512<T> b0r = a0r + a2r,
            b0i = a0i + a2i,
            b1r = a1r + a3r,
            b1i = a1i + a3i;
        Vector512<T> dr = a0r - a2r,
            di = a0i - a2i;
        Vector512<T> er = a1i - a3i,
            ei = a3r - a1r; // (a1 - a3)(-i)
        Vector512<T> b2r = dr * ar - di * ai,
            b2i = dr * ai + di * ar;
        Vector512<T> b3r = er * ar - ei * ai,
            b3i = er * ai + ei * ar;
        Vector512<T> fr = b0r - b1r,
            fi = b0i - b1i,
            gr = b2r - b3r,
            gi = b2i - b3i;
        y0r = b0r + b1r;
        y0i = b0i + b1i;
        y1r = fr * br - fi * bi;
        y1i = fr * bi + fi * br;
        y2r = b2r + b3r;
        y2i = b2i + b3i;
        y3r = gr * br - gi * bi;
        y3i = gr * bi + gi * br;
    }

    /// <summary>
    /// The Welch inner step: the scrambled transform of a windowed segment, its |X|^2 added to
    /// <paramref name="sum"/>, folded into the per-bin <paramref name="max"/>, and added to (or, with
    /// <paramref name="rowMax"/>, folded into) <paramref name="row"/>, all in scrambled order
    /// (<see cref="ScrambledIndex"/>). The last pass adds its results straight into the sums.
    /// An empty <paramref name="row"/> is left out (a caller whose row is a plain sum over the same
    /// segments as <paramref name="sum"/> reads the row from the sum). Returns the sum of the
    /// windowed values; when that is not finite (NaN or infinite input), nothing is added and the
    /// caller decides what to do.
    /// </summary>
    public double ForwardPowerScrambled(
        ReadOnlySpan<double> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im,
        Span<double> sum,
        Span<double> max,
        Span<double> row,
        bool rowMax
    )
    {
        Check(samples.Length, complex, window, re, im);
        if (sum.Length != _n || max.Length != _n || (row.Length != _n && !row.IsEmpty))
            throw new ArgumentException($"spans must hold {_n} points");
        return Scrambled(samples, complex, window, re, im, new PowerSums(sum, max, row, rowMax));
    }

    /// <summary>
    /// <see cref="ForwardPowerScrambled(ReadOnlySpan{double}, bool, ReadOnlySpan{double}, Span{double}, Span{double},
    /// Span{double}, Span{double}, Span{double}, bool)"/>
    /// from single-precision samples (a cf32 capture as stored): each is widened to double as it is
    /// loaded, so the result is that of the widened samples, bit for bit.
    /// </summary>
    public double ForwardPowerScrambled(
        ReadOnlySpan<float> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im,
        Span<double> sum,
        Span<double> max,
        Span<double> row,
        bool rowMax
    )
    {
        Check(samples.Length, complex, window, re, im);
        if (sum.Length != _n || max.Length != _n || (row.Length != _n && !row.IsEmpty))
            throw new ArgumentException($"spans must hold {_n} points");
        return Scrambled(samples, complex, window, re, im, new PowerSums(sum, max, row, rowMax));
    }

    /// <summary>
    /// Whether <see cref="ForwardPowerScrambledSingle"/> can run: a power of two from 64 points
    /// on a CPU with AVX2.
    /// </summary>
    public bool CanSingle => CanScramble && _n >= 64 && Avx2.IsSupported;

    private float[] _twReF = [],
        _twImF = [],
        _fRe = [],
        _fIm = [];
    private static readonly System.Collections.Concurrent.ConcurrentDictionary<int, (float[], float[])> TablesSingle =
        new();

    /// <summary>
    /// The Welch inner step (<c>ForwardPowerScrambled</c>) for complex single-precision samples
    /// in single-precision arithmetic: the window, the I/Q split and the radix-2^2 passes of
    /// half-size 32 and more in float (twice the lanes per vector, half the memory), the last
    /// passes and the powers in double, into the same sums at the same scrambled places. The
    /// transform's rounding is then that of float arithmetic, relative error of the order of
    /// 1e-7 times the square root of log2 N (tested against the double transform): the precision
    /// the samples were stored in. Returns a finite value when every sample is finite and the
    /// float transform cannot overflow; otherwise the segment is transformed in double
    /// (<c>ForwardPowerScrambled</c>, with <paramref name="windowDouble"/>, the window in double) and its check
    /// returned. The same results with 512-bit and with 256-bit vectors, bit for bit (tested).
    /// </summary>
    /// <exception cref="InvalidOperationException">Not <see cref="CanSingle"/>.</exception>
    public double ForwardPowerScrambledSingle(
        ReadOnlySpan<float> samples,
        ReadOnlySpan<float> window,
        ReadOnlySpan<double> windowDouble,
        Span<double> re,
        Span<double> im,
        Span<double> sum,
        Span<double> max,
        Span<double> row,
        bool rowMax
    )
    {
        int n = _n;
        if (!CanSingle)
            throw new InvalidOperationException(
                "the single-precision transform needs a power-of-two size from 64 and AVX2"
            );
        if (
            re.Length != n
            || im.Length != n
            || window.Length != n
            || windowDouble.Length != n
            || samples.Length < 2 * n
        )
            throw new ArgumentException($"spans must hold {n} points");
        if (sum.Length != n || max.Length != n || (row.Length != n && !row.IsEmpty))
            throw new ArgumentException($"spans must hold {n} points");
        if (_fRe.Length != n)
        {
            (_twReF, _twImF) = TablesSingle.GetOrAdd(n, _ =>
                ([.. _twRe.Select(v => (float)v)], [.. _twIm.Select(v => (float)v)])
            );
            _fRe = new float[n];
            _fIm = new float[n];
        }
        ref float fr = ref _fRe[0],
            fi = ref _fIm[0];
        // |I| + |Q| of the windowed samples, summed in float: finite only if each is, and then a
        // bound on every value of the transform (and of every partial sum a pass forms).
        float bound = _wide
            ? FirstPassSingleWide(samples, window, ref fr, ref fi)
            : FirstPassSingle256(samples, window, ref fr, ref fi);
        if (!float.IsFinite(bound) || bound > float.MaxValue / 4)
            return ForwardPowerScrambled(samples, complex: true, windowDouble, re, im, sum, max, row, rowMax);
        const int block = 1024;
        int h = n / 8;
        for (; 2 * h > block && h >= 32; h /= 4)
            PassSingle(ref fr, ref fi, 0, n, h);
        var sums = new PowerSums(sum, max, row, rowMax);
        ref double reRef = ref MemoryMarshal.GetReference(re),
            imRef = ref MemoryMarshal.GetReference(im);
        int len = Math.Min(n, block);
        for (int start = 0; start < n; start += len)
        {
            int hb = h;
            for (; hb >= 32; hb /= 4)
                PassSingle(ref fr, ref fi, start, len, hb);
            if (hb == 8 && Avx.IsSupported)
            {
                LastTwoPassesSingle(ref Unsafe.Add(ref fr, start), ref Unsafe.Add(ref fi, start), len, sums, start);
                continue;
            }
            // Odd powers of two: the block widened to double for the last passes and the powers.
            VectorMath.Widen(_fRe.AsSpan(start, len), re.Slice(start, len));
            VectorMath.Widen(_fIm.AsSpan(start, len), im.Slice(start, len));
            ScrambledStages(ref reRef, ref imRef, start, len, hb, sums);
        }
        return bound;
    }

    /// <summary>
    /// <see cref="LastTwoPasses"/> in float on two blocks of 16 at once (block g in the lower
    /// 128 bits, block g + 16 in the upper): the same operations on each value, the 4 x 4
    /// transposes within each 128-bit lane, so the powers land where the double pass puts them;
    /// each power widened to double and added into the sums at <paramref name="at"/> + its place.
    /// </summary>
    private void LastTwoPassesSingle(ref float reRef, ref float imRef, int len, PowerSums sums, int at)
    {
        static Vector256<float> Twice(Vector128<float> v) => Vector256.Create(v, v);
        Vector256<float> ar = Twice(Vector128.LoadUnsafe(ref _twReF[_stageOffset[4]])),
            ai = Twice(Vector128.LoadUnsafe(ref _twImF[_stageOffset[4]])); // W_16^k, k < 4
        Vector256<float> br = Twice(Vector128.LoadUnsafe(ref _twReF[_stageOffset[3]])),
            bi = Twice(Vector128.LoadUnsafe(ref _twImF[_stageOffset[3]])); // W_8^k
        for (int g = 0; g < len; g += 32)
        {
            Butterfly22(
                Pair(ref reRef, g),
                Pair(ref imRef, g),
                Pair(ref reRef, g + 4),
                Pair(ref imRef, g + 4),
                Pair(ref reRef, g + 8),
                Pair(ref imRef, g + 8),
                Pair(ref reRef, g + 12),
                Pair(ref imRef, g + 12),
                ar,
                ai,
                br,
                bi,
                out var y0r,
                out var y0i,
                out var y1r,
                out var y1i,
                out var y2r,
                out var y2i,
                out var y3r,
                out var y3i
            );
            var (r0, r1, r2, r3) = TransposeInLanes(y0r, y1r, y2r, y3r);
            var (i0, i1, i2, i3) = TransposeInLanes(y0i, y1i, y2i, y3i);
            Vector256<float> c0r = r0 + r2,
                c0i = i0 + i2,
                c2r = r0 - r2,
                c2i = i0 - i2;
            Vector256<float> c1r = r1 + r3,
                c1i = i1 + i3,
                c3r = i1 - i3,
                c3i = r3 - r1; // (x1 - x3)(-i)
            AddPair(sums, c0r + c1r, c0i + c1i, at + g);
            AddPair(sums, c0r - c1r, c0i - c1i, at + g + 4);
            AddPair(sums, c2r + c3r, c2i + c3i, at + g + 8);
            AddPair(sums, c2r - c3r, c2i - c3i, at + g + 12);
        }
    }

    /// <summary>Four floats from index i (lower half) and four from i + 16 (upper half).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector256<float> Pair(ref float x, int i) =>
        Vector256.Create(Vector128.LoadUnsafe(ref x, (nuint)i), Vector128.LoadUnsafe(ref x, (nuint)(i + 16)));

    /// <summary>The powers of the lower half's four bins added at index i, the upper half's at i + 16.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void AddPair(PowerSums sums, Vector256<float> re, Vector256<float> im, int i)
    {
        sums.Add(Avx.ConvertToVector256Double(re.GetLower()), Avx.ConvertToVector256Double(im.GetLower()), i);
        sums.Add(Avx.ConvertToVector256Double(re.GetUpper()), Avx.ConvertToVector256Double(im.GetUpper()), i + 16);
    }

    /// <summary>4 x 4 transpose of rows a, b, c, d within each 128-bit lane.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Vector256<float>, Vector256<float>, Vector256<float>, Vector256<float>) TransposeInLanes(
        Vector256<float> a,
        Vector256<float> b,
        Vector256<float> c,
        Vector256<float> d
    )
    {
        Vector256<float> t0 = Avx.UnpackLow(a, b),
            t1 = Avx.UnpackHigh(a, b); // a0 b0 a1 b1 | a2 b2 a3 b3 (per lane)
        Vector256<float> t2 = Avx.UnpackLow(c, d),
            t3 = Avx.UnpackHigh(c, d);
        return (
            Avx.Shuffle(t0, t2, 0x44),
            Avx.Shuffle(t0, t2, 0xEE),
            Avx.Shuffle(t1, t3, 0x44),
            Avx.Shuffle(t1, t3, 0xEE)
        );
    }

    private void PassSingle(ref float fr, ref float fi, int start, int len, int h)
    {
        if (_wide)
            Radix22PassWide(ref fr, ref fi, start, len, h, _twReF, _twImF);
        else
            Radix22Pass256(ref fr, ref fi, start, len, h, _twReF, _twImF);
    }

    /// <summary>The first single-precision radix-2^2 pass from interleaved I/Q, sixteen points per vector; returns the
    /// bound (see <see cref="ForwardPowerScrambledSingle"/>).</summary>
    private float FirstPassSingleWide(
        ReadOnlySpan<float> samples,
        ReadOnlySpan<float> window,
        ref float reRef,
        ref float imRef
    )
    {
        int n = _n,
            h = n / 2,
            q = h / 2;
        ref float x = ref MemoryMarshal.GetReference(samples);
        ref float w = ref MemoryMarshal.GetReference(window);
        ref float wAr = ref _twReF[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wAi = ref _twImF[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wBr = ref _twReF[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref float wBi = ref _twImF[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        Vector512<float> acc = Vector512<float>.Zero;
        Vector512<int> even = Vector512.Create(0, 2, 4, 6, 8, 10, 12, 14, 16, 18, 20, 22, 24, 26, 28, 30),
            odd = even + Vector512<int>.One;
        for (int k = 0; k < q; k += 16)
        {
            var (a0r, a0i) = LoadSplitSingleWide(ref x, ref w, k, even, odd);
            var (a1r, a1i) = LoadSplitSingleWide(ref x, ref w, k + q, even, odd);
            var (a2r, a2i) = LoadSplitSingleWide(ref x, ref w, k + 2 * q, even, odd);
            var (a3r, a3i) = LoadSplitSingleWide(ref x, ref w, k + 3 * q, even, odd);
            acc +=
                (Vector512.Abs(a0r) + Vector512.Abs(a0i))
                + (Vector512.Abs(a1r) + Vector512.Abs(a1i))
                + (Vector512.Abs(a2r) + Vector512.Abs(a2i))
                + (Vector512.Abs(a3r) + Vector512.Abs(a3i));
            Butterfly22Wide(
                a0r,
                a0i,
                a1r,
                a1i,
                a2r,
                a2i,
                a3r,
                a3i,
                Vector512.LoadUnsafe(ref wAr, (nuint)k),
                Vector512.LoadUnsafe(ref wAi, (nuint)k),
                Vector512.LoadUnsafe(ref wBr, (nuint)k),
                Vector512.LoadUnsafe(ref wBi, (nuint)k),
                out var y0r,
                out var y0i,
                out var y1r,
                out var y1i,
                out var y2r,
                out var y2i,
                out var y3r,
                out var y3i
            );
            y0r.StoreUnsafe(ref reRef, (nuint)k);
            y0i.StoreUnsafe(ref imRef, (nuint)k);
            y1r.StoreUnsafe(ref reRef, (nuint)(k + q));
            y1i.StoreUnsafe(ref imRef, (nuint)(k + q));
            y2r.StoreUnsafe(ref reRef, (nuint)(k + 2 * q));
            y2i.StoreUnsafe(ref imRef, (nuint)(k + 2 * q));
            y3r.StoreUnsafe(ref reRef, (nuint)(k + 3 * q));
            y3i.StoreUnsafe(ref imRef, (nuint)(k + 3 * q));
        }
        // The lanes summed in the order the 256-bit pass sums them (its two halves' lanes pairwise), so both give the
        // same bound.
        Vector256<float> folded = acc.GetLower() + acc.GetUpper();
        return Vector256.Sum(folded);
    }

    /// <summary><see cref="FirstPassSingleWide"/> on 256-bit vectors, eight points at a time: the same operations on
    /// each value.</summary>
    private float FirstPassSingle256(
        ReadOnlySpan<float> samples,
        ReadOnlySpan<float> window,
        ref float reRef,
        ref float imRef
    )
    {
        int n = _n,
            h = n / 2,
            q = h / 2;
        ref float x = ref MemoryMarshal.GetReference(samples);
        ref float w = ref MemoryMarshal.GetReference(window);
        ref float wAr = ref _twReF[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wAi = ref _twImF[_stageOffset[BitOperations.Log2((uint)h) + 1]];
        ref float wBr = ref _twReF[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        ref float wBi = ref _twImF[_stageOffset[BitOperations.Log2((uint)q) + 1]];
        Vector256<float> acc0 = Vector256<float>.Zero,
            acc1 = Vector256<float>.Zero;
        for (int k = 0; k < q; k += 8)
        {
            var (a0r, a0i) = LoadSplitSingle256(ref x, ref w, k);
            var (a1r, a1i) = LoadSplitSingle256(ref x, ref w, k + q);
            var (a2r, a2i) = LoadSplitSingle256(ref x, ref w, k + 2 * q);
            var (a3r, a3i) = LoadSplitSingle256(ref x, ref w, k + 3 * q);
            Vector256<float> part =
                (Vector256.Abs(a0r) + Vector256.Abs(a0i))
                + (Vector256.Abs(a1r) + Vector256.Abs(a1i))
                + (Vector256.Abs(a2r) + Vector256.Abs(a2i))
                + (Vector256.Abs(a3r) + Vector256.Abs(a3i));
            // Steps of eight alternate between the two accumulators, as the lower and upper halves of the 512-bit
            // pass's.
            if ((k & 8) == 0)
                acc0 += part;
            else
                acc1 += part;
            Butterfly22(
                a0r,
                a0i,
                a1r,
                a1i,
                a2r,
                a2i,
                a3r,
                a3i,
                Vector256.LoadUnsafe(ref wAr, (nuint)k),
                Vector256.LoadUnsafe(ref wAi, (nuint)k),
                Vector256.LoadUnsafe(ref wBr, (nuint)k),
                Vector256.LoadUnsafe(ref wBi, (nuint)k),
                out var y0r,
                out var y0i,
                out var y1r,
                out var y1i,
                out var y2r,
                out var y2i,
                out var y3r,
                out var y3i
            );
            y0r.StoreUnsafe(ref reRef, (nuint)k);
            y0i.StoreUnsafe(ref imRef, (nuint)k);
            y1r.StoreUnsafe(ref reRef, (nuint)(k + q));
            y1i.StoreUnsafe(ref imRef, (nuint)(k + q));
            y2r.StoreUnsafe(ref reRef, (nuint)(k + 2 * q));
            y2i.StoreUnsafe(ref imRef, (nuint)(k + 2 * q));
            y3r.StoreUnsafe(ref reRef, (nuint)(k + 3 * q));
            y3i.StoreUnsafe(ref imRef, (nuint)(k + 3 * q));
        }
        return Vector256.Sum(acc0 + acc1);
    }

    /// <summary>Sixteen windowed complex samples from index i of interleaved float I/Q, split into (I, Q).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Vector512<float>, Vector512<float>) LoadSplitSingleWide(
        ref float x,
        ref float w,
        int i,
        Vector512<int> even,
        Vector512<int> odd
    )
    {
        Vector512<float> v0 = Vector512.LoadUnsafe(ref x, (nuint)(2 * i)),
            v1 = Vector512.LoadUnsafe(ref x, (nuint)(2 * i + 16));
        Vector512<float> wv = Vector512.LoadUnsafe(ref w, (nuint)i);
        return (Avx512F.PermuteVar16x32x2(v0, even, v1) * wv, Avx512F.PermuteVar16x32x2(v0, odd, v1) * wv);
    }

    /// <summary>Eight windowed complex samples from index i of interleaved float I/Q, split into (I, Q).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Vector256<float>, Vector256<float>) LoadSplitSingle256(ref float x, ref float w, int i)
    {
        Vector256<float> v0 = Vector256.LoadUnsafe(ref x, (nuint)(2 * i)),
            v1 = Vector256.LoadUnsafe(ref x, (nuint)(2 * i + 8));
        Vector256<float> wv = Vector256.LoadUnsafe(ref w, (nuint)i);
        // I at even places, Q at odd: gathered per 128-bit lane, then the 64-bit pairs put in order.
        Vector256<double> re = Avx2.Permute4x64(Avx.Shuffle(v0, v1, 0b10_00_10_00).AsDouble(), 0b11_01_10_00);
        Vector256<double> im = Avx2.Permute4x64(Avx.Shuffle(v0, v1, 0b11_01_11_01).AsDouble(), 0b11_01_10_00);
        return (re.AsSingle() * wv, im.AsSingle() * wv);
    }

    /// <summary>
    /// The first radix-2^2 pass (half-size n/2, one group) straight from interleaved I/Q samples:
    /// each input is windowed and split as it is loaded. Returns the sum of the windowed values.
    /// </summary>
    private double FirstPassWindowed<T>(
        ReadOnlySpan<T> samples,
        ReadOnlySpan<double> window,
        ref double reRef,
        ref double imRef
    )
        where T : unmanaged
    {
        int n = _n,
            h = n / 2,
            q = h / 2;
        ref T x = ref MemoryMarshal.GetReference(samples);
        ref double w = ref MemoryMarshal.GetReference(window);
        Vector256<double> acc = Vector256<double>.Zero;
        for (int k = 0; k < q; k += 4)
        {
            var (a0r, a0i) = LoadSplit(ref x, ref w, k);
            var (a1r, a1i) = LoadSplit(ref x, ref w, k + q);
            var (a2r, a2i) = LoadSplit(ref x, ref w, k + 2 * q);
            var (a3r, a3i) = LoadSplit(ref x, ref w, k + 3 * q);
            acc += (a0r + a0i) + (a1r + a1i) + (a2r + a2i) + (a3r + a3i);
            FirstButterfly(a0r, a0i, a1r, a1i, a2r, a2i, a3r, a3i, k, q, ref reRef, ref imRef);
        }
        return Vector256.Sum(acc);
    }

    /// <summary>Four windowed complex samples from index i of interleaved I/Q (double, or float widened exactly), split
    /// into (I, Q).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Vector256<double>, Vector256<double>) LoadSplit<T>(ref T x, ref double w, int i)
        where T : unmanaged
    {
        Vector256<double> v0,
            v1;
        if (typeof(T) == typeof(float))
        {
            ref float f = ref Unsafe.As<T, float>(ref x);
            v0 = Avx.ConvertToVector256Double(Vector128.LoadUnsafe(ref f, (nuint)(2 * i)));
            v1 = Avx.ConvertToVector256Double(Vector128.LoadUnsafe(ref f, (nuint)(2 * i + 4)));
        }
        else
        {
            ref double d = ref Unsafe.As<T, double>(ref x);
            v0 = Vector256.LoadUnsafe(ref d, (nuint)(2 * i));
            v1 = Vector256.LoadUnsafe(ref d, (nuint)(2 * i + 4));
        }
        var wv = Vector256.LoadUnsafe(ref w, (nuint)i);
        return (
            Avx2.Permute4x64(Avx.UnpackLow(v0, v1), 0b11_01_10_00) * wv,
            Avx2.Permute4x64(Avx.UnpackHigh(v0, v1), 0b11_01_10_00) * wv
        );
    }

    /// <summary>Where the last pass of the Welch inner step (<c>ForwardPowerScrambled</c>) adds |X|^2.</summary>
    private readonly ref struct PowerSums(Span<double> sum, Span<double> max, Span<double> row, bool rowMax)
    {
        public readonly Span<double> Sum = sum,
            Max = max,
            Row = row;
        public readonly bool RowMax = rowMax,
            Active = true,
            HasRow = !row.IsEmpty;

        /// <summary>Adds the powers of four bins at index i.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        public void Add(Vector256<double> re, Vector256<double> im, int i)
        {
            Vector256<double> p = re * re + im * im;
            ref double s = ref Unsafe.Add(ref MemoryMarshal.GetReference(Sum), i);
            ref double m = ref Unsafe.Add(ref MemoryMarshal.GetReference(Max), i);
            (Vector256.LoadUnsafe(ref s) + p).StoreUnsafe(ref s);
            Vector256.Max(Vector256.LoadUnsafe(ref m), p).StoreUnsafe(ref m);
            if (!HasRow)
                return;
            ref double r = ref Unsafe.Add(ref MemoryMarshal.GetReference(Row), i);
            Vector256<double> rv = Vector256.LoadUnsafe(ref r);
            (RowMax ? Vector256.Max(rv, p) : rv + p).StoreUnsafe(ref r);
        }

        /// <summary>Adds the power of one bin at index i.</summary>
        public void Add(double re, double im, int i)
        {
            double p = re * re + im * im;
            Sum[i] += p;
            Max[i] = Math.Max(Max[i], p);
            if (HasRow)
                Row[i] = RowMax ? Math.Max(Row[i], p) : Row[i] + p;
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector256<double> LoadV4(ref double origin, int index) =>
        Vector256.LoadUnsafe(ref origin, (nuint)index);

    /// <summary>4 x 4 transpose of rows a, b, c, d.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (Vector256<double>, Vector256<double>, Vector256<double>, Vector256<double>) Transpose(
        Vector256<double> a,
        Vector256<double> b,
        Vector256<double> c,
        Vector256<double> d
    )
    {
        Vector256<double> ab0 = Avx.UnpackLow(a, b),
            ab1 = Avx.UnpackHigh(a, b); // a0 b0 a2 b2 | a1 b1 a3 b3
        Vector256<double> cd0 = Avx.UnpackLow(c, d),
            cd1 = Avx.UnpackHigh(c, d);
        return (
            Avx.Permute2x128(ab0, cd0, 0x20),
            Avx.Permute2x128(ab1, cd1, 0x20),
            Avx.Permute2x128(ab0, cd0, 0x31),
            Avx.Permute2x128(ab1, cd1, 0x31)
        );
    }

    private double[] _widened = [];

    /// <summary>The samples as doubles: themselves, or single precision widened into the plan's scratch.</summary>
    private ReadOnlySpan<double> AsDoubles<T>(ReadOnlySpan<T> samples)
        where T : unmanaged
    {
        if (typeof(T) == typeof(double))
            return MemoryMarshal.Cast<T, double>(samples);
        ReadOnlySpan<float> f = MemoryMarshal.Cast<T, float>(samples);
        if (_widened.Length < f.Length)
            _widened = new double[f.Length];
        VectorMath.Widen(f, _widened);
        return _widened.AsSpan(0, f.Length);
    }

    /// <summary>re, im = window x samples in natural order (interleaved I/Q split, or real with im = 0); returns their
    /// sum.</summary>
    private static double LoadWindowed(
        ReadOnlySpan<double> samples,
        bool complex,
        ReadOnlySpan<double> window,
        Span<double> re,
        Span<double> im
    )
    {
        int n = re.Length,
            i = 0;
        ref double x = ref MemoryMarshal.GetReference(samples);
        ref double w = ref MemoryMarshal.GetReference(window);
        ref double r = ref MemoryMarshal.GetReference(re);
        ref double q = ref MemoryMarshal.GetReference(im);
        var acc = System.Runtime.Intrinsics.Vector256<double>.Zero;
        if (complex && System.Runtime.Intrinsics.X86.Avx2.IsSupported)
        {
            for (; i + 4 <= n; i += 4)
            {
                var v0 = System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref x, (nuint)(2 * i));
                var v1 = System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref x, (nuint)(2 * i + 4));
                var wv = System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref w, (nuint)i);
                // [r0 i0 r1 i1], [r2 i2 r3 i3] -> [r0 r2 r1 r3], [i0 i2 i1 i3] -> natural order.
                var lo = System.Runtime.Intrinsics.X86.Avx.UnpackLow(v0, v1);
                var hi = System.Runtime.Intrinsics.X86.Avx.UnpackHigh(v0, v1);
                var vr = System.Runtime.Intrinsics.X86.Avx2.Permute4x64(lo, 0b11_01_10_00) * wv;
                var vi = System.Runtime.Intrinsics.X86.Avx2.Permute4x64(hi, 0b11_01_10_00) * wv;
                vr.StoreUnsafe(ref r, (nuint)i);
                vi.StoreUnsafe(ref q, (nuint)i);
                acc += vr + vi;
            }
        }
        else if (!complex && Vector<double>.Count == 4 && System.Runtime.Intrinsics.Vector256.IsHardwareAccelerated)
        {
            for (; i + 4 <= n; i += 4)
            {
                var vr =
                    System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref x, (nuint)i)
                    * System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref w, (nuint)i);
                vr.StoreUnsafe(ref r, (nuint)i);
                System.Runtime.Intrinsics.Vector256<double>.Zero.StoreUnsafe(ref q, (nuint)i);
                acc += vr;
            }
        }
        double check = System.Runtime.Intrinsics.Vector256.Sum(acc);
        for (; i < n; i++)
        {
            double wi = Unsafe.Add(ref w, i);
            double vr = (complex ? Unsafe.Add(ref x, 2 * i) : Unsafe.Add(ref x, i)) * wi;
            double vi = complex ? Unsafe.Add(ref x, 2 * i + 1) * wi : 0;
            Unsafe.Add(ref r, i) = vr;
            Unsafe.Add(ref q, i) = vi;
            check += vr + vi;
        }
        return check;
    }

    private void Radix2(Span<double> re, Span<double> im)
    {
        int n = _n;
        if (n == 1)
            return;
        int[] rev = _bitReverse;
        for (int i = 0; i < n; i++)
        {
            int j = rev[i];
            if (j > i)
            {
                (re[i], re[j]) = (re[j], re[i]);
                (im[i], im[j]) = (im[j], im[i]);
            }
        }
        Butterflies(re, im);
    }

    /// <summary>The butterfly stages of a decimation-in-time FFT on bit-reversed input.</summary>
    private void Butterflies(Span<double> re, Span<double> im)
    {
        int n = _n;
        // Stages 1 and 2 together (radix-4 on groups of four, twiddles 1 and -i).
        if (n >= 4)
        {
            for (int g = 0; g < n; g += 4)
            {
                double r0 = re[g] + re[g + 1],
                    i0 = im[g] + im[g + 1];
                double r1 = re[g] - re[g + 1],
                    i1 = im[g] - im[g + 1];
                double r2 = re[g + 2] + re[g + 3],
                    i2 = im[g + 2] + im[g + 3];
                double r3 = re[g + 2] - re[g + 3],
                    i3 = im[g + 2] - im[g + 3];
                re[g] = r0 + r2;
                im[g] = i0 + i2;
                re[g + 2] = r0 - r2;
                im[g + 2] = i0 - i2;
                // w = -i for the odd pair: (r3 + i i3)(-i) = i3 - i r3
                re[g + 1] = r1 + i3;
                im[g + 1] = i1 - r3;
                re[g + 3] = r1 - i3;
                im[g + 3] = i1 + r3;
            }
        }
        else
        {
            double r0 = re[0],
                i0 = im[0];
            re[0] = r0 + re[1];
            im[0] = i0 + im[1];
            re[1] = r0 - re[1];
            im[1] = i0 - im[1];
            return;
        }
        LaterStages(re, im);
    }

    /// <summary>Stages 3 and up: radix-2^2 passes with SIMD, then a last radix-2 stage when the count is odd.</summary>
    private void LaterStages(Span<double> re, Span<double> im)
    {
        int n = _n;
        int vw = Vector<double>.Count;
        ref double reRef = ref MemoryMarshal.GetReference(re);
        ref double imRef = ref MemoryMarshal.GetReference(im);
        int s = 3,
            h = 4;
        // Two radix-2 stages per pass (radix 2^2): stage s pairs (a0, a1) and (a2, a3) with
        // w1 = W_2h^k; stage s+1 pairs (b0, b2) with w2 = W_4h^k and (b1, b3) with -i w2.
        for (; s + 1 <= _log2 && h >= vw; s += 2, h <<= 2)
        {
            ref double w1r = ref _twRe[_stageOffset[s]];
            ref double w1i = ref _twIm[_stageOffset[s]];
            ref double w2r = ref _twRe[_stageOffset[s + 1]];
            ref double w2i = ref _twIm[_stageOffset[s + 1]];
            for (int g = 0; g < n; g += 4 * h)
            {
                for (int k = 0; k < h; k += vw)
                {
                    int i0 = g + k,
                        i1 = i0 + h,
                        i2 = i1 + h,
                        i3 = i2 + h;
                    Vector<double> ar = VectorMath.Load(ref w1r, k),
                        ai = VectorMath.Load(ref w1i, k);
                    Vector<double> a1r = VectorMath.Load(ref reRef, i1),
                        a1i = VectorMath.Load(ref imRef, i1);
                    Vector<double> a3r = VectorMath.Load(ref reRef, i3),
                        a3i = VectorMath.Load(ref imRef, i3);
                    Vector<double> t1r = ar * a1r - ai * a1i,
                        t1i = ar * a1i + ai * a1r;
                    Vector<double> t3r = ar * a3r - ai * a3i,
                        t3i = ar * a3i + ai * a3r;
                    Vector<double> a0r = VectorMath.Load(ref reRef, i0),
                        a0i = VectorMath.Load(ref imRef, i0);
                    Vector<double> a2r = VectorMath.Load(ref reRef, i2),
                        a2i = VectorMath.Load(ref imRef, i2);
                    Vector<double> b0r = a0r + t1r,
                        b0i = a0i + t1i,
                        b1r = a0r - t1r,
                        b1i = a0i - t1i;
                    Vector<double> b2r = a2r + t3r,
                        b2i = a2i + t3i,
                        b3r = a2r - t3r,
                        b3i = a2i - t3i;
                    Vector<double> cr = VectorMath.Load(ref w2r, k),
                        ci = VectorMath.Load(ref w2i, k);
                    Vector<double> u2r = cr * b2r - ci * b2i,
                        u2i = cr * b2i + ci * b2r;
                    // (-i w2) b3 = -i (w2 b3): (x + iy)(-i) = y - ix
                    Vector<double> v3r = cr * b3r - ci * b3i,
                        v3i = cr * b3i + ci * b3r;
                    VectorMath.Store(b0r + u2r, ref reRef, i0);
                    VectorMath.Store(b0i + u2i, ref imRef, i0);
                    VectorMath.Store(b0r - u2r, ref reRef, i2);
                    VectorMath.Store(b0i - u2i, ref imRef, i2);
                    VectorMath.Store(b1r + v3i, ref reRef, i1);
                    VectorMath.Store(b1i - v3r, ref imRef, i1);
                    VectorMath.Store(b1r - v3i, ref reRef, i3);
                    VectorMath.Store(b1i + v3r, ref imRef, i3);
                }
            }
        }
        for (; s <= _log2; s++, h <<= 1)
        {
            int tw = _stageOffset[s];
            ref double twr = ref _twRe[tw];
            ref double twi = ref _twIm[tw];
            if (h >= vw)
            {
                for (int g = 0; g < n; g += 2 * h)
                {
                    for (int k = 0; k < h; k += vw)
                    {
                        int a = g + k,
                            b = a + h;
                        var wr = VectorMath.Load(ref twr, k);
                        var wi = VectorMath.Load(ref twi, k);
                        var br = VectorMath.Load(ref reRef, b);
                        var bi = VectorMath.Load(ref imRef, b);
                        var tr = wr * br - wi * bi;
                        var ti = wr * bi + wi * br;
                        var ar = VectorMath.Load(ref reRef, a);
                        var ai = VectorMath.Load(ref imRef, a);
                        VectorMath.Store(ar + tr, ref reRef, a);
                        VectorMath.Store(ai + ti, ref imRef, a);
                        VectorMath.Store(ar - tr, ref reRef, b);
                        VectorMath.Store(ai - ti, ref imRef, b);
                    }
                }
            }
            else
            {
                for (int g = 0; g < n; g += 2 * h)
                {
                    for (int k = 0; k < h; k++)
                    {
                        int a = g + k,
                            b = a + h;
                        double wr = Unsafe.Add(ref twr, k),
                            wi = Unsafe.Add(ref twi, k);
                        double tr = wr * re[b] - wi * im[b];
                        double ti = wr * im[b] + wi * re[b];
                        re[b] = re[a] - tr;
                        im[b] = im[a] - ti;
                        re[a] += tr;
                        im[a] += ti;
                    }
                }
            }
        }
    }

    private static uint ReverseBits(uint v)
    {
        v = ((v >> 1) & 0x55555555u) | ((v & 0x55555555u) << 1);
        v = ((v >> 2) & 0x33333333u) | ((v & 0x33333333u) << 2);
        v = ((v >> 4) & 0x0F0F0F0Fu) | ((v & 0x0F0F0F0Fu) << 4);
        v = ((v >> 8) & 0x00FF00FFu) | ((v & 0x00FF00FFu) << 8);
        return (v >> 16) | (v << 16);
    }
}
