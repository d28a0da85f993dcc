using SignalInspect.Measure;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// The demodulated-stream spectra: two real streams in one complex transform give the same sums
/// as one transform each (the DFT's symmetry for real input, X[N-k] = conj X[k]); a tone lands on
/// its frequency (the definition of the DFT bin, f = k fs / N).
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
        LineSpectrum pa = new(n, 1000), pb = new(n, 1000), qa = new(n, 1000), qb = new(n, 1000);
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

    [Fact]
    public void A_tone_reads_at_its_frequency()
    {
        const int n = 8192;
        const double fs = 48000, f = 1234.5;
        var ws = new LineSpectrum.Workspace(n);
        var s = new LineSpectrum(n, fs);
        for (int seg = 0; seg < 4; seg++)
            s.AddSegment([.. Enumerable.Range(seg * n / 2, n).Select(i => Math.Sin(2 * Math.PI * f * i / fs))], ws);
        var peak = s.Peak(100, 20000);
        Assert.NotNull(peak);
        Near.Equal(f, peak.Value.FrequencyHz, 0.05 * fs / n, "tone frequency (within 5 % of a bin)");
    }
}
