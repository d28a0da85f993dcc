using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Tests.Spectrum;

/// <summary>
/// The demodulated-stream spectra: two real streams in one complex transform give the same sums
/// as one transform each (the DFT's symmetry for real input, X[N-k] = conj X[k]); a tone lands on
/// its frequency (the definition of the DFT bin, f = k fs / N); every bin's power equals the
/// windowed DFT sum computed from its definition.
/// </summary>
public class LineSpectrumTests
{
    [Fact]
    public void Two_streams_in_one_transform_equal_one_transform_each()
    {
        const int n = 4096;
        var rng = new Random(9);
        double[] a = [.. Enumerable.Range(0, n).Select(i => Math.Sin(0.05 * i) + 0.1 * (rng.NextDouble() - 0.5))];
        double[] b = [.. Enumerable.Range(0, n).Select(i => 3 + Math.Cos(0.31 * i) + 0.1 * (rng.NextDouble() - 0.5))];
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum pa = new(n, 1000),
            pb = new(n, 1000),
            qa = new(n, 1000),
            qb = new(n, 1000);
        pa.AddSegment(a, ws);
        pb.AddSegment(b, ws);
        LineSpectrum.AddSegments(qa, a, qb, b, ws);
        for (int k = 0; k <= n / 2; k++)
        {
            Assert.Equal(pa.Power(k), qa.Power(k), 1e-9 * Math.Max(1, pa.Power(k)));
            Assert.Equal(pb.Power(k), qb.Power(k), 1e-9 * Math.Max(1, pb.Power(k)));
        }
        Assert.Equal(1, qa.Segments);
        Assert.Equal(1, qb.Segments);
    }

    [Theory]
    [InlineData(16)]
    [InlineData(32)]
    [InlineData(256)]
    [InlineData(4096)]
    public void Bin_powers_equal_the_windowed_DFT_by_its_definition(int n)
    {
        // |sum_j w[j] x[j] e^(-2 pi i k j / N)|^2, the definition, in double; the accumulator reads
        // the bit-reversed output of the fast transform through its index tables.
        var rng = new Random(n);
        double[] a = [.. Enumerable.Range(0, n).Select(i => Math.Sin(0.2 * i) + rng.NextDouble() - 0.5)];
        double[] b = [.. Enumerable.Range(0, n).Select(i => 1 + Math.Cos(0.7 * i) + rng.NextDouble() - 0.5)];
        var w = Window.Create(WindowKind.BlackmanHarris, n).Coefficients.ToArray();
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum one = new(n, 1000),
            pa = new(n, 1000),
            pb = new(n, 1000);
        one.AddSegment(a, ws);
        LineSpectrum.AddSegments(pa, a, pb, b, ws);
        int step = Math.Max(1, n / 64);
        for (int k = 0; k <= n / 2; k += k < 8 || k > n / 2 - 8 ? 1 : step)
        {
            double Direct(double[] x)
            {
                double re = 0,
                    im = 0;
                for (int j = 0; j < n; j++)
                {
                    double ph = -2 * Math.PI * ((long)k * j % n) / n;
                    re += w[j] * x[j] * Math.Cos(ph);
                    im += w[j] * x[j] * Math.Sin(ph);
                }
                return re * re + im * im;
            }
            double da = Direct(a),
                db = Direct(b);
            Assert.Equal(da, one.Power(k), 1e-9 * Math.Max(1, da));
            Assert.Equal(da, pa.Power(k), 1e-9 * Math.Max(1, da));
            Assert.Equal(db, pb.Power(k), 1e-9 * Math.Max(1, db));
        }
    }

    [Fact]
    public void Two_segments_of_one_stream_in_one_transform_equal_one_each()
    {
        const int n = 1024;
        var rng = new Random(4);
        double[] a = [.. Enumerable.Range(0, n).Select(i => Math.Abs(Math.Sin(0.01 * i)) + rng.NextDouble())];
        double[] b = [.. Enumerable.Range(0, n).Select(i => Math.Abs(Math.Cos(0.02 * i)) + rng.NextDouble())];
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum one = new(n, 1000),
            paired = new(n, 1000);
        one.AddSegment(a, ws);
        one.AddSegment(b, ws);
        LineSpectrum.AddSegments(paired, a, paired, b, ws);
        Assert.Equal(2, paired.Segments);
        for (int k = 0; k <= n / 2; k++)
            Assert.Equal(one.Power(k), paired.Power(k), 1e-9 * Math.Max(1, one.Power(k)));
    }

