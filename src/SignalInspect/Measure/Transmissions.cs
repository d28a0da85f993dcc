using SignalInspect.Demodulation;

namespace SignalInspect.Measure;

/// <summary>One carrier-on interval of a capture; <see cref="Result"/> its own measurements when the capture was
/// measured transmission by transmission.</summary>
/// <param name="StartS">Key-up, seconds from the capture's first sample (the window's start when the carrier was
/// already on).</param>
/// <param name="EndS">Key-down, seconds (the window's end when the carrier was still on).</param>
/// <param name="Result">Its own analysis, when the capture was measured transmission by transmission.</param>
public sealed record Transmission(double StartS, double EndS, AnalysisResult? Result = null)
{
    /// <summary>Its duration, s.</summary>
    public double DurationS => EndS - StartS;

    /// <summary>Whether the key-up itself is in the capture (the carrier was off before it).</summary>
    public bool KeyUpSeen { get; init; }

    /// <summary>Whether the key-down itself is in the capture (the carrier was off after it).</summary>
    public bool KeyDownSeen { get; init; }

    /// <summary>The frequency at key-up, when measured (<see cref="TransientMeasurement"/>).</summary>
    public KeyTransient? KeyUp { get; init; }

    /// <summary>The frequency at key-down, when measured.</summary>
    public KeyTransient? KeyDown { get; init; }
}

/// <summary>
/// Finds the transmissions in the channel's power against time (<see cref="PassResult.Blocks"/>, blocks of
/// about 1 ms): a carrier is on from the block where the power rises <see cref="OnDb"/> above the channel's noise
/// until it falls below <see cref="OffDb"/> above it (hysteresis). Gaps shorter than <see cref="MinOffS"/> are
/// bridged (a fade, a syllable of AM, a keyed data burst's zeros) and transmissions shorter than
/// <see cref="MinOnS"/> dropped. Basis of the thresholds: a block of B decimated samples of complex Gaussian noise
/// has a power of mean Pn and relative spread 1 / sqrt(B) (chi-square with 2B degrees of freedom); at B = 12 (the
/// narrowest channel's 12 kHz rate) a block exceeds 2 Pn (+3 dB) with probability 0.25 % and 4 Pn (+6 dB)
/// 1.4e-10 (gamma survival function, shape 12, scale 1/12: scipy.stats.gamma.sf). So noise alone does not key
/// up, and a carrier 6 dB over the noise (block power about 5 Pn) does not key down. A carrier weaker than 6 dB
/// over the channel's noise is not found: the capture is then measured whole.
/// </summary>
public static class TransmissionFinder
{
    /// <summary>Key-up threshold over the channel's noise power, dB.</summary>
    public const double OnDb = 6;

    /// <summary>Key-down threshold over the channel's noise power, dB.</summary>
    public const double OffDb = 3;

    /// <summary>Shortest gap that separates two transmissions, s (shorter ones are bridged).</summary>
    public const double MinOffS = 0.2;

    /// <summary>Shortest transmission kept, s.</summary>
    public const double MinOnS = 0.05;

    /// <summary>A transmission's steady figures leave out this much after its key-up, s (a synthesiser settling
    /// from a key-up excursion would otherwise read as modulation; the key-up itself is measured apart,
    /// <see cref="TransientMeasurement"/>), at most a quarter of the transmission.</summary>
    public const double SteadyAfterKeyUpS = 0.05;

    /// <summary>And this much before its key-down, s, at most a tenth of the transmission.</summary>
    public const double SteadyBeforeKeyDownS = 0.01;

    /// <summary>The part of <paramref name="t"/> its steady figures are measured over: from
    /// <see cref="SteadyAfterKeyUpS"/> after a key-up seen to <see cref="SteadyBeforeKeyDownS"/> before a key-down
    /// seen.</summary>
    public static (double StartS, double EndS) Steady(Transmission t)
    {
        double a = t.KeyUpSeen ? Math.Min(SteadyAfterKeyUpS, 0.25 * t.DurationS) : 0,
            b = t.KeyDownSeen ? Math.Min(SteadyBeforeKeyDownS, 0.1 * t.DurationS) : 0;
        return (t.StartS + a, t.EndS - b);
    }

