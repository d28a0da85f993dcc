using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace SignalInspect.Measure;

/// <summary>
/// A fixed-range histogram of a stream of values with bounded memory, for percentiles of long
/// signals (envelope, instantaneous frequency, phase). Values outside the range are counted in
/// the first or last bin. Percentiles interpolate linearly within a bin.
/// </summary>
public sealed class Histogram
{
    private readonly long[] _counts;   // one slot more than the bins: NaN lands there and is not counted
    private readonly int _bins;
    private readonly double _lo, _width;
    // The bins that can hold counts, [_first, _last] (empty while _last < _first): merging and
    // percentiles visit only these, so the untouched part of a wide histogram is never paged in.
    private int _first = int.MaxValue, _last = -1;

    /// <summary>Creates a histogram of <paramref name="bins"/> bins over [<paramref name="lo"/>, <paramref name="hi"/>).</summary>
    public Histogram(double lo, double hi, int bins)
    {
        if (!(hi > lo)) throw new ArgumentOutOfRangeException(nameof(hi), hi, "must be above lo");
        ArgumentOutOfRangeException.ThrowIfLessThan(bins, 2);
        _counts = new long[bins + 1];
        _bins = bins;
        _lo = lo;
        _width = (hi - lo) / bins;
    }

    /// <summary>Values counted.</summary>
    public long Count { get; private set; }

    /// <summary>Lower end of the range.</summary>
    public double Low => _lo;

    /// <summary>Bin width.</summary>
    public double BinWidth => _width;

    /// <summary>Number of bins.</summary>
    public int Bins => _bins;

    /// <summary>Count of a bin.</summary>
    public long this[int bin] => _counts[bin];

    /// <summary>Centre of a bin.</summary>
    public double Centre(int bin) => _lo + (bin + 0.5) * _width;

    /// <summary>Adds a value (NaN is ignored).</summary>
    public void Add(double v)
    {
        if (double.IsNaN(v)) return;
        int b = (int)Math.Clamp(Math.Floor((v - _lo) / _width), 0, _bins - 1);
        _counts[b]++;
        Count++;
        if (b < _first) _first = b;
        if (b > _last) _last = b;
    }

    /// <summary>Adds every value of a block (NaN is ignored); the same counts as <see cref="Add(double)"/> one by one.</summary>
    public void Add(ReadOnlySpan<double> values)
    {
        int n = values.Length, w = Vector<double>.Count, i = 0, last = _bins - 1;
        long nanBefore = _counts[_bins];
        if (Vector.IsHardwareAccelerated && n >= w)
        {
            var lo = new Vector<double>(_lo);
            var inv = new Vector<double>(1 / _width);
            var top = new Vector<double>(last);
            var nanSlot = new Vector<double>(_bins);
            // An integral double 0 <= f < 2^52 plus 2^52 holds f in its low mantissa bits: the
            // conversion to integers without a double-to-int64 instruction (AVX-512DQ has one; AVX2 has not).
            var magic = new Vector<double>(4503599627370496.0);
            var magicBits = Vector.AsVectorInt64(magic);
            Span<long> bins = stackalloc long[w];
            ReadOnlySpan<Vector<double>> vv = MemoryMarshal.Cast<double, Vector<double>>(values);
            ref long c = ref MemoryMarshal.GetArrayDataReference(_counts);
            Vector<double> low = new(_bins), high = new(-1.0);   // the range of the bins counted (NaN lanes left out)
            for (int v = 0; v < vv.Length; v++)
            {
                Vector<double> x = vv[v];
                // Bin in [0, last] as a double (NaN to the extra slot), then to integers.
                Vector<double> f = Vector.Min(Vector.Max(Vector.Floor((x - lo) * inv), Vector<double>.Zero), top);
                Vector<long> real = Vector.Equals(x, x);
                low = Vector.Min(low, Vector.ConditionalSelect(real, f, nanSlot));
                high = Vector.Max(high, Vector.ConditionalSelect(real, f, -Vector<double>.One));
                f = Vector.ConditionalSelect(real, f, nanSlot);
                (Vector.AsVectorInt64(f + magic) - magicBits).CopyTo(bins);
                for (int l = 0; l < bins.Length; l++) Unsafe.Add(ref c, (nint)bins[l])++;
            }
            for (int l = 0; l < w; l++)
            {
                if (low[l] < _first) _first = (int)low[l];
                if (high[l] > _last) _last = (int)high[l];
            }
            i = vv.Length * w;
        }
        Count += i - (_counts[_bins] - nanBefore);
        for (; i < n; i++) Add(values[i]);
    }

    /// <summary>Adds the counts of a histogram of the same range and bins.</summary>
    /// <exception cref="ArgumentException">The histograms differ in range or bins.</exception>
    public void Add(Histogram other)
    {
        if (other._counts.Length != _counts.Length || other._lo != _lo || other._width != _width)
            throw new ArgumentException("the histograms differ in range or bins");
        for (int i = other._first; i <= other._last; i++) _counts[i] += other._counts[i];
        Count += other.Count;
        _first = Math.Min(_first, other._first);
        _last = Math.Max(_last, other._last);
    }

    /// <summary>The value below which a fraction <paramref name="p"/> (0 to 1) of the values lie.</summary>
    public double Percentile(double p)
    {
        if (Count == 0) return double.NaN;
        double target = Math.Clamp(p, 0, 1) * Count;
        long cum = 0;
        for (int b = _first; b <= _last; b++)
        {
            if (cum + _counts[b] >= target && _counts[b] > 0)
            {
                double frac = (target - cum) / _counts[b];
                return _lo + (b + frac) * _width;
            }
            cum += _counts[b];
        }
        return _lo + _bins * _width;
    }

    /// <summary>Fraction of the values within [<paramref name="a"/>, <paramref name="b"/>].</summary>
    public double FractionBetween(double a, double b)
    {
        if (Count == 0) return 0;
        int i0 = (int)Math.Clamp(Math.Floor((a - _lo) / _width), 0, _bins - 1);
        int i1 = (int)Math.Clamp(Math.Floor((b - _lo) / _width), 0, _bins - 1);
        long s = 0;
        for (int i = i0; i <= i1; i++) s += _counts[i];
        return (double)s / Count;
    }
}
