namespace SignalInspect.Demodulation;

/// <summary>
/// The channel's power against time, gathered by the demodulation pass: the mean of |z|^2 over blocks of
/// <see cref="BlockLength"/> decimated samples (about a millisecond). Chunks run in parallel; each adds the
/// samples of its first block (which the chunk before may share) to its own head sums, merged in chunk order
/// after the pass, and every other block directly: no block has two writers.
/// </summary>
internal sealed class PowerTrack
{
    /// <summary>Block length, seconds (the resolution of key-up and key-down times).</summary>
    public const double BlockSeconds = 0.001;

    private readonly double[] _sum;
    private readonly int[] _count;

    /// <summary>A track for <paramref name="samples"/> decimated samples at <paramref name="fsd"/>.</summary>
    public PowerTrack(long samples, double fsd)
    {
        BlockLength = Math.Max(1, (int)Math.Round(BlockSeconds * fsd));
        long blocks = (samples + BlockLength - 1) / BlockLength;
        _sum = new double[blocks];
        _count = new int[blocks];
    }

    /// <summary>Decimated samples per block.</summary>
    public int BlockLength { get; }

    /// <summary>A chunk's share of the block it starts in.</summary>
    public struct Head
    {
        public long Block;
        public double Sum;
        public int Count;
    }

    /// <summary>Adds the magnitudes <paramref name="a"/> of samples from stream index <paramref name="first"/>; the
    /// chunk's first counted sample is <paramref name="chunkFirst"/>.</summary>
    public void Add(long first, ReadOnlySpan<double> a, long chunkFirst, ref Head head)
    {
        long headBlock = chunkFirst / BlockLength;
        head.Block = headBlock;
        // Block by block (no division per sample): the samples of block b are those from b * BlockLength on.
        int i = 0;
        while (i < a.Length)
        {
            long b = (first + i) / BlockLength;
            if (b >= _sum.Length)
                break;
            int end = (int)Math.Min(a.Length, (b + 1) * BlockLength - first);
            double p = 0;
            for (int j = i; j < end; j++)
                p += a[j] * a[j];
            if (b == headBlock)
            {
                head.Sum += p;
                head.Count += end - i;
            }
            else
            {
                _sum[b] += p;
                _count[b] += end - i;
            }
            i = end;
        }
    }

    /// <summary>Merges a chunk's head (in chunk order, after the pass).</summary>
    public void Merge(Head head)
    {
        if (head.Count == 0 || head.Block >= _sum.Length)
            return;
        _sum[head.Block] += head.Sum;
        _count[head.Block] += head.Count;
    }

    /// <summary>Mean power of each block; NaN for a block no counted sample fell in (the filters' settling).</summary>
    public double[] Means()
    {
        var m = new double[_sum.Length];
        for (int b = 0; b < m.Length; b++)
            m[b] = _count[b] > 0 ? _sum[b] / _count[b] : double.NaN;
        return m;
    }
}
