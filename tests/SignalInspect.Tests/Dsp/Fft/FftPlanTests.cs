using System.Numerics;
using MathNet.Numerics.IntegralTransforms;
using SignalInspect.Dsp;

namespace SignalInspect.Tests.Dsp;

/// <summary>The FFT against a direct DFT (the definition) and against MathNet.Numerics' FFT (a reference
/// library).</summary>
public class FftPlanTests
{
    private static (double[] Re, double[] Im) RandomSignal(int n, int seed)
    {
        var rng = new Random(seed);
        return (
            [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble() * 2 - 1)],
            [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble() * 2 - 1)]
        );
    }

    private static Complex[] DirectDft(double[] re, double[] im)
    {
        int n = re.Length;
        var x = new Complex[n];
        for (int k = 0; k < n; k++)
        {
            Complex s = 0;
            for (int t = 0; t < n; t++)
            {
                double a = -2 * Math.PI * ((long)t * k % n) / n;
                s += new Complex(re[t], im[t]) * new Complex(Math.Cos(a), Math.Sin(a));
            }
            x[k] = s;
        }
        return x;
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(4)]
    [InlineData(5)]
    [InlineData(7)]
    [InlineData(8)]
    [InlineData(16)]
    [InlineData(17)]
    [InlineData(64)]
    [InlineData(100)]
    [InlineData(127)]
    [InlineData(200)]
    [InlineData(255)]
    [InlineData(256)]
    [InlineData(1000)]
    [InlineData(1024)]
    public void Matches_the_direct_DFT(int n)
    {
        var (re, im) = RandomSignal(n, n);
        Complex[] want = DirectDft(re, im);
        double[] r = (double[])re.Clone(),
            i = (double[])im.Clone();
        new FftPlan(n).Forward(r, i);
        double scale = Math.Sqrt(n);
        for (int k = 0; k < n; k++)
        {
            Assert.True(Math.Abs(want[k].Real - r[k]) < 1e-11 * scale * Math.Log2(n + 1) + 1e-12, $"N={n} bin {k} re");
            Assert.True(
                Math.Abs(want[k].Imaginary - i[k]) < 1e-11 * scale * Math.Log2(n + 1) + 1e-12,
                $"N={n} bin {k} im"
            );
        }
    }

    [Theory]
    [InlineData(4096)]
    [InlineData(65536)]
    [InlineData(3000)]
    [InlineData(48000)]
    public void Matches_MathNet_on_large_sizes(int n)
    {
        var (re, im) = RandomSignal(n, 7);
        var mathnet = re.Zip(im, (a, b) => new Complex(a, b)).ToArray();
        Fourier.Forward(mathnet, FourierOptions.Matlab); // negative exponent, no scaling: the same definition
        new FftPlan(n).Forward(re, im);
        double worst = 0,
            peak = 0;
        for (int k = 0; k < n; k++)
        {
            worst = Math.Max(worst, (mathnet[k] - new Complex(re[k], im[k])).Magnitude);
            peak = Math.Max(peak, mathnet[k].Magnitude);
        }
        // MathNet's own Bluestein path is the less accurate of the two at 48000 points (measured: 8e-9
        // from the direct DFT against 2e-12 for this plan), so the bound is MathNet's error, not ours.
        Assert.True(worst < 1e-10 * peak, $"largest difference {worst}, largest bin {peak}");
    }

    [Fact]
    public void Bluestein_size_matches_the_direct_DFT_at_sampled_bins()
    {
        const int n = 48000;
        var (re, im) = RandomSignal(n, 7);
        double[] r = (double[])re.Clone(),
            i = (double[])im.Clone();
        new FftPlan(n).Forward(r, i);
        foreach (int k in new[] { 0, 1, 777, 12345, 24000, 47999 })
        {
            Complex s = 0;
            for (int t = 0; t < n; t++)
            {
                double a = -2 * Math.PI * ((long)t * k % n) / n;
                s += new Complex(re[t], im[t]) * new Complex(Math.Cos(a), Math.Sin(a));
            }
            Assert.True((s - new Complex(r[k], i[k])).Magnitude < 1e-10, $"bin {k}");
        }
    }

    [Theory]
    [InlineData(8)]
    [InlineData(1024)]
    [InlineData(300)]
    public void Inverse_undoes_forward(int n)
    {
        var (re, im) = RandomSignal(n, 3);
        double[] r = (double[])re.Clone(),
            i = (double[])im.Clone();
        var plan = new FftPlan(n);
        plan.Forward(r, i);
        plan.Inverse(r, i);
        for (int k = 0; k < n; k++)
        {
            Near.Equal(re[k], r[k], 1e-12);
            Near.Equal(im[k], i[k], 1e-12);
        }
    }

    [Fact]
    public void Parseval_holds()
    {
        var (re, im) = RandomSignal(2048, 11);
        double time = re.Zip(im, (a, b) => a * a + b * b).Sum();
        new FftPlan(2048).Forward(re, im);
        double freq = re.Zip(im, (a, b) => a * a + b * b).Sum() / 2048;
        Near.Equal(time, freq, 1e-9 * time);
    }

    [Fact]
    public void Rejects_wrong_lengths_and_sizes()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new FftPlan(0));
        Assert.Throws<ArgumentException>(() => new FftPlan(8).Forward(new double[4], new double[8]));
    }

    [Theory]
    [InlineData(4, true)]
    [InlineData(8, true)]
    [InlineData(16, false)]
    [InlineData(32, true)]
    [InlineData(64, true)]
    [InlineData(128, false)]
    [InlineData(256, true)]
    [InlineData(2048, true)]
    [InlineData(4096, true)]
    [InlineData(4096, false)]
    [InlineData(16384, true)]
    public void Windowed_transforms_match_the_direct_DFT_in_natural_and_scrambled_order(int n, bool complex)
    {
        var (a, b) = RandomSignal(n, 11 * n);
        var samples = new double[complex ? 2 * n : n];
        for (int i = 0; i < n; i++)
        {
            if (complex)
            {
                samples[2 * i] = a[i];
                samples[2 * i + 1] = b[i];
            }
            else
                samples[i] = a[i];
        }
        double[] w = [.. Window.Create(WindowKind.Hann, n).Coefficients];
        double[] xr = [.. Enumerable.Range(0, n).Select(i => a[i] * w[i])],
            xi = [.. Enumerable.Range(0, n).Select(i => complex ? b[i] * w[i] : 0)];
        Complex[] want = n <= 4096 ? DirectDft(xr, xi) : Reference(xr, xi);
        var plan = new FftPlan(n);
        double[] re = new double[n],
            im = new double[n],
            sr = new double[n],
            si = new double[n];
        double c1 = plan.ForwardWindowed(samples, complex, w, re, im);
        double c2 = plan.ForwardWindowedScrambled(samples, complex, w, sr, si);
        Assert.Equal(xr.Sum() + xi.Sum(), c1, 9);
        Assert.Equal(c1, c2, 9);
        double scale = Math.Sqrt(n);
        for (int k = 0; k < n; k++)
        {
            int at = plan.ScrambledIndex(k);
            Assert.True(
                Math.Abs(re[k] - want[k].Real) < 1e-12 * scale && Math.Abs(im[k] - want[k].Imaginary) < 1e-12 * scale,
                $"natural bin {k}"
            );
            Assert.True(
                Math.Abs(sr[at] - want[k].Real) < 1e-12 * scale && Math.Abs(si[at] - want[k].Imaginary) < 1e-12 * scale,
                $"scrambled bin {k}"
            );
        }
    }

    [Theory]
    [InlineData(16, true, false)]
    [InlineData(64, false, true)]
    [InlineData(4096, true, true)]
    [InlineData(8192, true, false)]
    public void Power_sums_in_scrambled_order_equal_the_squared_magnitudes_of_the_transform(
        int n,
        bool complex,
        bool rowMax
    )
    {
        var plan = new FftPlan(n);
        double[] w = [.. Window.Create(WindowKind.Hann, n).Coefficients];
        double[] sum = new double[n],
            max = new double[n],
            row = new double[n],
            re = new double[n],
            im = new double[n];
        double[] wantSum = new double[n],
            wantMax = new double[n],
            wantRow = new double[n];
        for (int seg = 0; seg < 3; seg++)
        {
            var (a, b) = RandomSignal(n, 100 * n + seg);
            double[] samples = complex ? [.. a.Zip(b).SelectMany(p => new[] { p.First, p.Second })] : a;
            double check = plan.ForwardPowerScrambled(samples, complex, w, re, im, sum, max, row, rowMax);
            Assert.True(double.IsFinite(check));
            var (xr, xi) = (new double[n], new double[n]);
            plan.ForwardWindowed(samples, complex, w, xr, xi);
            for (int k = 0; k < n; k++)
            {
                double p = xr[k] * xr[k] + xi[k] * xi[k];
                wantSum[k] += p;
                wantMax[k] = Math.Max(wantMax[k], p);
                wantRow[k] = rowMax ? Math.Max(wantRow[k], p) : wantRow[k] + p;
            }
        }
        for (int k = 0; k < n; k++)
        {
            int at = plan.ScrambledIndex(k);
            Assert.Equal(wantSum[k], sum[at], 1e-9 * n);
            Assert.Equal(wantMax[k], max[at], 1e-9 * n);
            Assert.Equal(wantRow[k], row[at], 1e-9 * n);
        }
        // A segment with NaN adds nothing.
        var bad = new double[complex ? 2 * n : n];
        bad[3] = double.NaN;
        double[] before = [.. sum];
        Assert.False(double.IsFinite(plan.ForwardPowerScrambled(bad, complex, w, re, im, sum, max, row, rowMax)));
        Assert.Equal(before, sum);
    }

    /// <summary>MathNet.Numerics' FFT (the reference library) where a direct DFT would be slow.</summary>
    [WideVectorTheory]
    [InlineData(16)]
    [InlineData(32)]
    [InlineData(64)]
    [InlineData(4096)]
    [InlineData(65536)]
    public void The_512_bit_passes_give_the_256_bit_results_bit_for_bit(int n)
    {
        // Where the CPU has no AVX-512 both plans are narrow and this compares a path with itself.
        var rng = new Random(n);
        double[] x = [.. Enumerable.Range(0, 3 * n).Select(_ => rng.NextDouble() - 0.5)];
        double[] w = [.. Enumerable.Range(0, n).Select(i => 0.5 - 0.5 * Math.Cos(2 * Math.PI * i / n))];
        (double[], double[]) Run(bool narrow) => VectorWidth.Run(narrow, () =>
            {
                var plan = new FftPlan(n);
                double[] re = new double[n],
                    im = new double[n];
                plan.ForwardWindowedScrambled(x, complex: true, w, re, im);
                return (re, im);
            });
        var (wr, wi) = Run(false);
        var (nr, ni) = Run(true);
        Assert.Equal(nr, wr);
        Assert.Equal(ni, wi);
        // The Welch inner step from single-precision samples (a cf32 capture as stored): its own
        // loads and widening in the first pass, then the power sums.
        float[] xf = [.. x.Select(v => (float)v)];
        (double[], double[]) Powers(bool narrow) => VectorWidth.Run(narrow, () =>
            {
                var plan = new FftPlan(n);
                double[] re = new double[n],
                    im = new double[n],
                    sum = new double[n],
                    max = new double[n];
                plan.ForwardPowerScrambled(xf, complex: true, w, re, im, sum, max, default, rowMax: false);
                plan.ForwardPowerScrambled(xf.AsSpan(n), complex: true, w, re, im, sum, max, default, rowMax: false);
                return (sum, max);
            });
        var (ws, wm) = Powers(false);
        var (ns, nm) = Powers(true);
        Assert.Equal(ns, ws);
        Assert.Equal(nm, wm);
    }

    [Theory]
    [InlineData(16)]
    [InlineData(64)]
    [InlineData(2048)]
    [InlineData(65536)]
    public void A_pair_read_out_of_two_rings_is_the_transform_of_the_interleaved_segments(int n)
    {
        // Reference: MathNet.Numerics' FFT of z = w (a + i b), each segment taken out of its ring
        // from its start (a multiple of N / 4) and wrapping around, within 1e-9 of the largest bin;
        // and the interleaved transform of the same segments, bit for bit (the same products and sums).
        var rng = new Random(n + 7);
        double[] ringA = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble() - 0.5)];
        double[] ringB = [.. Enumerable.Range(0, n).Select(_ => 3 + rng.NextDouble())];
        double[] w = HannOf(n);
        var plan = new FftPlan(n);
        foreach (int sa in new[] { 0, n / 4, n / 2, 3 * n / 4 })
            foreach (int sb in new[] { 0, n / 2 })
            {
                double[] z = new double[2 * n];
                for (int i = 0; i < n; i++)
                {
                    z[2 * i] = ringA[(sa + i) % n];
                    z[2 * i + 1] = ringB[(sb + i) % n];
                }
                double[] re1 = new double[n],
                    im1 = new double[n],
                    re2 = new double[n],
                    im2 = new double[n];
                double c1 = plan.ForwardWindowedScrambled(z, complex: true, w, re1, im1);
                double c2 = plan.ForwardWindowedScrambledPair(ringA, sa, ringB, sb, w, re2, im2);
                Assert.Equal(re1, re2);
                Assert.Equal(im1, im2);
                Assert.Equal(c1, c2);
                Complex[] r = Reference(
                    [.. Enumerable.Range(0, n).Select(i => z[2 * i] * w[i])],
                    [.. Enumerable.Range(0, n).Select(i => z[2 * i + 1] * w[i])]
                );
                double top = r.Max(v => v.Magnitude);
                for (int k = 0; k < n; k += Math.Max(1, n / 512))
                {
                    int at = plan.ScrambledIndex(k);
                    Assert.Equal(r[k].Real, re2[at], 1e-9 * top);
                    Assert.Equal(r[k].Imaginary, im2[at], 1e-9 * top);
                }
            }
    }

    [Fact]
    public void A_pair_with_a_non_finite_value_or_a_start_off_the_quarters_is_refused()
    {
        const int n = 64;
        double[] a = new double[n],
            b = new double[n],
            w = HannOf(n),
            re = new double[n],
            im = new double[n];
        var plan = new FftPlan(n);
        b[5] = double.NaN;
        Assert.False(double.IsFinite(plan.ForwardWindowedScrambledPair(a, 0, b, n / 2, w, re, im)));
        Assert.Throws<ArgumentException>(() => plan.ForwardWindowedScrambledPair(a, 3, b, 0, w, re, im));
        Assert.Throws<ArgumentException>(() => plan.ForwardWindowedScrambledPair(a, n, b, 0, w, re, im));
        Assert.Throws<ArgumentException>(() => plan.ForwardWindowedScrambledPair(a.AsSpan(1), 0, b, 0, w, re, im));
    }

    /// <summary>Welch powers of one float segment: the single-precision step, or (<paramref name="single"/> false) the
    /// double one on the same floats widened.</summary>
    private static (double[] Sum, double[] Max, double Check) PowersOf(FftPlan plan, float[] x, double[] w, bool single)
    {
        int n = plan.Size;
        double[] re = new double[n],
            im = new double[n],
            sum = new double[n],
            max = new double[n];
        float[] wf = [.. w.Select(v => (float)v)];
        double check = single
            ? plan.ForwardPowerScrambledSingle(x, wf, w, re, im, sum, max, default, rowMax: false)
            : plan.ForwardPowerScrambled(x, complex: true, w, re, im, sum, max, default, rowMax: false);
        return (sum, max, check);
    }

    private static double[] HannOf(int n) =>
        [.. Enumerable.Range(0, n).Select(i => 0.5 - 0.5 * Math.Cos(2 * Math.PI * i / n))];

    [Avx2Theory]
    [InlineData(64)]
    [InlineData(2048)]
    [InlineData(4096)]
    [InlineData(8192)]
    public void The_single_precision_Welch_step_is_the_transform_to_float_rounding(int n)
    {
        // Reference: MathNet.Numerics' FFT in double of the same windowed samples. Bound: Higham,
        // "Accuracy and Stability of Numerical Algorithms" (2nd ed., SIAM 2002), Theorem 24.2 (quoted
        // from memory): for a radix-2 FFT of n = 2^t points, ||y - fl(y)||_2 / ||y||_2 <= t eta / (1 - t eta),
        // eta = mu + gamma_4 (sqrt 2 + mu), with unit roundoff u and mu the twiddles' error (u here:
        // rounded to float); gamma_4 = 4u / (1 - 4u). One u more for the window product in float.
        // Checked on the magnitudes, whose differences are no larger than those of the values.
        var rng = new Random(n + 1);
        float[] x = new float[2 * n];
        for (int i = 0; i < n; i++)
        {
            double a = 2 * Math.PI * 0.1234 * i;
            x[2 * i] = (float)(0.7 * Math.Cos(a) + 0.01 * (rng.NextDouble() - 0.5));
            x[2 * i + 1] = (float)(0.7 * Math.Sin(a) + 0.01 * (rng.NextDouble() - 0.5));
        }
        double[] w = HannOf(n);
        var plan = new FftPlan(n);
        Assert.True(plan.CanSingle);
        var (sum, max, check) = PowersOf(plan, x, w, single: true);
        Assert.True(double.IsFinite(check));
        Complex[] r = Reference(
            [.. Enumerable.Range(0, n).Select(i => x[2 * i] * w[i])],
            [.. Enumerable.Range(0, n).Select(i => x[2 * i + 1] * w[i])]
        );
        double u = Math.Pow(2, -24),
            t = Math.Log2(n),
            eta = u + 4 * u / (1 - 4 * u) * (Math.Sqrt(2) + u) + u;
        double norm = Math.Sqrt(r.Sum(c => c.Magnitude * c.Magnitude)),
            error = 0;
        for (int k = 0; k < n; k++)
        {
            int at = plan.ScrambledIndex(k);
            error += Math.Pow(Math.Sqrt(sum[at]) - r[k].Magnitude, 2);
            Assert.Equal(sum[at], max[at]);
        }
        double relative = Math.Sqrt(error) / norm,
            allowed = t * eta / (1 - t * eta);
        Assert.True(relative <= allowed, $"relative 2-norm error {relative:g3}, bound {allowed:g3}");
        Assert.True(relative > 0.01 * u, "float arithmetic rounds: the error should not vanish");
    }

    [Avx2Fact]
    public void The_single_precision_step_keeps_a_tone_120_dB_below_a_full_scale_one()
    {
        // Dynamic range: a tone at -120 dBc beside a full-scale one, both on bin centres, read
        // within 0.1 dB of MathNet's double-precision transform of the same float samples.
        const int n = 4096,
            strong = 100,
            weak = 1500;
        float[] x = new float[2 * n];
        for (int i = 0; i < n; i++)
        {
            double a = 2 * Math.PI * strong * i / n,
                b = 2 * Math.PI * weak * i / n;
            x[2 * i] = (float)(Math.Cos(a) + 1e-6 * Math.Cos(b));
            x[2 * i + 1] = (float)(Math.Sin(a) + 1e-6 * Math.Sin(b));
        }
        double[] w = HannOf(n);
        var plan = new FftPlan(n);
        Assert.True(plan.CanSingle);
        var (sum, _, _) = PowersOf(plan, x, w, single: true);
        Complex[] r = Reference(
            [.. Enumerable.Range(0, n).Select(i => x[2 * i] * w[i])],
            [.. Enumerable.Range(0, n).Select(i => x[2 * i + 1] * w[i])]
        );
        double pw = r[weak].Magnitude * r[weak].Magnitude,
            ps = r[strong].Magnitude * r[strong].Magnitude;
        Near.Equal(-120, 10 * Math.Log10(pw / ps), 0.2, "the reference sees the weak tone at -120 dBc (float samples)");
        Near.Equal(10 * Math.Log10(pw), 10 * Math.Log10(sum[plan.ScrambledIndex(weak)]), 0.1, "weak tone, dB");
        Near.Equal(10 * Math.Log10(ps), 10 * Math.Log10(sum[plan.ScrambledIndex(strong)]), 1e-5, "strong tone, dB");
    }

    [WideVectorTheory]
    [InlineData(64)]
    [InlineData(2048)]
    [InlineData(4096)]
    public void The_single_precision_step_gives_the_same_bits_on_512_and_256_bit_vectors(int n)
    {
        var rng = new Random(n + 2);
        float[] x = [.. Enumerable.Range(0, 2 * n).Select(_ => (float)(rng.NextDouble() - 0.5))];
        double[] w = HannOf(n);
        (double[], double[], double) Run(bool narrow) => VectorWidth.Run(narrow, () =>
            {
                var plan = new FftPlan(n);
                Assert.True(plan.CanSingle);
                return PowersOf(plan, x, w, single: true);
            });
        var (ws, wm, wc) = Run(false);
        var (ns, nm, nc) = Run(true);
        Assert.Equal(ns, ws);
        Assert.Equal(nm, wm);
        Assert.Equal(nc, wc);
    }

    [Avx2Fact]
    public void Samples_the_float_transform_cannot_hold_go_through_the_double_one()
    {
        // Values whose transform could come near float's maximum (here the bound on it, the sum of
        // |I| + |Q| windowed, lies within a factor of 4 of it): the segment is transformed in double
        // instead, exactly as the double step does it. NaN: nothing added, not finite.
        const int n = 256;
        var rng = new Random(3);
        float[] huge = [.. Enumerable.Range(0, 2 * n).Select(_ => (float)((rng.NextDouble() - 0.5) * 2.3e36))];
        double[] w = HannOf(n);
        double bound = Enumerable.Range(0, n).Sum(i => (Math.Abs(huge[2 * i]) + Math.Abs(huge[2 * i + 1])) * w[i]);
        Assert.InRange(bound, float.MaxValue / 4.0, float.MaxValue);
        var plan = new FftPlan(n);
        Assert.True(plan.CanSingle);
        var (s1, m1, c1) = PowersOf(plan, huge, w, single: true);
        var (s2, m2, c2) = PowersOf(plan, huge, w, single: false);
        Assert.Equal(s2, s1);
        Assert.Equal(m2, m1);
        Assert.Equal(c2, c1);
        Assert.True(s1.All(double.IsFinite));
        float[] bad = new float[2 * n];
        bad[77] = float.NaN;
        var (s3, _, c3) = PowersOf(plan, bad, w, single: true);
        Assert.False(double.IsFinite(c3));
        Assert.All(s3, v => Assert.Equal(0.0, v));
    }

    private static Complex[] Reference(double[] re, double[] im)
    {
        var c = re.Select((r, i) => new Complex(r, im[i])).ToArray();
        Fourier.Forward(c, FourierOptions.Matlab);
        return c;
    }
}