    /// <summary>At most this many transmissions are measured one by one; a capture with more (a slowly keyed carrier,
    /// a pulse train) is measured whole.</summary>
    public const int MaxMeasured = 32;

    /// <summary>Whether a window of <paramref name="windowS"/> seconds holding <paramref name="found"/> is to be
    /// measured transmission by transmission: it has between one and <see cref="MaxMeasured"/> of them and at least
    /// <see cref="MinOffS"/> of carrier-off time.</summary>
    public static bool Splits(IReadOnlyList<Transmission> found, double windowS) =>
        found.Count is >= 1 and <= MaxMeasured && windowS - found.Sum(t => t.DurationS) >= MinOffS;

    /// <summary>
    /// The transmissions in <paramref name="blockPower"/> (blocks of <paramref name="blockS"/> seconds, the first
    /// starting at <paramref name="startS"/>, the window ending at <paramref name="endS"/>), over a channel noise
    /// power of <paramref name="noisePower"/>. Blocks not measured (NaN: the filters settling at the window's ends)
    /// are unknown, not off: a carrier on at the first measured block is taken as on from the window's start, and
    /// one on at the last to its end.
    /// </summary>
    public static IReadOnlyList<Transmission> Find(
        IReadOnlyList<double> blockPower,
        double blockS,
        double startS,
        double endS,
        double noisePower
    )
    {
        int firstCounted = FirstCounted(blockPower),
            lastCounted = LastCounted(blockPower);
        double on = noisePower * Math.Pow(10, OnDb / 10),
            off = noisePower * Math.Pow(10, OffDb / 10);
        var raw = new List<(int First, int End)>();
        int begin = -1;
        for (int b = 0; b < blockPower.Count; b++)
        {
            double p = blockPower[b];
            if (double.IsNaN(p))
                continue;
            if (begin < 0 && p > on)
                begin = b;
            else if (begin >= 0 && p < off)
            {
                raw.Add((begin, b));
                begin = -1;
            }
        }
        if (begin >= 0)
            raw.Add((begin, lastCounted + 1));
        // Bridge short gaps, then drop short transmissions.
        var joined = new List<(int First, int End)>();
        foreach (var t in raw)
            if (joined.Count > 0 && (t.First - joined[^1].End) * blockS < MinOffS)
                joined[^1] = (joined[^1].First, t.End);
            else
                joined.Add(t);
        return
        [
            .. joined
                .Where(t => (t.End - t.First) * blockS >= MinOnS)
                .Select(t => new Transmission(
                    t.First == firstCounted ? startS : startS + t.First * blockS,
                    t.End == lastCounted + 1 ? endS : Math.Min(endS, startS + t.End * blockS)
                )
                {
                    KeyUpSeen = t.First != firstCounted,
                    KeyDownSeen = t.End != lastCounted + 1,
                }),
        ];
    }

    /// <summary>The index of the longest of <paramref name="list"/> (the first among equals); its figures stand for a
    /// capture measured transmission by transmission.</summary>
    public static int Longest(IReadOnlyList<Transmission> list)
    {
        int longest = 0;
        for (int i = 1; i < list.Count; i++)
            if (list[i].DurationS > list[longest].DurationS)
                longest = i;
        return longest;
    }

    private static int FirstCounted(IReadOnlyList<double> p)
    {
        for (int b = 0; b < p.Count; b++)
            if (!double.IsNaN(p[b]))
                return b;
        return -1;
    }

    private static int LastCounted(IReadOnlyList<double> p)
    {
        for (int b = p.Count - 1; b >= 0; b--)
            if (!double.IsNaN(p[b]))
                return b;
        return -1;
    }
}
