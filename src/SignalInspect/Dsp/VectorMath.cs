using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Dsp;

/// <summary>
/// Which vector width the kernels with a 512-bit variant use (the channel filter's sums, the FFT's
/// radix-2^2 passes): 512 bits where the CPU has AVX-512, else <see cref="Vector{T}"/>. Read when a
/// plan is built.
/// </summary>
internal static class Simd
{
    /// <summary>True when the 512-bit variants run.</summary>
    public static bool Wide => Vector512.IsHardwareAccelerated && Vector<double>.Count == 4 && !NarrowForTests;

    /// <summary>Tests only: plans built by the calling flow use the narrow kernels even where 512-bit ones are
    /// available.</summary>
    public static bool NarrowForTests
    {
        get => Narrow.Value;
        set => Narrow.Value = value;
    }

    private static readonly AsyncLocal<bool> Narrow = new();
}

/// <summary>
/// Element-wise functions on spans with SIMD (<see cref="Vector{T}"/>): the demodulators'
/// arctangent and magnitude, scaling, differences, interleaving, a block at a time.
/// </summary>
public static class VectorMath
{
    // Cephes atan (S. L. Moshier, Cephes Math Library, atan.c): atan(x) = x + x z P(z)/Q(z),
    // z = x^2, for 0 <= x <= 0.66; above that atan(x) = pi/4 + atan((x - 1)/(x + 1)). Relative
    // error about 1e-16 in double precision (the library's own figure); tested against Math.Atan2.
    private const double P0 = -8.750608600031904122785E-1,
        P1 = -1.615753718733365076637E1,
        P2 = -7.500855792314704667340E1,
        P3 = -1.228866684490136173410E2,
        P4 = -6.485021904942025371773E1;
    private const double Q0 = 2.485846490142306297962E1,
        Q1 = 1.650270098316988542046E2,
        Q2 = 4.328810604912902668951E2,
        Q3 = 4.853903996359136964868E2,
        Q4 = 1.945506571482613964425E2;
    private const double MoreBits = 6.123233995736765886130E-17;

    /// <summary>
    /// result[i] = atan2(y[i], x[i]) in (-pi, pi], as <see cref="Math.Atan2"/> to within a few
    /// units in the last place (signed zeros and infinities are not distinguished; NaN gives NaN).
    /// </summary>
    /// <exception cref="ArgumentException">The spans differ in length.</exception>
    public static void Atan2(ReadOnlySpan<double> y, ReadOnlySpan<double> x, Span<double> result)
    {
        if (y.Length != x.Length || result.Length != x.Length)
            throw new ArgumentException("y, x and result must have the same length");
        int n = x.Length,
            w = Vector<double>.Count,
            i = 0;
        ref double yr = ref MemoryMarshal.GetReference(y);
        ref double xr = ref MemoryMarshal.GetReference(x);
        ref double rr = ref MemoryMarshal.GetReference(result);
        for (; i + w <= n; i += w)
        {
            var vy = Load(ref yr, i);
            var vx = Load(ref xr, i);
            Store(Atan2(vy, vx), ref rr, i);
        }
        for (; i < n; i++)
            result[i] = Math.Atan2(y[i], x[i]);
    }

    /// <summary>Vector atan2 (see <see cref="Atan2(ReadOnlySpan{double}, ReadOnlySpan{double},
    /// Span{double})"/>).</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Vector<double> Atan2(Vector<double> y, Vector<double> x)
    {
        Vector<double> ax = Vector.Abs(x),
            ay = Vector.Abs(y);
        Vector<double> num = Vector.Min(ax, ay),
            den = Vector.Max(ax, ay);
        // t = num/den in [0, 1]; above 0.66 the argument is (t - 1)/(t + 1) = (num - den)/(num + den).
        // One division either way; 0/0 is taken as 0 (atan2(0, 0) = 0).
        Vector<long> big = Vector.GreaterThan(num, new Vector<double>(0.66) * den);
        Vector<double> top = Vector.ConditionalSelect(big, num - den, num),
            bottom = Vector.ConditionalSelect(big, num + den, den);
        Vector<double> u = Vector.ConditionalSelect(
            Vector.Equals(den, Vector<double>.Zero),
            Vector<double>.Zero,
            top / bottom
        );
        Vector<double> z = u * u;
        Vector<double> p =
            (
                ((new Vector<double>(P0) * z + new Vector<double>(P1)) * z + new Vector<double>(P2)) * z
                + new Vector<double>(P3)
            ) * z
            + new Vector<double>(P4);
        Vector<double> q =
            (
                (((z + new Vector<double>(Q0)) * z + new Vector<double>(Q1)) * z + new Vector<double>(Q2)) * z
                + new Vector<double>(Q3)
            ) * z
            + new Vector<double>(Q4);
        Vector<double> a = u * (z * p / q) + u;
        a += Vector.ConditionalSelect(big, new Vector<double>(Math.PI / 4 + 0.5 * MoreBits), Vector<double>.Zero);
        // Back to the octant, then the quadrant and the sign of y.
        a = Vector.ConditionalSelect(Vector.GreaterThan(ay, ax), new Vector<double>(Math.PI / 2) - a, a);
        a = Vector.ConditionalSelect(Vector.LessThan(x, Vector<double>.Zero), new Vector<double>(Math.PI) - a, a);
        a = Vector.ConditionalSelect(Vector.LessThan(y, Vector<double>.Zero), -a, a);
        // NaN in: the comparisons above are false, the division gives NaN; keep NaN out.
        return Vector.ConditionalSelect(Vector.Equals(x, x) & Vector.Equals(y, y), a, new Vector<double>(double.NaN));
    }

