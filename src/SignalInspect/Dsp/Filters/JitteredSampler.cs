using System.Numerics;
using System.Runtime.CompilerServices;

namespace SignalInspect.Dsp;

/// <summary>
/// Band-limited interpolation at one pseudo-random instant in each sample interval, for peak
/// statistics: a 64-phase polyphase Kaiser-windowed sinc (16 taps per phase) evaluated, for input
/// n, at the phase a hash of n / 4 picks (see <see cref="PhaseOf"/>). A tone locked to the sample rate (6 samples a
/// period can read 13 % low) is then seen at instants spread uniformly over its period, so its percentiles are
/// those of the continuous signal; stationary noise is unchanged. One value per input rather than
/// L values per input of a fixed-factor interpolator: the same distribution at a fraction of the
/// histogram work. The phase depends only on the sample's index, so the values do not depend on
/// how the stream is cut into blocks or chunks. The first 17 inputs fill the history.
/// </summary>
public sealed class JitteredSampler
{
    /// <summary>Phases of the polyphase bank (the time grid within a sample interval).</summary>
    public const int Phases = 64;

    private const int Taps = 17;
    private readonly double[] _coef; // phase-major, each phase reversed (window oldest first)
    private double[] _buf; // Taps - 1 history samples, then the block

    /// <summary>Creates the sampler.</summary>
    public JitteredSampler()
    {
        int total = (Taps - 1) * Phases + 1;
        var h = new double[total];
        double beta = Kaiser.Beta(80);
        double i0b = Kaiser.Peak(beta);
        int mid = (total - 1) / 2;
        for (int n = 0; n < total; n++)
        {
            double k = (n - mid) / (double)Phases;
            double sinc = k == 0 ? 1 : Math.Sin(Math.PI * k) / (Math.PI * k);
            double r = 2.0 * n / (total - 1) - 1;
            h[n] = sinc * Kaiser.Taper(beta, r * r) / i0b;
        }
        _coef = new double[Phases * Taps];
        for (int j = 0; j < Phases; j++)
            for (int k = 0; k < Taps; k++)
            {
                int idx = k * Phases + j;
                _coef[j * Taps + Taps - 1 - k] = idx < total ? h[idx] : 0;
            }
        _buf = new double[Taps - 1 + 4096];
    }

    /// <summary>Inputs needed before the outputs are valid.</summary>
    public static int WarmUp => Taps;

    /// <summary>Starts again with zero history, as if constructed.</summary>
    public void Reset() => Array.Clear(_buf);

    /// <summary>
    /// The phase (0 to <see cref="Phases"/> - 1) used for input sample <paramref name="index"/>:
    /// SplitMix64's finaliser of index / 4. Four consecutive samples (aligned on the stream) share a
    /// phase, so that they are computed as one vector; the groups' phases are independent.
    /// </summary>
    public static int PhaseOf(long index)
    {
        ulong z = (ulong)(index >> 2) + 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        z ^= z >> 31;
        return (int)(z >> 58);
    }

    /// <summary>
    /// Takes a block of inputs whose first is stream sample <paramref name="firstIndex"/>; output i
    /// is the interpolated value at PhaseOf(firstIndex + i) / 64 of the interval that ends 8
    /// samples before input i.
    /// </summary>
    public void Process(ReadOnlySpan<double> x, long firstIndex, Span<double> output)
    {
        int n = x.Length,
            hist = Taps - 1;
        if (_buf.Length < hist + n)
            Array.Resize(ref _buf, hist + n);
        x.CopyTo(_buf.AsSpan(hist));
        ref double b = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_buf);
        ref double c = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_coef);
        ref double o = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(output);
        int i = 0;
        if (Vector<double>.Count == 4)
        {
            // Scalar up to the first group of four on the stream's grid, then whole groups as vectors.
            int head = (int)Math.Min(n, (4 - (firstIndex & 3)) & 3);
            Scalar(ref b, ref c, output, firstIndex, 0, head);
            for (i = head; i + 4 <= n; i += 4)
            {
                ref double h = ref Unsafe.Add(ref c, PhaseOf(firstIndex + i) * Taps);
                Vector<double> a0 = default,
                    a1 = default;
                int k = 0;
                for (; k + 1 < Taps; k += 2)
                {
                    a0 = Vector.FusedMultiplyAdd(
                        new Vector<double>(Unsafe.Add(ref h, k)),
                        VectorMath.Load(ref b, i + k),
                        a0
                    );
                    a1 = Vector.FusedMultiplyAdd(
                        new Vector<double>(Unsafe.Add(ref h, k + 1)),
                        VectorMath.Load(ref b, i + k + 1),
                        a1
                    );
                }
                a0 = Vector.FusedMultiplyAdd(
                    new Vector<double>(Unsafe.Add(ref h, k)),
                    VectorMath.Load(ref b, i + k),
                    a0
                );
                VectorMath.Store(a0 + a1, ref o, i);
            }
        }
        Scalar(ref b, ref c, output, firstIndex, i, n);
        _buf.AsSpan(n, hist).CopyTo(_buf);
    }

    /// <summary>The same sums as the vector path, lane by lane (even taps, odd taps, fused multiply-adds in the same
    /// order), so the values do not depend on the blocks.</summary>
    private static void Scalar(ref double b, ref double c, Span<double> output, long firstIndex, int from, int to)
    {
        for (int i = from; i < to; i++)
        {
            ref double h = ref Unsafe.Add(ref c, PhaseOf(firstIndex + i) * Taps);
            ref double w = ref Unsafe.Add(ref b, i);
            double a0 = 0,
                a1 = 0;
            int k = 0;
            for (; k + 1 < Taps; k += 2)
            {
                a0 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k), Unsafe.Add(ref w, k), a0);
                a1 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k + 1), Unsafe.Add(ref w, k + 1), a1);
            }
            a0 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k), Unsafe.Add(ref w, k), a0);
            output[i] = a0 + a1;
        }
    }
}
