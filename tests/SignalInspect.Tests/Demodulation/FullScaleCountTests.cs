using SignalInspect.Demodulation;

namespace SignalInspect.Tests.Demodulation;

/// <summary>
/// The count of sample components at full scale (for the clipping warning), against counting by its
/// definition, |v| >= limit with NaN never counted and infinities always, on 512-bit and 256-bit vectors.
/// </summary>
public class FullScaleCountTests
{
    [Theory]
    [InlineData(0)]
    [InlineData(15)]
    [InlineData(16)]
    [InlineData(1001)]
    [InlineData(32768)]
    public void The_count_is_the_definitions_on_both_widths(int n)
    {
        var rng = new Random(n + 11);
        float[] f = new float[n];
        for (int i = 0; i < n; i++)
        {
            f[i] = (float)(2 * rng.NextDouble() - 1);
            if (i % 97 == 3)
                f[i] = 0.9999f;
            if (i % 131 == 5)
                f[i] = -1f;
            if (i % 173 == 7)
                f[i] = float.NaN;
            if (i % 211 == 9)
                f[i] = float.NegativeInfinity;
        }
        double[] d = [.. f.Select(v => (double)v)];
        const float limitF = 0.9999f;
        long want = f.Count(v => Math.Abs(v) >= limitF);
        long wantD = d.Count(v => Math.Abs(v) >= 0.9999);
        foreach (bool narrow in new[] { false, true })
            VectorWidth.Run(narrow, () =>
            {
                Assert.Equal(want, DemodulationPass.CountAtOrAbove<float>(f, limitF));
                Assert.Equal(wantD, DemodulationPass.CountAtOrAbove<double>(d, 0.9999));
            });
    }
}
