using System.Numerics;
using System.Runtime.CompilerServices;

namespace SignalInspect.Dsp;

/// <summary>
/// A real FIR filter on a stream, a block at a time: y[n] = sum_k h[k] x[n - k], with zero
/// history before the first sample (the post-detection filters). Short filters run directly, SIMD
/// across outputs; from <see cref="FastFromTaps"/> taps on, by fast convolution (overlap-save,
/// Oppenheim and Schafer), two real segments per complex transform: the same outputs to rounding,
/// at a cost that hardly grows with the length. A plan with state.
/// </summary>
public sealed class BlockFir
{
    /// <summary>Taps from which the fast convolution is used.</summary>
    public const int FastFromTaps = 64;

    private readonly double[] _taps; // reversed: window oldest first
    private double[] _buf; // taps - 1 history samples, then the block
    private readonly FftPlan? _plan;

    // Fast convolution: the filter's spectrum in bit-reversed order (scaled by 1/N), where the
    // scrambled transform leaves each bit-reversed position's bin, the pair of input segments
    // interleaved, a window of ones, and the transform buffers.
    private readonly double[] _hRe = [],
        _hIm = [],
        _pair = [],
        _ones = [],
        _zr = [],
        _zi = [],
        _wr = [],
        _wi = [];

    /// <summary>Creates the filter from its taps.</summary>
    public BlockFir(double[] taps)
    {
        ArgumentOutOfRangeException.ThrowIfZero(taps.Length);
        _taps = [.. taps.Reverse()];
        _buf = new double[taps.Length - 1 + 4096];
        if (taps.Length >= FastFromTaps)
        {
            int n = (int)System.Numerics.BitOperations.RoundUpToPowerOf2((uint)(4 * taps.Length));
            _plan = new FftPlan(n);
            double[] hr = new double[n],
                hi = new double[n];
            taps.CopyTo(hr, 0);
            _plan.Forward(hr, hi);
            _hRe = new double[n];
            _hIm = new double[n];
            for (int q = 0; q < n; q++)
            {
                int k = _plan.BitReversed(q);
                // The inverse transform's 1/N folded into the filter's spectrum.
                _hRe[q] = hr[k] / n;
                _hIm[q] = hi[k] / n;
            }
            _pair = new double[2 * n];
            _ones = new double[n];
            Array.Fill(_ones, 1.0);
            _zr = new double[n];
            _zi = new double[n];
            _wr = new double[n];
            _wi = new double[n];
        }
    }

    /// <summary>Starts again with zero history, as if constructed.</summary>
    public void Reset() => Array.Clear(_buf);

