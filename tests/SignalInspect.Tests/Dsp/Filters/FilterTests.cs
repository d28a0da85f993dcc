using System.Numerics;
using SignalInspect.Dsp;

namespace SignalInspect.Tests.Dsp;

/// <summary>
/// The block filters against the definitions they implement, written out naively here: the
/// convolution sum y[n] = sum_k h[k] x[n - k] (zero before the first sample), the shift
/// x[n] exp(2 pi i f n / fs), and keeping every M-th output. Block sizes vary so that state
/// carried between calls is exercised.
/// </summary>
public class FilterTests
{
    private static double[] Convolve(double[] h, double[] x)
    {
        var y = new double[x.Length];
        for (int n = 0; n < x.Length; n++)
        {
            double s = 0;
            for (int k = 0; k < h.Length && k <= n; k++)
                s += h[k] * x[n - k];
            y[n] = s;
        }
        return y;
    }

    [Theory]
    [InlineData(3)]
    [InlineData(17)]
    [InlineData(63)]
    [InlineData(64)]
    [InlineData(163)]
    [InlineData(1023)]
    public void Block_FIR_equals_the_convolution_sum_directly_and_by_fast_convolution(int taps)
    {
        var rng = new Random(taps);
        double[] h = [.. Enumerable.Range(0, taps).Select(_ => rng.NextDouble() - 0.5)];
        double[] x = [.. Enumerable.Range(0, 20_000).Select(_ => rng.NextDouble() - 0.5)];
        double[] want = Convolve(h, x);
        var fir = new BlockFir(h);
        var got = new double[x.Length];
        int at = 0;
        foreach (int size in new[] { 1, 7, 100, 3000, 5, 9000, 1 })
        {
            int len = Math.Min(size, x.Length - at);
            fir.Process(x.AsSpan(at, len), got.AsSpan(at, len));
            at += len;
        }
        fir.Process(x.AsSpan(at), got.AsSpan(at));
        double scale = Math.Sqrt(taps);
        for (int i = 0; i < x.Length; i++)
            Assert.True(Math.Abs(got[i] - want[i]) < 1e-12 * scale, $"sample {i}: {got[i]} vs {want[i]}");
    }

    [Fact]
    public void Block_FIR_spreads_a_NaN_as_the_convolution_sum_does()
    {
        // NaN * h[k] is NaN: every output whose window holds the NaN is NaN, the ones before it are not.
        var rng = new Random(5);
        double[] h = [.. Enumerable.Range(0, 300).Select(_ => rng.NextDouble() - 0.5)];
        double[] x = [.. Enumerable.Range(0, 6000).Select(_ => rng.NextDouble() - 0.5)];
        x[2500] = double.NaN;
        double[] want = Convolve(h, x);
        var got = new double[x.Length];
        new BlockFir(h).Process(x, got);
        for (int i = 0; i < 2500; i++)
            Assert.True(Math.Abs(got[i] - want[i]) < 1e-12 * Math.Sqrt(300), $"sample {i}");
        for (int i = 2500; i < 2800; i++)
            Assert.True(double.IsNaN(got[i]), $"sample {i} should be NaN");
    }

    [Fact]
    public void Block_FIR_filters_in_place()
    {
        var rng = new Random(2);
        double[] h = [.. Enumerable.Range(0, 200).Select(_ => rng.NextDouble())];
        double[] x = [.. Enumerable.Range(0, 5000).Select(_ => rng.NextDouble())];
        double[] want = Convolve(h, x);
        var buf = (double[])x.Clone();
        new BlockFir(h).Process(buf, buf);
        for (int i = 0; i < x.Length; i++)
            Assert.Equal(want[i], buf[i], 9);
    }