    [Theory]
    [InlineData(0)]
    [InlineData(1)]
    [InlineData(700)]
    [InlineData(1023)]
    public void Segments_in_two_pieces_give_the_sums_of_the_whole_segments(int split)
    {
        // Internal consistency: a ring buffer's two pieces, read in place, are the segment itself.
        const int n = 1024;
        var rng = new Random(split);
        double[] a = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble())],
            b = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble())];
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum wa = new(n, 1000),
            wb = new(n, 1000),
            pa = new(n, 1000),
            pb = new(n, 1000);
        LineSpectrum.AddSegments(wa, a, wb, b, ws);
        LineSpectrum.AddSegments(pa, a.AsSpan(0, split), a.AsSpan(split), pb, b.AsSpan(0, split), b.AsSpan(split), ws);
        for (int k = 0; k <= n / 2; k++)
        {
            Assert.Equal(wa.Power(k), pa.Power(k));
            Assert.Equal(wb.Power(k), pb.Power(k));
        }
        Assert.Throws<ArgumentException>(() =>
            LineSpectrum.AddSegments(
                pa,
                a.AsSpan(0, split),
                a.AsSpan(split),
                pb,
                b.AsSpan(0, n - split),
                b.AsSpan(n - split),
                ws
            )
        );
    }

    [Theory]
    [InlineData(0, 0)]
    [InlineData(512, 512)]
    [InlineData(0, 512)]
    public void Segments_read_out_of_rings_give_the_sums_of_the_segments_copied_out(int startA, int startB)
    {
        // Internal consistency: the demodulation pass's rings (segments start at 0 or N / 2 of a
        // ring of N) transformed in place give the sums of the same segments in two pieces, bit for bit.
        const int n = 1024;
        var rng = new Random(startA + 3 * startB);
        double[] ra = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble())],
            rb = [.. Enumerable.Range(0, n).Select(_ => 5 * rng.NextDouble())];
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum pa = new(n, 1000),
            pb = new(n, 1000),
            qa = new(n, 1000),
            qb = new(n, 1000);
        double[] segB = [.. rb.AsSpan(startB), .. rb.AsSpan(0, startB)];
        LineSpectrum.AddSegments(
            pa,
            ra.AsSpan(startA),
            ra.AsSpan(0, startA),
            pb,
            segB.AsSpan(0, n - startA),
            segB.AsSpan(n - startA),
            ws
        );
        LineSpectrum.AddRingSegments(qa, ra, startA, qb, rb, startB, ws);
        for (int k = 0; k <= n / 2; k++)
        {
            Assert.Equal(pa.Power(k), qa.Power(k));
            Assert.Equal(pb.Power(k), qb.Power(k));
        }
        Assert.Equal(1, qa.Segments);
    }

    [Theory]
    [InlineData(8)]
    [InlineData(1000)]
    public void Sizes_other_than_powers_of_two_from_16_are_refused(int n)
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new LineSpectrum(n, 1000));
        Assert.Throws<ArgumentOutOfRangeException>(() => new LineSpectrum.Workspace(n));
    }

    [Fact]
    public void A_segment_with_a_non_finite_sample_is_left_out()
    {
        const int n = 256;
        double[] good = [.. Enumerable.Range(0, n).Select(i => Math.Sin(0.3 * i))];
        double[] bad = (double[])good.Clone();
        bad[17] = double.NaN;
        var ws = new LineSpectrum.Workspace(n);
        LineSpectrum s = new(n, 1000),
            t = new(n, 1000),
            u = new(n, 1000);
        s.AddSegment(good, ws);
        s.AddSegment(bad, ws);
        LineSpectrum.AddSegments(t, bad, u, good, ws);
        Assert.Equal(1, s.Segments);
        Assert.Equal(0, t.Segments);
        Assert.Equal(0, u.Segments);
        Assert.True(double.IsFinite(s.Power(10)));
    }

    [Fact]
    public void A_tone_reads_at_its_frequency()
    {
        const int n = 8192;
        const double fs = 48000,
            f = 1234.5;
        var ws = new LineSpectrum.Workspace(n);
        var s = new LineSpectrum(n, fs);
        for (int seg = 0; seg < 4; seg++)
            s.AddSegment([.. Enumerable.Range(seg * n / 2, n).Select(i => Math.Sin(2 * Math.PI * f * i / fs))], ws);
        var peak = s.Peak(100, 20000);
        Assert.NotNull(peak);
        Near.Equal(f, peak.Value.FrequencyHz, 0.05 * fs / n, "tone frequency (within 5 % of a bin)");
    }
}