    /// <summary>destination[i] = source[i] widened to double (exact); the destination holds at least as many
    /// values.</summary>
    public static void Widen(ReadOnlySpan<float> source, Span<double> destination)
    {
        int w = Vector<float>.Count,
            i = 0;
        for (; i + w <= source.Length; i += w)
        {
            Vector.Widen(new Vector<float>(source.Slice(i, w)), out Vector<double> lo, out Vector<double> hi);
            lo.CopyTo(destination[i..]);
            hi.CopyTo(destination[(i + w / 2)..]);
        }
        for (; i < source.Length; i++)
            destination[i] = source[i];
    }

    /// <summary>into[2i] = a[i], into[2i + 1] = b[i] (two real streams as one interleaved complex one).</summary>
    public static void Interleave(ReadOnlySpan<double> a, ReadOnlySpan<double> b, Span<double> into)
    {
        int n = a.Length,
            i = 0;
        if (b.Length != n || into.Length < 2 * n)
            throw new ArgumentException("interleave needs two equal spans and room for both");
        if (Avx.IsSupported)
        {
            ref double ra = ref MemoryMarshal.GetReference(a),
                rb = ref MemoryMarshal.GetReference(b),
                ro = ref MemoryMarshal.GetReference(into);
            for (; i + 4 <= n; i += 4)
            {
                var va = Vector256.LoadUnsafe(ref ra, (nuint)i);
                var vb = Vector256.LoadUnsafe(ref rb, (nuint)i);
                var lo = Avx.UnpackLow(va, vb); // a0 b0 a2 b2
                var hi = Avx.UnpackHigh(va, vb); // a1 b1 a3 b3
                Avx.Permute2x128(lo, hi, 0x20).StoreUnsafe(ref ro, (nuint)(2 * i));
                Avx.Permute2x128(lo, hi, 0x31).StoreUnsafe(ref ro, (nuint)(2 * i + 4));
            }
        }
        for (; i < n; i++)
        {
            into[2 * i] = a[i];
            into[2 * i + 1] = b[i];
        }
    }

    /// <summary>result[i] = x[i] * factor (result may be x).</summary>
    public static void Scale(ReadOnlySpan<double> x, double factor, Span<double> result)
    {
        int n = x.Length,
            w = Vector<double>.Count,
            i = 0;
        if (result.Length < n)
            throw new ArgumentException("the result must hold every value");
        ref double rx = ref MemoryMarshal.GetReference(x),
            ro = ref MemoryMarshal.GetReference(result);
        var f = new Vector<double>(factor);
        for (; i + w <= n; i += w)
            Store(Load(ref rx, i) * f, ref ro, i);
        for (; i < n; i++)
            result[i] = x[i] * factor;
    }

    /// <summary>result[i] = |a[i] - b[i]|.</summary>
    public static void AbsDifference(ReadOnlySpan<double> a, ReadOnlySpan<double> b, Span<double> result)
    {
        int n = a.Length,
            w = Vector<double>.Count,
            i = 0;
        if (b.Length != n || result.Length < n)
            throw new ArgumentException("the spans must be as long as each other");
        ref double ra = ref MemoryMarshal.GetReference(a),
            rb = ref MemoryMarshal.GetReference(b),
            ro = ref MemoryMarshal.GetReference(result);
        for (; i + w <= n; i += w)
            Store(Vector.Abs(Load(ref ra, i) - Load(ref rb, i)), ref ro, i);
        for (; i < n; i++)
            result[i] = Math.Abs(a[i] - b[i]);
    }

    /// <summary>result[i] = -x[i].</summary>
    public static void Negate(ReadOnlySpan<double> x, Span<double> result)
    {
        int n = x.Length,
            w = Vector<double>.Count,
            i = 0;
        ref double rx = ref MemoryMarshal.GetReference(x),
            ro = ref MemoryMarshal.GetReference(result);
        if (result.Length < n)
            throw new ArgumentException("the result must hold every value");
        for (; i + w <= n; i += w)
            Store(-Load(ref rx, i), ref ro, i);
        for (; i < n; i++)
            result[i] = -x[i];
    }

    /// <summary>result[i] = sqrt(re[i]^2 + im[i]^2).</summary>
    /// <exception cref="ArgumentException">The spans differ in length.</exception>
    public static void Magnitude(ReadOnlySpan<double> re, ReadOnlySpan<double> im, Span<double> result)
    {
        if (re.Length != im.Length || result.Length != re.Length)
            throw new ArgumentException("re, im and result must have the same length");
        int n = re.Length,
            w = Vector<double>.Count,
            i = 0;
        ref double a = ref MemoryMarshal.GetReference(re);
        ref double b = ref MemoryMarshal.GetReference(im);
        ref double r = ref MemoryMarshal.GetReference(result);
        for (; i + w <= n; i += w)
        {
            var va = Load(ref a, i);
            var vb = Load(ref b, i);
            Store(Vector.SquareRoot(va * va + vb * vb), ref r, i);
        }
        for (; i < n; i++)
            result[i] = Math.Sqrt(re[i] * re[i] + im[i] * im[i]);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static Vector<double> Load(ref double origin, int index) =>
        Unsafe.ReadUnaligned<Vector<double>>(ref Unsafe.As<double, byte>(ref Unsafe.Add(ref origin, index)));

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    internal static void Store(Vector<double> v, ref double origin, int index) =>
        Unsafe.WriteUnaligned(ref Unsafe.As<double, byte>(ref Unsafe.Add(ref origin, index)), v);
}
