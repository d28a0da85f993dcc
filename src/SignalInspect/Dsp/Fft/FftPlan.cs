using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

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
public sealed partial class FftPlan
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
