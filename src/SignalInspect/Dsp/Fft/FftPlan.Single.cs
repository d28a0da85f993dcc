using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Dsp;

// FftPlan, part 4: the Welch inner step (windowed transform with |X|^2 into sums), in double and in single precision.
public sealed partial class FftPlan
{
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
}
