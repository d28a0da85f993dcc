using SignalInspect.Measure;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// The histogram's block insert against its one-value insert (the definition: bin = floor((v - lo) / width),
/// clamped to the range, NaN ignored), and its percentile against a sorted array's.
/// </summary>
public class HistogramTests
{
    [Fact]
    public void A_block_counts_exactly_what_values_one_by_one_count()
    {
        var rng = new Random(4);
        double[] v = [.. Enumerable.Range(0, 10_007).Select(i => i % 97 == 0 ? double.NaN : i % 89 == 0 ? 5.0 : rng.NextDouble() * 2.4 - 1.2)];
        var block = new Histogram(-1, 1, 1000);
        var single = new Histogram(-1, 1, 1000);
        block.Add(v);
        foreach (double x in v) single.Add(x);
        Assert.Equal(single.Count, block.Count);
        Assert.Equal(v.Count(x => !double.IsNaN(x)), block.Count);
        for (int b = 0; b < block.Bins; b++) Assert.Equal(single[b], block[b]);
    }

    [Fact]
    public void The_percentile_is_that_of_the_sorted_values_to_a_bin()
    {
        var rng = new Random(5);
        double[] v = [.. Enumerable.Range(0, 100_000).Select(_ => rng.NextDouble())];
        var h = new Histogram(0, 1, 1 << 16);
        h.Add(v);
        double[] sorted = [.. v.Order()];
        foreach (double p in new[] { 0.001, 0.5, 0.999 })
            Near.Equal(sorted[(int)(p * (sorted.Length - 1))], h.Percentile(p), 2 * h.BinWidth + 1e-4, $"percentile {p}");
    }
}
