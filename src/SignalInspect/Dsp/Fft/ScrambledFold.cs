using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

namespace SignalInspect.Dsp;

/// <summary>
/// The scrambled transform's order, folded: where an accumulator of the powers of real segments
/// (the line spectra of the Spectrum stage) keeps its sums: in the order the scrambled transform leaves its bins,
/// folded, so that adding a transform reads it front to back and writes the sums in order. The bins k = i N/16
/// (i = 0 .. 8) lie in the transform's first 16 places and are kept in slots 0 .. 7 and N/2. Every
/// later block of places [h, 2h) (h = 16, 32 .. N/2) holds pairs of bins k and N - k at places
/// h + r and 2h - 1 - r (r &lt; h/2; bit reversal maps N - k to the complement of k's place within
/// its block, and the transposed last pass only permutes the low four bits), kept in slot h/2 + r.
/// A place in those blocks holds a bin below N/2 when its bit <see cref="LowHalfBit"/> is clear.
/// </summary>
internal sealed class ScrambledFold
{
    private static readonly System.Collections.Concurrent.ConcurrentDictionary<int, ScrambledFold> Made = new();

    /// <summary>Slot of bin k (0 .. N/2).</summary>
    public readonly int[] SlotOf;

    /// <summary>Places of the bins i N/16 and N - i N/16, i = 0 .. 8.</summary>
    public readonly int[] HeadPlace = new int[9],
        HeadMirror = new int[9];
    public readonly int LowHalfBit;

    private readonly int _n;

    private ScrambledFold(int n)
    {
        _n = n;
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

    public static ScrambledFold For(int n)
    {
        if (n < 16 || (n & (n - 1)) != 0)
            throw new ArgumentOutOfRangeException(nameof(n), n, "line spectra need a power-of-two size from 16");
        return Made.GetOrAdd(n, static n => new ScrambledFold(n));
    }

    /// <summary>
    /// Adds to <paramref name="sumA"/> and <paramref name="sumB"/> (in slot order) the powers of two real
    /// streams transformed together as one complex segment (a + i b), from the scrambled transform in
    /// <paramref name="transformRe"/>, <paramref name="transformIm"/>: A[k] = (Z[k] + conj Z[N - k]) / 2,
    /// B[k] = (Z[k] - conj Z[N - k]) / 2i.
    /// </summary>
    public void AddPairPowers(double[] transformRe, double[] transformIm, double[] sumA, double[] sumB)
    {
        int n = _n;
        ref double re = ref MemoryMarshal.GetArrayDataReference(transformRe),
            im = ref MemoryMarshal.GetArrayDataReference(transformIm);
        ScrambledFold f = this;
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
}
