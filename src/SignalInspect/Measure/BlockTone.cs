namespace SignalInspect.Measure;

/// <summary>
/// One tone's complex amplitude in the block means of a demodulated frequency (<see cref="Demodulation.BlockStats"/>):
/// the blocks' mean taken off (a block not measured counts as the mean), each block multiplied by
/// exp(-j 2 pi f t) at its middle, and running sums kept so that the phase and level over any stretch of blocks
/// cost two look-ups. The reverse burst (the sub-audible tone's phase) and the turn-off code (a 134.4 Hz tone's
/// level) read it.
/// </summary>
internal sealed class BlockTone
{
    private readonly double[] _re,
        _im;
    private readonly int _first;

    /// <summary>The tone at <paramref name="hz"/> in blocks <paramref name="first"/> to <paramref name="last"/>
    /// (inclusive) of <paramref name="freq"/>, blocks of <paramref name="blockS"/> s.</summary>
    public BlockTone(double[] freq, int first, int last, double blockS, double hz)
    {
        _first = first;
        double mean = FiniteMean(freq, first, last);
        int n = Math.Max(0, last - first + 1);
        _re = new double[n + 1];
        _im = new double[n + 1];
        for (int j = 0; j < n; j++)
        {
            int i = first + j;
            double x = double.IsFinite(freq[i]) ? freq[i] - mean : 0,
                a = -2 * Math.PI * hz * (i + 0.5) * blockS;
            _re[j + 1] = _re[j] + x * Math.Cos(a);
            _im[j + 1] = _im[j] + x * Math.Sin(a);
        }
    }

    /// <summary>The tone's phase (rad) and level (half its peak, the block values' unit) over blocks
    /// <paramref name="a"/> to <paramref name="b"/> (exclusive), within those given.</summary>
    public (double Phase, double Level) Over(int a, int b)
    {
        double r = _re[b - _first] - _re[a - _first],
            q = _im[b - _first] - _im[a - _first];
        return (Math.Atan2(q, r), Math.Sqrt(r * r + q * q) / Math.Max(1, b - a));
    }

    /// <summary>The mean of the measured blocks from <paramref name="first"/> to <paramref name="last"/>
    /// (inclusive).</summary>
    public static double FiniteMean(double[] freq, int first, int last)
    {
        double mean = 0;
        int counted = 0;
        for (int i = first; i <= last; i++)
            if (double.IsFinite(freq[i]))
                (mean, counted) = (mean + freq[i], counted + 1);
        return mean / Math.Max(1, counted);
    }
}
