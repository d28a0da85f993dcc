using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Dsp;

// FftPlan, part 2: the scrambled-order transforms (decimation in frequency, bins left in bit-reversed order) and the
// pair and bit-reversed entry points.
public sealed partial class FftPlan
{
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

    /// <summary>
    /// Whether the scrambled transform's last pass runs on 4 x 4 transposed blocks: 16 points or more,
    /// AVX, and the passes before it on four-lane vectors (<see cref="Vector{T}"/> of four doubles, which
    /// needs AVX2). A CPU with AVX but not AVX2 runs the passes on two lanes, which end in natural order:
    /// there the tail must not be transposed, or <see cref="ScrambledIndex"/> would point at the wrong bins.
    /// </summary>
    private bool TransposedTail => _n >= 16 && Avx.IsSupported && Vector<double>.Count == 4;

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
}
