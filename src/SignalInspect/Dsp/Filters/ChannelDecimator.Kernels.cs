using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace SignalInspect.Dsp;

// ChannelDecimator, part 2: the mixer and the filter's sums on 256- and 512-bit vectors (each wide kernel does the same
// operations per value as its 256-bit twin).
public sealed partial class ChannelDecimator
{
    /// <summary>Shifts <paramref name="piece"/> samples (oscillator table index k0 onwards) into <paramref
    /// name="z"/>.</summary>
    private void Mix<T>(ReadOnlySpan<T> x, int k0, int piece, Span<float> z)
        where T : unmanaged
    {
        double cyc = _shiftCyclesPerSample * (_n - k0);
        double anchor = 2 * Math.PI * (cyc - Math.Floor(cyc));
        double ar = Math.Cos(anchor),
            ai = Math.Sin(anchor);
        ReadOnlySpan<double> t = _table.AsSpan(2 * k0, 2 * piece);
        int i = 0;
        if (_complexInput && _wide)
            i = MixWide(x, t, z, ar, ai, piece);
        if (_complexInput && System.Runtime.Intrinsics.X86.Avx.IsSupported)
        {
            i += MixAvx(x[(2 * i)..], t[(2 * i)..], z[(2 * i)..], ar, ai, piece - i);
        }
        for (; i < piece; i++)
        {
            double c = t[2 * i] * ar - t[2 * i + 1] * ai,
                s = t[2 * i] * ai + t[2 * i + 1] * ar;
            double xr = _complexInput ? At(x, 2 * i) : At(x, i),
                xi = _complexInput ? At(x, 2 * i + 1) : 0;
            if (!double.IsFinite(xr))
                xr = 0;
            if (!double.IsFinite(xi))
                xi = 0;
            z[2 * i] = (float)(xr * c - xi * s);
            z[2 * i + 1] = (float)(xr * s + xi * c);
        }
    }

    /// <summary>Value i of a double or float span, as a double.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double At<T>(ReadOnlySpan<T> x, int i)
        where T : unmanaged =>
        typeof(T) == typeof(float)
            ? System.Runtime.InteropServices.MemoryMarshal.Cast<T, float>(x)[i]
            : System.Runtime.InteropServices.MemoryMarshal.Cast<T, double>(x)[i];

    /// <summary>
    /// <see cref="MixAvx"/> four complex samples per step on 512-bit vectors, with the same
    /// operations per value (the alternating subtract and add as a multiply-add by +/-1, which is
    /// exact), so the same results bit for bit. Returns the samples done.
    /// </summary>
    private static int MixWide<T>(
        ReadOnlySpan<T> x,
        ReadOnlySpan<double> t,
        Span<float> z,
        double ar,
        double ai,
        int piece
    )
        where T : unmanaged
    {
        var vr = Vector512.Create(ar);
        var vi = Vector512.Create(ai);
        var sign = Vector512.Create(-1.0, 1.0, -1.0, 1.0, -1.0, 1.0, -1.0, 1.0);
        var swap = Vector512.Create(1L, 0, 3, 2, 5, 4, 7, 6);
        var evens = Vector512.Create(0L, 0, 2, 2, 4, 4, 6, 6);
        var odds = Vector512.Create(1L, 1, 3, 3, 5, 5, 7, 7);
        ref T xs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(x);
        ref double ts = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(t);
        ref float zs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(z);
        int i = 0;
        for (; i + 4 <= piece; i += 4)
        {
            var tv = Vector512.LoadUnsafe(ref ts, (nuint)(2 * i));
            var osc = Vector512.FusedMultiplyAdd(Vector512.Shuffle(tv, swap) * vi, sign, tv * vr);
            var xv =
                typeof(T) == typeof(float)
                    ? System.Runtime.Intrinsics.X86.Avx512F.ConvertToVector512Double(
                        Vector256.LoadUnsafe(ref Unsafe.As<T, float>(ref xs), (nuint)(2 * i))
                    )
                    : Vector512.LoadUnsafe(ref Unsafe.As<T, double>(ref xs), (nuint)(2 * i));
            xv = Vector512.ConditionalSelect(
                Vector512.Equals(xv - xv, Vector512<double>.Zero),
                xv,
                Vector512<double>.Zero
            );
            var y = Vector512.FusedMultiplyAdd(
                Vector512.Shuffle(xv, swap) * Vector512.Shuffle(osc, odds),
                sign,
                xv * Vector512.Shuffle(osc, evens)
            );
            System.Runtime.Intrinsics.X86.Avx512F.ConvertToVector256Single(y).StoreUnsafe(ref zs, (nuint)(2 * i));
        }
        return i;
    }

