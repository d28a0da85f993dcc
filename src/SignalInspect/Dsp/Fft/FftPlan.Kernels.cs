using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Dsp;

// FftPlan, part 3: the radix-2^2 butterflies and passes on 256- and 512-bit vectors, the fused |X|^2 destinations and
// the vector loads.
public sealed partial class FftPlan
{
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
}
