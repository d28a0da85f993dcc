using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;

namespace SignalInspect.Dsp;

/// <summary>
/// A fixed-range histogram of a stream of values with bounded memory, for percentiles of long
/// signals (envelope, instantaneous frequency, phase). Values outside the range are counted in
/// the first or last bin. Percentiles interpolate linearly within a bin.
/// </summary>
/// <remarks>
/// The counts are kept as 32-bit integers, half the memory (and cache) of 64-bit ones: a block
/// insert touches one counter per value, so the counters in use should stay in the cache. Before
/// they could overflow, they are added into 64-bit totals (made only then) and start again from
/// zero, so the counts are exact however many values arrive.
/// </remarks>
public sealed class Histogram
{
    private readonly uint[] _counts; // one slot more than the bins: NaN lands there and is not counted
    private long[]? _totals; // counts moved out of _counts before they could overflow
    private long _held; // values (NaN included) put into _counts since it was last emptied
    private readonly int _bins;
    private readonly double _lo,
        _width;

    // The bins that can hold counts, [_first, _last] (empty while _last < _first): merging and
    // percentiles visit only these, so the untouched part of a wide histogram is never paged in.
    private int _first = int.MaxValue,
        _last = -1;

    /// <summary>Creates a histogram of <paramref name="bins"/> bins over [<paramref name="lo"/>, <paramref
    /// name="hi"/>).</summary>
    public Histogram(double lo, double hi, int bins)
    {
        if (!(hi > lo))
            throw new ArgumentOutOfRangeException(nameof(hi), hi, "must be above lo");
        ArgumentOutOfRangeException.ThrowIfLessThan(bins, 2);
        _counts = new uint[bins + 1];
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
    public long this[int bin] => _counts[bin] + (_totals is null ? 0 : _totals[bin]);

    /// <summary>How many values the 32-bit counters take before they are moved into the totals (lower in
    /// tests).</summary>
    internal long HoldLimit { get; init; } = uint.MaxValue;

    /// <summary>Moves the 32-bit counts into the 64-bit totals if <paramref name="more"/> values could overflow
    /// them.</summary>
    private void MakeRoom(long more)
    {
        if (_held + more <= HoldLimit)
            return;
        _totals ??= new long[_bins];
        for (int b = _first; b <= _last; b++)
        {
            _totals[b] += _counts[b];
            _counts[b] = 0;
        }
        _counts[_bins] = 0;
        _held = 0;
    }

    /// <summary>Centre of a bin.</summary>
    public double Centre(int bin) => _lo + (bin + 0.5) * _width;

    /// <summary>Adds a value (NaN is ignored).</summary>
    public void Add(double v)
    {
        if (double.IsNaN(v))
            return;
        int b = (int)Math.Clamp(Math.Floor((v - _lo) / _width), 0, _bins - 1);
        MakeRoom(1);
        _held++;
        _counts[b]++;
        Count++;
        if (b < _first)
            _first = b;
        if (b > _last)
            _last = b;
    }

    /// <summary>Adds every value of a block (NaN is ignored); the same counts as <see cref="Add(double)"/> one by
    /// one.</summary>
    public void Add(ReadOnlySpan<double> values)
    {
        int n = values.Length,
            w = Vector<double>.Count,
            i = 0,
            last = _bins - 1;
        MakeRoom(n);
        _held += n - n % w; // the vector part (NaN included); the rest goes through Add(double)
        uint nanBefore = _counts[_bins];
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
            ref uint c = ref MemoryMarshal.GetArrayDataReference(_counts);
            Vector<double> low = new(_bins),
                high = new(-1.0); // the range of the bins counted (NaN lanes left out)
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
                for (int l = 0; l < bins.Length; l++)
                    Unsafe.Add(ref c, (nint)bins[l])++;
            }
            for (int l = 0; l < w; l++)
            {
                if (low[l] < _first)
                    _first = (int)low[l];
                if (high[l] > _last)
                    _last = (int)high[l];
            }
            i = vv.Length * w;
        }
        Count += i - (_counts[_bins] - nanBefore); // unsigned difference: right even if the NaN slot wrapped
        for (; i < n; i++)
            Add(values[i]);
    }

    /// <summary>Adds the counts of a histogram of the same range and bins.</summary>
    /// <exception cref="ArgumentException">The histograms differ in range or bins.</exception>
    public void Add(Histogram other)
    {
        if (other._counts.Length != _counts.Length || other._lo != _lo || other._width != _width)
            throw new ArgumentException("the histograms differ in range or bins");
        MakeRoom(other._held);
        for (int i = other._first; i <= other._last; i++)
            _counts[i] += other._counts[i];
        _held += other._held;
        if (other._totals is not null)
        {
            _totals ??= new long[_bins];
            for (int i = other._first; i <= other._last; i++)
                _totals[i] += other._totals[i];
        }
        Count += other.Count;
        _first = Math.Min(_first, other._first);
        _last = Math.Max(_last, other._last);
    }

    /// <summary>The value below which a fraction <paramref name="p"/> (0 to 1) of the values lie.</summary>
    public double Percentile(double p)
    {
        if (Count == 0)
            return double.NaN;
        double target = Math.Clamp(p, 0, 1) * Count;
        long cum = 0;
        for (int b = _first; b <= _last; b++)
        {
            long c = this[b];
            if (cum + c >= target && c > 0)
            {
                double frac = (target - cum) / c;
                return _lo + (b + frac) * _width;
            }
            cum += c;
        }
        return _lo + _bins * _width;
    }

    /// <summary>The upper edge of the highest occupied bin: the largest value, read up to one bin high, never low;
    /// NaN when empty.</summary>
    public double Max => Count == 0 ? double.NaN : _lo + (_last + 1) * _width;

    /// <summary>The lower edge of the lowest occupied bin: the smallest value, read up to one bin low.</summary>
    public double Min => Count == 0 ? double.NaN : _lo + _first * _width;

    /// <summary>Fraction of the values within [<paramref name="a"/>, <paramref name="b"/>].</summary>
    public double FractionBetween(double a, double b)
    {
        if (Count == 0)
            return 0;
        int i0 = (int)Math.Clamp(Math.Floor((a - _lo) / _width), 0, _bins - 1);
        int i1 = (int)Math.Clamp(Math.Floor((b - _lo) / _width), 0, _bins - 1);
        long s = 0;
        for (int i = i0; i <= i1; i++)
            s += this[i];
        return (double)s / Count;
    }
}
