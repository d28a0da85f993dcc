using System.Numerics;

namespace SignalInspect.Demodulation;

/// <summary>
/// The channel against time, gathered by the demodulation pass in blocks of <see cref="BlockLength"/> decimated
/// samples (about a millisecond): the mean power |z|^2, the mean instantaneous frequency (post-detection, Hz) and
/// the extremes of the frequency and of the envelope. Chunks run in parallel; each adds the samples of its first
/// block (which the chunk before may share) to its own head, merged in chunk order after the pass, and every other
/// block directly: no block has two writers.
/// </summary>
internal sealed class BlockTrack
{
    /// <summary>Block length, seconds (the resolution of key-up and key-down times).</summary>
    public const double BlockSeconds = 0.001;

    private readonly double[] _p,
        _f,
        _fMax,
        _fMin,
        _aMax,
        _aMin;
    private readonly int[] _count;

    /// <summary>Blocks at most: a capture longer than this many milliseconds (about 17 minutes) gets longer blocks,
    /// so that the track's memory (56 bytes a block) stays under 60 MB whatever the capture's length.</summary>
    public const int MaxBlocks = 1 << 20;

    /// <summary>A track for <paramref name="samples"/> decimated samples at <paramref name="fsd"/>.</summary>
    public BlockTrack(long samples, double fsd)
    {
        BlockLength = (int)Math.Max(Math.Max(1, Math.Round(BlockSeconds * fsd)), (samples + MaxBlocks - 1) / MaxBlocks);
        long blocks = (samples + BlockLength - 1) / BlockLength;
        _p = new double[blocks];
        _f = new double[blocks];
        _fMax = new double[blocks];
        _fMin = new double[blocks];
        _aMax = new double[blocks];
        _aMin = new double[blocks];
        _count = new int[blocks];
    }

    /// <summary>Decimated samples per block.</summary>
    public int BlockLength { get; }

    /// <summary>A chunk's share of the block it starts in.</summary>
    public struct Head
    {
        public long Block;
        public Sums Part;
    }

    /// <summary>One block's sums and extremes (<see cref="Count"/> 0: empty).</summary>
    public struct Sums
    {
        public double P,
            F,
            FMax,
            FMin,
            AMax,
            AMin;
        public int Count;

        public void Add(in Sums o)
        {
            if (o.Count == 0)
                return;
            if (Count == 0)
            {
                this = o;
                return;
            }
            P += o.P;
            F += o.F;
            FMax = Math.Max(FMax, o.FMax);
            FMin = Math.Min(FMin, o.FMin);
            AMax = Math.Max(AMax, o.AMax);
            AMin = Math.Min(AMin, o.AMin);
            Count += o.Count;
        }
    }

    /// <summary>Adds the envelope <paramref name="a"/> and instantaneous frequency <paramref name="f"/> of samples
    /// from stream index <paramref name="first"/>; the chunk's first counted sample is
    /// <paramref name="chunkFirst"/>.</summary>
    public void Add(long first, ReadOnlySpan<double> a, ReadOnlySpan<double> f, long chunkFirst, ref Head head)
    {
        long headBlock = chunkFirst / BlockLength;
        head.Block = headBlock;
        // Block by block (no division per sample): the samples of block b are those from b * BlockLength on.
        int i = 0;
        while (i < a.Length)
        {
            long b = (first + i) / BlockLength;
            if (b >= _p.Length)
                break;
            int end = (int)Math.Min(a.Length, (b + 1) * BlockLength - first);
            var s = new Sums
            {
                FMax = double.NegativeInfinity,
                FMin = double.PositiveInfinity,
                AMax = double.NegativeInfinity,
                AMin = double.PositiveInfinity,
                Count = end - i,
            };
            Accumulate(a[i..end], f[i..end], ref s);
            if (b == headBlock)
                head.Part.Add(s);
            else
                Store(b, s);
            i = end;
        }
    }