    [Theory]
    [InlineData(true, 6, 207, false, false)]
    [InlineData(true, 1, 31, false, false)]
    [InlineData(false, 5, 101, false, false)]
    [InlineData(true, 6, 207, true, false)]
    [InlineData(true, 7, 1647, true, false)]
    [InlineData(true, 6, 105, false, true)]
    [InlineData(true, 6, 105, true, true)]
    [InlineData(false, 4, 61, false, true)]
    [InlineData(true, 2, 31, false, true)]
    [InlineData(true, 10, 201, true, true)]
    public void Channel_decimator_equals_shift_filter_and_decimate_in_double(
        bool complex,
        int decimation,
        int taps,
        bool narrow,
        bool twoStage
    )
    {
        // narrow: the 256-bit filter sums even where 512-bit ones are available (both paths are checked here).
        // twoStage: the reference does each step on its own in double: shift, the half-band convolution,
        // every other output (those at odd input samples), the second convolution, one in M / 2.
        VectorWidth.Run(narrow, () =>
            DecimatorAgainstDouble(complex, decimation, taps, twoStage ? FirDesign.HalfBand(160e3, 2.4e6, 80) : null)
        );
    }

    [Theory]
    [InlineData(160e3, 2.4e6)]
    [InlineData(142.5e3, 2.4e6)]
    [InlineData(10e3, 48e3)]
    [InlineData(0.2, 1.0)]
    public void Half_band_filter_meets_its_specification(double edge, double fs)
    {
        // Half-band filters (e.g. Vaidyanathan, "Multirate Systems and Filter Banks", 1993, sec. 4.6.1;
        // quoted from memory): every other tap zero, centre 1/2, so H(f) + H(fs/2 - f) = 1. The response
        // by the DTFT (the definition): within 1e-4 (80 dB ripple, Kaiser's design) of 1 over
        // [0, edge] and at least 80 dB down over [fs/2 - edge, fs/2]; DC gain 1.
        double[] h = FirDesign.HalfBand(edge, fs, 80);
        int n = h.Length,
            c = (n - 1) / 2;
        Assert.Equal(3, n % 4);
        Assert.Equal(0.5, h[c]);
        for (int k = 0; k < n; k++)
        {
            Assert.Equal(h[k], h[n - 1 - k]);
            if (k != c && (k - c) % 2 == 0)
                Assert.Equal(0.0, h[k]);
        }
        Assert.NotEqual(0.0, h[0]);
        Near.Equal(1, h.Sum(), 1e-12, "DC gain");
        double Gain(double f)
        {
            Complex sum = 0;
            for (int k = 0; k < n; k++)
                sum += h[k] * Complex.Exp(new Complex(0, -2 * Math.PI * f / fs * (k - c)));
            return sum.Magnitude;
        }
        for (int i = 0; i <= 200; i++)
        {
            double f = edge * i / 200;
            Assert.True(Math.Abs(Gain(f) - 1) <= 1e-4, $"pass band at {f}: {Gain(f)}");
            double g = fs / 2 - edge + edge * i / 200;
            Assert.True(20 * Math.Log10(Gain(g)) <= -80, $"stop band at {g}: {20 * Math.Log10(Gain(g)):0.0} dB");
        }
    }

    [Fact]
    public void Two_stage_channel_decimator_outputs_do_not_depend_on_the_block_sizes_nor_the_vector_width()
    {
        // An output is the same sum whether eight, four or one were computed at a time, and a
        // restart (Reset) gives the outputs of a fresh plan.
        var rng = new Random(13);
        double[] hb = FirDesign.HalfBand(142.5e3, 2.4e6, 80),
            h = FirDesign.LowPass(118e3, 1.2e6, 47e3, 80, 4095);
        double[] input = [.. Enumerable.Range(0, 2 * 30_000).Select(_ => rng.NextDouble() * 2 - 1)];
        (double[] Re, double[] Im) Run(int[] sizes, bool narrow, bool reset) => VectorWidth.Run(narrow, () =>
            {
                var dec = new ChannelDecimator(h, 6, -12_345.6, 2.4e6, true, hb);
                if (reset)
                {
                    dec.Process(input.AsSpan(0, 2 * 777), new double[200], new double[200]);
                    dec.Reset();
                }
                return InPieces(dec, input, sizes);
            });
        var whole = Run([30_000], false, false);
        Assert.Equal(5000, whole.Re.Length);
        foreach (
            var other in new[]
            {
                Run([7, 13, 1, 5000, 11, 24_968], false, false),
                Run([3, 1024, 1, 2047, 26_925], true, false),
                Run([30_000], true, true),
            }
        )
        {
            Assert.Equal(whole.Re, other.Re);
            Assert.Equal(whole.Im, other.Im);
        }
    }

