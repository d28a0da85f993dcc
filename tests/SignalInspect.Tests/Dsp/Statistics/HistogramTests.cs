using SignalInspect.Dsp;

namespace SignalInspect.Tests.Dsp;

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
        double[] v =
        [
            .. Enumerable
                .Range(0, 10_007)
                .Select(i =>
                    i % 97 == 0 ? double.NaN
                    : i % 89 == 0 ? 5.0
                    : rng.NextDouble() * 2.4 - 1.2
                ),
        ];
        var block = new Histogram(-1, 1, 1000);
        var single = new Histogram(-1, 1, 1000);
        block.Add(v);
        foreach (double x in v)
            single.Add(x);
        Assert.Equal(single.Count, block.Count);
        Assert.Equal(v.Count(x => !double.IsNaN(x)), block.Count);
        for (int b = 0; b < block.Bins; b++)
            Assert.Equal(single[b], block[b]);
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
            Near.Equal(
                sorted[(int)(p * (sorted.Length - 1))],
                h.Percentile(p),
                2 * h.BinWidth + 1e-4,
                $"percentile {p}"
            );
    }

    [Fact]
    public void Merged_histograms_with_values_in_a_narrow_part_of_the_range_count_and_rank_like_one()
    {
        // The histogram visits only the bins it has counted in when merging and ranking; checked
        // against one histogram fed every value and against the sorted values (the definition).
        var rng = new Random(6);
        double[] a =
        [
            .. Enumerable.Range(0, 5003).Select(i => i % 101 == 0 ? double.NaN : 0.30 + 0.01 * rng.NextDouble()),
        ];
        double[] b = [.. Enumerable.Range(0, 4001).Select(_ => -0.52 - 0.02 * rng.NextDouble())];
        var ha = new Histogram(-1, 1, 1 << 18);
        var hb = new Histogram(-1, 1, 1 << 18);
        var empty = new Histogram(-1, 1, 1 << 18);
        var nanOnly = new Histogram(-1, 1, 1 << 18);
        var all = new Histogram(-1, 1, 1 << 18);
        ha.Add(a);
        hb.Add(b.AsSpan(0, 3001));
        foreach (double x in b.AsSpan(3001))
            hb.Add(x); // the one-value insert widens the range too
        nanOnly.Add([double.NaN, double.NaN, double.NaN, double.NaN, double.NaN]);
        all.Add(a);
        all.Add(b);
        ha.Add(hb);
        ha.Add(empty);
        ha.Add(nanOnly);
        Assert.Equal(all.Count, ha.Count);
        for (int k = 0; k < all.Bins; k++)
            Assert.Equal(all[k], ha[k]);
        double[] sorted = [.. a.Concat(b).Where(x => !double.IsNaN(x)).Order()];
        foreach (double p in new[] { 0.0, 0.001, 0.4, 0.5, 0.999, 1.0 })
        {
            Assert.Equal(all.Percentile(p), ha.Percentile(p));
            Near.Equal(sorted[(int)(p * (sorted.Length - 1))], ha.Percentile(p), 2 * ha.BinWidth, $"percentile {p}");
        }
        Assert.True(double.IsNaN(empty.Percentile(0.5)));
    }

    [Fact]
    public void Counts_moved_out_of_the_32_bit_counters_stay_exact()
    {
        // The counters are 32-bit and move into 64-bit totals before they could overflow; with the
        // limit lowered to a few values that happens many times here. Checked against histograms
        // that never move (the default limit holds 4e9 values) and against plain counting by the
        // definition, bin = floor((v - lo) / width) clamped, NaN ignored.
        var rng = new Random(7);
        double[] v =
        [
            .. Enumerable
                .Range(0, 20_011)
                .Select(i =>
                    i % 53 == 0 ? double.NaN
                    : i % 7 == 0 ? 0.25
                    : rng.NextDouble() * 2.2 - 1.1
                ),
        ];
        foreach (int limit in new[] { 37, 1000 })
        {
            var moved = new Histogram(-1, 1, 512) { HoldLimit = limit };
            var other = new Histogram(-1, 1, 512) { HoldLimit = limit };
            var plain = new Histogram(-1, 1, 512);
            for (int at = 0; at < 12_000; at += 100)
                moved.Add(v.AsSpan(at, 100));
            foreach (double x in v.AsSpan(12_000, 3_000))
                moved.Add(x);
            other.Add(v.AsSpan(15_000));
            moved.Add(other);
            plain.Add(v);
            var byDefinition = new long[512];
            foreach (double x in v.Where(x => !double.IsNaN(x)))
                byDefinition[(int)Math.Clamp(Math.Floor((x + 1) / (2.0 / 512)), 0, 511)]++;
            Assert.Equal(v.Count(x => !double.IsNaN(x)), moved.Count);
            for (int b = 0; b < 512; b++)
            {
                Assert.Equal(byDefinition[b], moved[b]);
                Assert.Equal(byDefinition[b], plain[b]);
            }
            foreach (double p in new[] { 0.0, 0.01, 0.5, 0.93, 1.0 })
                Assert.Equal(plain.Percentile(p), moved.Percentile(p));
            Assert.Equal(plain.FractionBetween(0.2, 0.3), moved.FractionBetween(0.2, 0.3));
            // A histogram that never moved, merged with one that did.
            var fresh = new Histogram(-1, 1, 512);
            fresh.Add(moved);
            for (int b = 0; b < 512; b++)
                Assert.Equal(byDefinition[b], fresh[b]);
        }
    }
}