    /// <summary>Filters a block; <paramref name="y"/> may be <paramref name="x"/> itself.</summary>
    public void Process(ReadOnlySpan<double> x, Span<double> y)
    {
        if (_plan is not null)
        {
            ProcessFast(x, y);
            return;
        }
        int t = _taps.Length,
            n = x.Length,
            hist = t - 1;
        if (_buf.Length < hist + n)
            Array.Resize(ref _buf, hist + n);
        x.CopyTo(_buf.AsSpan(hist));
        ref double b = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_buf);
        ref double h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps);
        ref double o = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(y);
        int w = Vector<double>.Count,
            i = 0;
        // Eight vectors of outputs per sweep over the taps: independent sums keep the FMA units busy.
        for (; i + 8 * w <= n; i += 8 * w)
        {
            Vector<double> a0 = default,
                a1 = default,
                a2 = default,
                a3 = default,
                a4 = default,
                a5 = default,
                a6 = default,
                a7 = default;
            for (int k = 0; k < t; k++)
            {
                var hk = new Vector<double>(Unsafe.Add(ref h, k));
                ref double bk = ref Unsafe.Add(ref b, i + k);
                a0 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 0), a0);
                a1 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, w), a1);
                a2 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 2 * w), a2);
                a3 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 3 * w), a3);
                a4 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 4 * w), a4);
                a5 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 5 * w), a5);
                a6 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 6 * w), a6);
                a7 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 7 * w), a7);
            }
            VectorMath.Store(a0, ref o, i);
            VectorMath.Store(a1, ref o, i + w);
            VectorMath.Store(a2, ref o, i + 2 * w);
            VectorMath.Store(a3, ref o, i + 3 * w);
            VectorMath.Store(a4, ref o, i + 4 * w);
            VectorMath.Store(a5, ref o, i + 5 * w);
            VectorMath.Store(a6, ref o, i + 6 * w);
            VectorMath.Store(a7, ref o, i + 7 * w);
        }
        for (; i + w <= n; i += w)
        {
            Vector<double> a0 = default;
            for (int k = 0; k < t; k++)
                a0 = Vector.FusedMultiplyAdd(
                    new Vector<double>(Unsafe.Add(ref h, k)),
                    VectorMath.Load(ref b, i + k),
                    a0
                );
            VectorMath.Store(a0, ref o, i);
        }
        for (; i < n; i++)
        {
            double s = 0;
            for (int k = 0; k < t; k++)
                s += Unsafe.Add(ref h, k) * Unsafe.Add(ref b, i + k);
            y[i] = s;
        }
        _buf.AsSpan(n, hist).CopyTo(_buf);
    }

    /// <summary>
    /// Overlap-save: the segment of N inputs from buffer index s yields the L = N - taps + 1 outputs
    /// from s on (the first taps - 1 values of the circular convolution are discarded); segments s
    /// and s + L share one complex transform as its real and imaginary parts (the filter is real).
    /// The forward transform leaves its bins scrambled; the product with the filter's spectrum is
    /// written in bit-reversed order, conjugated, and transformed back by decimation in time
    /// (IDFT(Z) = conj(DFT(conj Z)) / N): no permutation pass. A segment pair holding a non-finite
    /// value is computed by the convolution sum instead, so that the value spreads as it would there.
    /// </summary>
    private void ProcessFast(ReadOnlySpan<double> x, Span<double> y)
    {
        int t = _taps.Length,
            m = x.Length,
            hist = t - 1,
            n = _zr.Length,
            l = n - t + 1;
        if (_buf.Length < hist + m + 2 * n)
            Array.Resize(ref _buf, hist + m + 2 * n);
        x.CopyTo(_buf.AsSpan(hist));
        _buf.AsSpan(hist + m, 2 * n).Clear();
        FftPlan plan = _plan!;
        for (int start = 0; start < m; start += 2 * l)
        {
            VectorMath.Interleave(_buf.AsSpan(start, n), _buf.AsSpan(start + l, n), _pair);
            if (double.IsFinite(plan.ForwardWindowedScrambled(_pair, complex: true, _ones, _zr, _zi)))
            {
                plan.ConjugateProductToBitReversed(_zr, _zi, _hRe, _hIm, _wr, _wi);
                plan.ForwardFromBitReversed(_wr, _wi);
            }
            else
                DirectSegments(start, l);
            int first = Math.Min(l, m - start),
                second = Math.Max(0, Math.Min(l, m - start - l));
            _wr.AsSpan(hist, first).CopyTo(y.Slice(start, first));
            if (second > 0)
                VectorMath.Negate(_wi.AsSpan(hist, second), y.Slice(start + l, second));
        }
        _buf.AsSpan(m, hist).CopyTo(_buf);
    }

    /// <summary>
    /// A segment pair with a non-finite value: its outputs by the convolution sum (a transform
    /// would spread a NaN over the whole segment, and paired over its partner), into _wr and -_wi
    /// where the transform would have left them.
    /// </summary>
    private void DirectSegments(int start, int l)
    {
        int t = _taps.Length,
            hist = t - 1;
        for (int u = 0; u < l; u++)
        {
            double sa = 0,
                sb = 0;
            for (int k = 0; k < t; k++)
            {
                sa += _taps[k] * _buf[start + u + k];
                sb += _taps[k] * _buf[start + l + u + k];
            }
            _wr[hist + u] = sa;
            _wi[hist + u] = -sb;
        }
    }
}