    /// <summary>The outputs of complex <paramref name="input"/> fed in pieces of the given sizes (the last runs to the
    /// end).</summary>
    private static (double[] Re, double[] Im) InPieces(ChannelDecimator dec, double[] input, int[] sizes)
    {
        int count = input.Length / 2;
        double[] re = new double[count],
            im = new double[count];
        int produced = 0,
            at = 0;
        foreach (int size in sizes)
        {
            int len = Math.Min(size, count - at);
            produced += dec.Process(input.AsSpan(2 * at, 2 * len), re.AsSpan(produced), im.AsSpan(produced));
            at += len;
        }
        return (re[..produced], im[..produced]);
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void Channel_decimator_outputs_do_not_depend_on_the_block_sizes(bool narrow)
    {
        // An output is the same sum whether it was computed four at a time or at a block's end.
        VectorWidth.Run(narrow, () =>
        {
            var rng = new Random(11);
            double[] h = FirDesign.LowPass(100e3, 2.4e6, 60e3, 80, 255);
            double[] input = [.. Enumerable.Range(0, 2 * 30_000).Select(_ => rng.NextDouble() * 2 - 1)];
            (double[] Re, double[] Im) Run(int[] sizes) =>
                InPieces(new ChannelDecimator(h, 6, -12_345.6, 2.4e6, true), input, sizes);
            var whole = Run([30_000]);
            var pieces = Run([7, 13, 1, 5000, 11, 24_968]);
            Assert.Equal(whole.Re, pieces.Re);
            Assert.Equal(whole.Im, pieces.Im);
        });
    }

    [WideVectorFact]
    public void Channel_decimator_gives_the_same_outputs_on_512_and_256_bit_vectors()
    {
        // With 255 taps both widths pad to 256 alike, so the mixer and the sums must agree bit for bit
        // (float and double input; a NaN is taken as 0 on both). Without AVX-512 both runs are narrow.
        var rng = new Random(12);
        double[] h = [.. Enumerable.Range(0, 255).Select(_ => rng.NextDouble() / 100)];
        double[] input = [.. Enumerable.Range(0, 2 * 20_000).Select(_ => rng.NextDouble() * 2 - 1)];
        input[777] = double.NaN;
        float[] inputF = [.. input.Select(v => (float)v)];
        (double[], double[], double[], double[]) Run(bool narrow) => VectorWidth.Run(narrow, () =>
            {
                double[] re = new double[4000],
                    im = new double[4000],
                    reF = new double[4000],
                    imF = new double[4000];
                new ChannelDecimator(h, 6, -12_345.6, 2.4e6, true).Process(input, re, im);
                new ChannelDecimator(h, 6, -12_345.6, 2.4e6, true).Process(inputF, reF, imF);
                return (re, im, reF, imF);
            });
        var wide = Run(false);
        var narrow = Run(true);
        Assert.Equal(narrow.Item1, wide.Item1);
        Assert.Equal(narrow.Item2, wide.Item2);
        Assert.Equal(narrow.Item3, wide.Item3);
        Assert.Equal(narrow.Item4, wide.Item4);
    }

    private static void DecimatorAgainstDouble(bool complex, int decimation, int taps, double[]? halfBand = null)
    {
        const double fs = 2.4e6,
            shift = -12_345.6;
        var rng = new Random(taps);
        int count = 70_001;
        double[] h = FirDesign.LowPass(100e3, halfBand is null ? fs : fs / 2, 60e3, 80, taps);
        var input = new double[complex ? 2 * count : count];
        for (int i = 0; i < input.Length; i++)
            input[i] = rng.NextDouble() * 2 - 1;
        // Reference: shift every sample, convolve I and Q, keep outputs at inputs (m + 1) M - 1.
        var sr = new double[count];
        var si = new double[count];
        for (int n = 0; n < count; n++)
        {
            double a = 2 * Math.PI * shift * n / fs,
                xr = complex ? input[2 * n] : input[n],
                xi = complex ? input[2 * n + 1] : 0;
            sr[n] = xr * Math.Cos(a) - xi * Math.Sin(a);
            si[n] = xr * Math.Sin(a) + xi * Math.Cos(a);
        }
        double[] yr,
            yi;
        if (halfBand is null)
            (yr, yi) = (Convolve(h, sr), Convolve(h, si));
        else
        {
            // Half-band outputs at odd input samples, then the second filter at half the rate; its
            // output u lands at input 2u + 1, so output m ((m + 1) M / 2 - 1 at half rate) at (m + 1) M - 1.
            double[] hr = Convolve(halfBand, sr),
                hi = Convolve(halfBand, si);
            double[] ur = [.. Enumerable.Range(0, count / 2).Select(u => hr[2 * u + 1])],
                ui = [.. Enumerable.Range(0, count / 2).Select(u => hi[2 * u + 1])];
            double[] vr = Convolve(h, ur),
                vi = Convolve(h, ui);
            yr = new double[count];
            yi = new double[count];
            for (int u = 0; u < vr.Length; u++)
            {
                yr[2 * u + 1] = vr[u];
                yi[2 * u + 1] = vi[u];
            }
        }
        var dec = new ChannelDecimator(h, decimation, shift, fs, complex, halfBand);
        var outRe = new double[count / decimation + 4];
        var outIm = new double[count / decimation + 4];
        int produced = 0,
            at = 0,
            vps = complex ? 2 : 1;
        foreach (int size in new[] { 3, 1000, 65536, 1, 3000, int.MaxValue })
        {
            int len = Math.Min(size, count - at);
            produced += dec.Process(input.AsSpan(at * vps, len * vps), outRe.AsSpan(produced), outIm.AsSpan(produced));
            at += len;
        }
        Assert.Equal(count, at);
        Assert.Equal(count / decimation, produced);
        // Single-precision samples and taps: errors of order 1e-7 of full scale.
        for (int m = 0; m < produced; m++)
        {
            int n = (m + 1) * decimation - 1;
            Assert.True(
                Math.Abs(outRe[m] - yr[n]) < 2e-6 && Math.Abs(outIm[m] - yi[n]) < 2e-6,
                $"output {m}: ({outRe[m]}, {outIm[m]}) vs ({yr[n]}, {yi[n]})"
            );
        }
    }

    [Fact]
    public void Channel_decimator_takes_non_finite_samples_as_zero()
    {
        double[] h = FirDesign.LowPass(0.1, 1, 0.05, 60, 101);
        var clean = new double[2 * 4000];
        var dirty = new double[2 * 4000];
        for (int i = 0; i < clean.Length; i++)
            dirty[i] = clean[i] = Math.Sin(0.01 * i);
        dirty[501] = double.NaN;
        clean[501] = 0;
        dirty[2000] = double.PositiveInfinity;
        clean[2000] = 0;
        var a = new ChannelDecimator(h, 4, 0.01, 1, true);
        var b = new ChannelDecimator(h, 4, 0.01, 1, true);
        double[] ar = new double[1001],
            ai = new double[1001],
            br = new double[1001],
            bi = new double[1001];
        int na = a.Process(clean, ar, ai),
            nb = b.Process(dirty, br, bi);
        Assert.Equal(na, nb);
        Assert.Equal(ar, br);
        Assert.Equal(ai, bi);
    }

    [Fact]
    public void Jittered_sampler_reads_a_band_limited_tone_at_the_instants_it_names()
    {
        // Output i is the signal at input i - 8 + PhaseOf(first + i) / 64 (the filter's centre).
        var js = new JitteredSampler();
        const int n = 5000;
        const long first = 123_456_789;
        double[] x = [.. Enumerable.Range(0, n).Select(i => Math.Sin(2 * Math.PI * i / 20.0 + 0.3))];
        var a = new double[n];
        js.Process(x.AsSpan(0, 1234), first, a.AsSpan(0, 1234));
        js.Process(x.AsSpan(1234), first + 1234, a.AsSpan(1234));
        double worst = 0;
        for (int i = 100; i < n; i++)
        {
            double t = i - 8 + JitteredSampler.PhaseOf(first + i) / (double)JitteredSampler.Phases;
            worst = Math.Max(worst, Math.Abs(a[i] - Math.Sin(2 * Math.PI * t / 20.0 + 0.3)));
        }
        // 16-tap Kaiser sinc: about 1e-3 in-band ripple at 0.1 of the input rate (Kaiser design formulas).
        Assert.True(worst < 2e-3, $"largest error {worst:e2}");
        // The same values whatever the blocks.
        var whole = new double[n];
        new JitteredSampler().Process(x, first, whole);
        Assert.Equal(whole, a);
    }

    [Fact]
    public void Jittered_sampler_finds_the_peak_of_a_tone_locked_between_samples()
    {
        // Six samples a period, offset by half a sample: the samples never exceed cos(pi/6) = 0.866
        // of the peak (the 13 % the fixed-grid reading loses); the jittered values reach the peak.
        const int n = 60_000;
        double[] x = [.. Enumerable.Range(0, n).Select(i => Math.Cos(2 * Math.PI * (i + 0.5) / 6.0))];
        Assert.True(x.Max() < 0.867);
        var y = new double[n];
        new JitteredSampler().Process(x, 0, y);
        double[] valid = [.. y.Skip(JitteredSampler.WarmUp).Order()];
        double p999 = valid[(int)(0.999 * (valid.Length - 1))];
        // A sine read at uniform instants: the 99.9th percentile is cos(pi 0.001) of the peak (the arcsine law).
        Near.Equal(Math.Cos(Math.PI * 0.001), p999, 0.005, "99.9th percentile");
    }

    [Fact]
    public void Jittered_sampler_gives_the_same_values_in_any_blocks()
    {
        // Four values (one phase) per vector on the stream's grid of four, one at a time at the
        // blocks' ends: each value the same sum however the stream is cut.
        var rng = new Random(21);
        double[] x = [.. Enumerable.Range(0, 5000).Select(_ => rng.NextDouble() - 0.5)];
        double[] Run(int[] blocks)
        {
            var js = new JitteredSampler();
            var y = new double[x.Length];
            int at = 0;
            foreach (int len in blocks)
            {
                int m = Math.Min(len, x.Length - at);
                js.Process(x.AsSpan(at, m), 1001 + at, y.AsSpan(at, m));
                at += m;
            }
            return y;
        }
        Assert.Equal(Run([5000]), Run([3, 17, 1, 999, 4, 7, 3969]));
    }

    [Fact]
    public void Jittered_sampler_phases_are_spread_evenly()
    {
        var counts = new int[JitteredSampler.Phases];
        for (long i = 0; i < 640_000; i++)
            counts[JitteredSampler.PhaseOf(i)]++;
        // 10 000 expected per phase, drawn in groups of four samples: a standard deviation of about
        // 4 sqrt(2500) = 200, so within 1000 (5 standard deviations).
        Assert.All(counts, c => Assert.InRange(c, 9_000, 11_000));
    }
}