    /// <summary>Adds one block's samples to <paramref name="s"/> (sums, maxima, minima), a vector at a time.</summary>
    private static void Accumulate(ReadOnlySpan<double> a, ReadOnlySpan<double> f, ref Sums s)
    {
        int j = 0,
            w = Vector<double>.Count;
        if (a.Length >= 2 * w)
        {
            Vector<double> p = Vector<double>.Zero,
                fs = Vector<double>.Zero,
                fMax = new(f[0]),
                fMin = new(f[0]),
                aMax = new(a[0]),
                aMin = new(a[0]);
            for (; j <= a.Length - w; j += w)
            {
                var va = new Vector<double>(a[j..]);
                var vf = new Vector<double>(f[j..]);
                p += va * va;
                fs += vf;
                fMax = Vector.Max(fMax, vf);
                fMin = Vector.Min(fMin, vf);
                aMax = Vector.Max(aMax, va);
                aMin = Vector.Min(aMin, va);
            }
            for (int l = 0; l < w; l++)
            {
                s.P += p[l];
                s.F += fs[l];
                s.FMax = Math.Max(s.FMax, fMax[l]);
                s.FMin = Math.Min(s.FMin, fMin[l]);
                s.AMax = Math.Max(s.AMax, aMax[l]);
                s.AMin = Math.Min(s.AMin, aMin[l]);
            }
        }
        for (; j < a.Length; j++)
        {
            s.P += a[j] * a[j];
            s.F += f[j];
            s.FMax = Math.Max(s.FMax, f[j]);
            s.FMin = Math.Min(s.FMin, f[j]);
            s.AMax = Math.Max(s.AMax, a[j]);
            s.AMin = Math.Min(s.AMin, a[j]);
        }
    }

    /// <summary>Merges a chunk's head (in chunk order, after the pass).</summary>
    public void Merge(Head head)
    {
        if (head.Part.Count > 0 && head.Block < _p.Length)
            Store(head.Block, head.Part);
    }

    private void Store(long b, in Sums s)
    {
        var t = new Sums
        {
            P = _p[b],
            F = _f[b],
            FMax = _fMax[b],
            FMin = _fMin[b],
            AMax = _aMax[b],
            AMin = _aMin[b],
            Count = _count[b],
        };
        t.Add(s);
        (_p[b], _f[b], _fMax[b], _fMin[b], _aMax[b], _aMin[b], _count[b]) = (
            t.P,
            t.F,
            t.FMax,
            t.FMin,
            t.AMax,
            t.AMin,
            t.Count
        );
    }

    /// <summary>The blocks' statistics (NaN for a block no counted sample fell in: the filters' settling).</summary>
    public BlockStats Result()
    {
        int n = _p.Length;
        double[] p = new double[n],
            f = new double[n];
        for (int b = 0; b < n; b++)
        {
            p[b] = _count[b] > 0 ? _p[b] / _count[b] : double.NaN;
            f[b] = _count[b] > 0 ? _f[b] / _count[b] : double.NaN;
        }
        return new BlockStats(BlockLength, p, f, _fMax, _fMin, _aMax, _aMin, _count);
    }
}

/// <summary>The channel against time in blocks of <paramref name="BlockLength"/> decimated samples.</summary>
/// <param name="BlockLength">Decimated samples per block.</param>
/// <param name="Power">Mean |z|^2 (full scale 1), NaN where no sample was counted.</param>
/// <param name="Freq">Mean instantaneous frequency after post-detection filtering, Hz from the channel's
/// centre.</param>
/// <param name="FreqMax">Largest instantaneous frequency, Hz.</param>
/// <param name="FreqMin">Smallest instantaneous frequency, Hz.</param>
/// <param name="EnvelopeMax">Largest envelope |z|.</param>
/// <param name="EnvelopeMin">Smallest envelope |z|.</param>
/// <param name="Count">Samples counted in each block (fewer than <paramref name="BlockLength"/> in a block the
/// filters' settling cut, or the last).</param>
internal sealed record BlockStats(
    int BlockLength,
    double[] Power,
    double[] Freq,
    double[] FreqMax,
    double[] FreqMin,
    double[] EnvelopeMax,
    double[] EnvelopeMin,
    int[] Count
)
{
    /// <summary>No blocks (a pass that tracked nothing).</summary>
    public static BlockStats Empty { get; } = new(1, [], [], [], [], [], [], []);
}
