using SignalInspect.Dsp;

namespace SignalInspect.Tests.Dsp;

/// <summary>The vectorised arctangent and magnitude against the runtime's Math.Atan2 and Math.Sqrt (the C library's, a
/// reference outside the project).</summary>
public class VectorMathTests
{
    [Fact]
    public void Atan2_matches_Math_Atan2_over_every_quadrant_and_scale()
    {
        var rng = new Random(7);
        const int n = 200_003; // not a multiple of the vector width: the scalar tail runs too
        var y = new double[n];
        var x = new double[n];
        for (int i = 0; i < n; i++)
        {
            double scale = Math.Pow(10, rng.Next(-30, 30));
            x[i] = (rng.NextDouble() * 2 - 1) * scale;
            y[i] = (rng.NextDouble() * 2 - 1) * scale * Math.Pow(10, rng.Next(-3, 4));
        }
        // The octant boundaries and the branch point of the reduction (tan 0.66...).
        double[] special = [0, 1, -1, 0.66, 1 / 0.66, Math.Tan(0.5836), 1e-300, 1e300];
        for (int i = 0; i < special.Length * special.Length; i++)
        {
            x[i] = special[i % special.Length] * (i % 3 == 0 ? -1 : 1);
            y[i] = special[i / special.Length] * (i % 5 == 0 ? -1 : 1);
        }
        var got = new double[n];
        VectorMath.Atan2(y, x, got);
        double worst = 0;
        int at = 0;
        for (int i = 0; i < n; i++)
        {
            double want = Math.Atan2(y[i], x[i]);
            // Signed zeros are not told apart: +/-pi on the negative axis, 0 for 0/0.
            if (y[i] == 0 && x[i] < 0)
            {
                Assert.Equal(Math.PI, Math.Abs(got[i]), 15);
                continue;
            }
            if (y[i] == 0 && x[i] == 0)
            {
                Assert.Equal(0.0, got[i]);
                continue;
            }
            if (Math.Abs(got[i] - want) > worst)
            {
                worst = Math.Abs(got[i] - want);
                at = i;
            }
        }
        Assert.True(
            worst < 1e-15,
            $"largest difference from Math.Atan2: {worst:e3} rad at atan2({y[at]:r}, {x[at]:r})"
        );
    }

    [Fact]
    public void Atan2_keeps_NaN_and_reads_zero_over_zero_as_zero()
    {
        double[] y = [double.NaN, 0, 1, 0, 0, 0, 0, 0],
            x = [1, double.NaN, double.NaN, 0, 0, 0, 0, 0];
        var r = new double[8];
        VectorMath.Atan2(y, x, r);
        Assert.True(double.IsNaN(r[0]) && double.IsNaN(r[1]) && double.IsNaN(r[2]));
        Assert.Equal(0.0, r[3]);
    }

    [Fact]
    public void Magnitude_matches_the_definition()
    {
        var rng = new Random(3);
        double[] re = [.. Enumerable.Range(0, 1001).Select(_ => rng.NextDouble() - 0.5)],
            im = [.. Enumerable.Range(0, 1001).Select(_ => rng.NextDouble() - 0.5)];
        var m = new double[re.Length];
        VectorMath.Magnitude(re, im, m);
        for (int i = 0; i < re.Length; i++)
            Assert.Equal(Math.Sqrt(re[i] * re[i] + im[i] * im[i]), m[i], 15);
    }

    [Theory]
    [InlineData(0)]
    [InlineData(3)]
    [InlineData(1001)]
    public void Block_helpers_match_their_definitions(int n)
    {
        var rng = new Random(n);
        double[] a = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble() - 0.5)],
            b = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble() - 0.5)];
        var pair = new double[2 * n];
        VectorMath.Interleave(a, b, pair);
        for (int i = 0; i < n; i++)
        {
            Assert.Equal(a[i], pair[2 * i]);
            Assert.Equal(b[i], pair[2 * i + 1]);
        }
        var r = new double[n];
        VectorMath.Negate(a, r);
        for (int i = 0; i < n; i++)
            Assert.Equal(-a[i], r[i]);
        VectorMath.Scale(a, 3.7, r);
        for (int i = 0; i < n; i++)
            Assert.Equal(a[i] * 3.7, r[i]);
        VectorMath.AbsDifference(a, b, r);
        for (int i = 0; i < n; i++)
            Assert.Equal(Math.Abs(a[i] - b[i]), r[i]);
    }
}
