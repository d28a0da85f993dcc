namespace SignalInspect.Demodulation;

/// <summary>
/// A local carrier against time, to be taken off the instantaneous frequency: piecewise linear through knots
/// (decimated sample index, Hz), held at the first and last knot's value beyond them.
/// </summary>
internal sealed class CarrierTrack
{
    private readonly long[] _at;
    private readonly double[] _hz;

    /// <summary>A track through <paramref name="knots"/> (at least one, in increasing sample order).</summary>
    public CarrierTrack(IReadOnlyList<(long Sample, double Hz)> knots)
    {
        if (knots.Count == 0)
            throw new ArgumentException("a carrier track needs a knot", nameof(knots));
        _at = [.. knots.Select(k => k.Sample)];
        _hz = [.. knots.Select(k => k.Hz)];
    }

    /// <summary>The track's value at decimated sample <paramref name="n"/>, Hz.</summary>
    public double At(long n)
    {
        if (n <= _at[0])
            return _hz[0];
        if (n >= _at[^1])
            return _hz[^1];
        int k = Array.BinarySearch(_at, n);
        if (k >= 0)
            return _hz[k];
        k = ~k; // _at[k - 1] < n < _at[k]
        double w = (double)(n - _at[k - 1]) / (_at[k] - _at[k - 1]);
        return _hz[k - 1] + w * (_hz[k] - _hz[k - 1]);
    }

    /// <summary>Subtracts the track from <paramref name="f"/>, whose first sample is stream index
    /// <paramref name="first"/>.</summary>
    public void Subtract(long first, Span<double> f)
    {
        for (int i = 0; i < f.Length; i++)
            f[i] -= At(first + i);
    }
}