    /// <summary>Two complex samples per step: osc = anchor x table, y = x osc, both as interleaved complex
    /// products.</summary>
    private static int MixAvx<T>(
        ReadOnlySpan<T> x,
        ReadOnlySpan<double> t,
        Span<float> z,
        double ar,
        double ai,
        int piece
    )
        where T : unmanaged
    {
        var vr = System.Runtime.Intrinsics.Vector256.Create(ar);
        var vi = System.Runtime.Intrinsics.Vector256.Create(ai);
        ref T xs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(x);
        ref double ts = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(t);
        ref float zs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(z);
        int i = 0;
        for (; i + 2 <= piece; i += 2)
        {
            var tv = System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref ts, (nuint)(2 * i));
            // osc = t * a: [tr ar - ti ai, ti ar + tr ai] per complex lane.
            var osc = System.Runtime.Intrinsics.X86.Avx.AddSubtract(
                tv * vr,
                System.Runtime.Intrinsics.X86.Avx.Permute(tv, 0b0101) * vi
            );
            var xv =
                typeof(T) == typeof(float)
                    ? System.Runtime.Intrinsics.X86.Avx.ConvertToVector256Double(
                        System.Runtime.Intrinsics.Vector128.LoadUnsafe(ref Unsafe.As<T, float>(ref xs), (nuint)(2 * i))
                    )
                    : System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref Unsafe.As<T, double>(ref xs), (nuint)(2 * i));
            // Non-finite components become 0 (x - x is 0 only for finite x).
            xv = System.Runtime.Intrinsics.Vector256.ConditionalSelect(
                System.Runtime.Intrinsics.Vector256.Equals(xv - xv, System.Runtime.Intrinsics.Vector256<double>.Zero),
                xv,
                System.Runtime.Intrinsics.Vector256<double>.Zero
            );
            var cre = System.Runtime.Intrinsics.X86.Avx.Permute(osc, 0b0000);
            var cim = System.Runtime.Intrinsics.X86.Avx.Permute(osc, 0b1111);
            var y = System.Runtime.Intrinsics.X86.Avx.AddSubtract(
                xv * cre,
                System.Runtime.Intrinsics.X86.Avx.Permute(xv, 0b0101) * cim
            );
            System.Runtime.Intrinsics.Vector128.StoreUnsafe(
                System.Runtime.Intrinsics.X86.Avx.ConvertToVector128Single(y),
                ref zs,
                (nuint)(2 * i)
            );
        }
        return i;
    }

    /// <summary>
    /// Filter outputs over the windows of _taps samples starting at indices <paramref name="s0"/> and
    /// <paramref name="s1"/> of _z: two outputs share each load of the taps.
    /// </summary>
    private void Dot2(int s0, int s1, out double re0, out double im0, out double re1, out double im1)
    {
        if (_wide)
        {
            // The same sums as Dot4Wide's, so that an output does not depend on which of the two computed it.
            ref float hw = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
            ref float zw = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z);
            ref float y0 = ref Unsafe.Add(ref zw, 2 * s0);
            ref float y1 = ref Unsafe.Add(ref zw, 2 * s1);
            Vector512<float> c0 = default,
                c1 = default;
            for (int k = 0; k < 2 * _taps; k += Vector512<float>.Count)
            {
                Vector512<float> hk = Vector512.LoadUnsafe(ref hw, (nuint)k);
                c0 = Vector512.FusedMultiplyAdd(hk, Vector512.LoadUnsafe(ref y0, (nuint)k), c0);
                c1 = Vector512.FusedMultiplyAdd(hk, Vector512.LoadUnsafe(ref y1, (nuint)k), c1);
            }
            (re0, im0) = SumPairs((c0.GetLower() + c0.GetUpper()).AsVector());
            (re1, im1) = SumPairs((c1.GetLower() + c1.GetUpper()).AsVector());
            return;
        }
        int len = 2 * _taps;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z);
        ref float z0 = ref Unsafe.Add(ref z, 2 * s0);
        ref float z1 = ref Unsafe.Add(ref z, 2 * s1);
        int w = Vector<float>.Count,
            j = 0;
        Vector<float> a0 = default,
            a1 = default,
            b0 = default,
            b1 = default;
        for (; j + 2 * w <= len; j += 2 * w)
        {
            Vector<float> h0 = LoadF(ref h, j),
                h1 = LoadF(ref h, j + w);
            a0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z0, j), a0);
            b0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z1, j), b0);
            a1 = Vector.FusedMultiplyAdd(h1, LoadF(ref z0, j + w), a1);
            b1 = Vector.FusedMultiplyAdd(h1, LoadF(ref z1, j + w), b1);
        }
        for (; j < len; j += w)
        {
            Vector<float> h0 = LoadF(ref h, j);
            a0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z0, j), a0);
            b0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z1, j), b0);
        }
        (re0, im0) = SumPairs(a0 + a1);
        (re1, im1) = SumPairs(b0 + b1);
    }

    /// <summary>Four consecutive outputs, windows from <paramref name="s0"/> on, one decimation apart: four sums per
    /// load of the taps.</summary>
    private void Dot4(int s0, Span<double> re, Span<double> im)
    {
        if (_wide)
        {
            Dot4Wide(s0, re, im);
            return;
        }
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        ref float z1 = ref Unsafe.Add(ref z0, step);
        ref float z2 = ref Unsafe.Add(ref z1, step);
        ref float z3 = ref Unsafe.Add(ref z2, step);
        int w = Vector<float>.Count;
        // Two sums per output (eight independent chains) so that the FMA latency is hidden.
        Vector<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default,
            b0 = default,
            b1 = default,
            b2 = default,
            b3 = default;
        int j = 0;
        for (; j + 2 * w <= len; j += 2 * w)
        {
            Vector<float> hj = LoadF(ref h, j),
                hk = LoadF(ref h, j + w);
            a0 = Vector.FusedMultiplyAdd(hj, LoadF(ref z0, j), a0);
            a1 = Vector.FusedMultiplyAdd(hj, LoadF(ref z1, j), a1);
            a2 = Vector.FusedMultiplyAdd(hj, LoadF(ref z2, j), a2);
            a3 = Vector.FusedMultiplyAdd(hj, LoadF(ref z3, j), a3);
            b0 = Vector.FusedMultiplyAdd(hk, LoadF(ref z0, j + w), b0);
            b1 = Vector.FusedMultiplyAdd(hk, LoadF(ref z1, j + w), b1);
            b2 = Vector.FusedMultiplyAdd(hk, LoadF(ref z2, j + w), b2);
            b3 = Vector.FusedMultiplyAdd(hk, LoadF(ref z3, j + w), b3);
        }
        if (j < len)
        {
            Vector<float> hj = LoadF(ref h, j);
            a0 = Vector.FusedMultiplyAdd(hj, LoadF(ref z0, j), a0);
            a1 = Vector.FusedMultiplyAdd(hj, LoadF(ref z1, j), a1);
            a2 = Vector.FusedMultiplyAdd(hj, LoadF(ref z2, j), a2);
            a3 = Vector.FusedMultiplyAdd(hj, LoadF(ref z3, j), a3);
        }
        (re[0], im[0]) = SumPairs(a0 + b0);
        (re[1], im[1]) = SumPairs(a1 + b1);
        (re[2], im[2]) = SumPairs(a2 + b2);
        (re[3], im[3]) = SumPairs(a3 + b3);
    }

    /// <summary><see cref="Dot4"/> with 512-bit vectors; the taps are padded to whole 512-bit vectors.</summary>
    private void Dot4Wide(int s0, Span<double> re, Span<double> im)
    {
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        ref float z1 = ref Unsafe.Add(ref z0, step);
        ref float z2 = ref Unsafe.Add(ref z1, step);
        ref float z3 = ref Unsafe.Add(ref z2, step);
        int w = Vector512<float>.Count;
        Vector512<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default;
        for (int j = 0; j < len; j += w)
        {
            Vector512<float> hj = Vector512.LoadUnsafe(ref h, (nuint)j);
            a0 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z0, (nuint)j), a0);
            a1 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z1, (nuint)j), a1);
            a2 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z2, (nuint)j), a2);
            a3 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z3, (nuint)j), a3);
        }
        (re[0], im[0]) = SumPairs((a0.GetLower() + a0.GetUpper()).AsVector());
        (re[1], im[1]) = SumPairs((a1.GetLower() + a1.GetUpper()).AsVector());
        (re[2], im[2]) = SumPairs((a2.GetLower() + a2.GetUpper()).AsVector());
        (re[3], im[3]) = SumPairs((a3.GetLower() + a3.GetUpper()).AsVector());
    }

    /// <summary>
    /// Eight consecutive outputs per load of the taps (fewer loads per multiply-add than
    /// <see cref="Dot4Wide"/>): each output's sum is formed exactly as there, so the same outputs.
    /// </summary>
    private void Dot8Wide(int s0, Span<double> re, Span<double> im)
    {
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        nuint d = (nuint)step;
        int w = Vector512<float>.Count;
        Vector512<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default,
            a4 = default,
            a5 = default,
            a6 = default,
            a7 = default;
        for (int j = 0; j < len; j += w)
        {
            Vector512<float> hj = Vector512.LoadUnsafe(ref h, (nuint)j);
            ref float zj = ref Unsafe.Add(ref z0, j);
            a0 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj), a0);
            a1 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, d), a1);
            a2 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 2 * d), a2);
            a3 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 3 * d), a3);
            a4 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 4 * d), a4);
            a5 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 5 * d), a5);
            a6 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 6 * d), a6);
            a7 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 7 * d), a7);
        }
        (re[0], im[0]) = SumPairs((a0.GetLower() + a0.GetUpper()).AsVector());
        (re[1], im[1]) = SumPairs((a1.GetLower() + a1.GetUpper()).AsVector());
        (re[2], im[2]) = SumPairs((a2.GetLower() + a2.GetUpper()).AsVector());
        (re[3], im[3]) = SumPairs((a3.GetLower() + a3.GetUpper()).AsVector());
        (re[4], im[4]) = SumPairs((a4.GetLower() + a4.GetUpper()).AsVector());
        (re[5], im[5]) = SumPairs((a5.GetLower() + a5.GetUpper()).AsVector());
        (re[6], im[6]) = SumPairs((a6.GetLower() + a6.GetUpper()).AsVector());
        (re[7], im[7]) = SumPairs((a7.GetLower() + a7.GetUpper()).AsVector());
    }

    /// <summary>The sums of the even (I) and the odd (Q) lanes, in double.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (double Re, double Im) SumPairs(Vector<float> v)
    {
        Vector.Widen(v, out Vector<double> lo, out Vector<double> hi);
        Vector<double> s = lo + hi;
        double re = 0,
            im = 0;
        for (int l = 0; l < Vector<double>.Count; l += 2)
        {
            re += s[l];
            im += s[l + 1];
        }
        return (re, im);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector<float> LoadF(ref float origin, int index) =>
        Unsafe.ReadUnaligned<Vector<float>>(ref Unsafe.As<float, byte>(ref Unsafe.Add(ref origin, index)));
}
