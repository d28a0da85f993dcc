using SignalInspect.Dsp;

namespace SignalInspect.Measure;

/// <summary>A digital code squelch word found under the modulation.</summary>
/// <param name="Code">The code number (its nine code bits), e.g. 0x13 for "023".</param>
/// <param name="Inverted">True for an inverted word (every bit complemented).</param>
/// <param name="Standard">Whether the code is one of the 83 standard codes
/// (<see cref="DcsCode.StandardCodes"/>).</param>
/// <param name="SameSignal">Every other code and polarity whose word is a rotation of this one (the same signal on
/// the air: a receiver cannot tell them apart), e.g. "340N", "047I".</param>
/// <param name="Correlation">The bits' normalised correlation with the word, -1 to 1 (1: every bit agrees at full
/// level).</param>
/// <param name="Words">Whole words' worth of bits read.</param>
/// <param name="BitErrors">Bits that disagree with the word after a hard decision, of <paramref name="Bits"/>.</param>
/// <param name="Bits">Bits read.</param>
/// <param name="LevelHz">The mean magnitude of the bits' values, Hz: the word's deviation for unfiltered bits (a
/// transmitter's filtering of the bits makes it read low).</param>
public sealed record DigitalCode(
    int Code,
    bool Inverted,
    bool Standard,
    IReadOnlyList<string> SameSignal,
    double Correlation,
    int Words,
    int BitErrors,
    int Bits,
    double LevelHz
)
{
    /// <summary>How long the turn-off code (a 134.4 Hz tone in place of the word) lasts at the end of the last
    /// stretch read, s; null when none was found.</summary>
    public double? TurnOffS { get; init; }

    /// <summary>The word's ones less its zeros (the inverted word's when inverted).</summary>
    public int Balance => 2 * int.PopCount(DcsCode.Word(Code, Inverted)) - DcsCode.WordBits;

    /// <summary>How far the word moves the carrier's mean frequency, Hz: its balance over 23 times
    /// <see cref="LevelHz"/> (the frequency modulator passes the word's mean).</summary>
    public double MeanShiftHz => Balance * LevelHz / DcsCode.WordBits;

    /// <summary>A note on the mean shift when the word is unbalanced, or null.</summary>
    public string? MeanShiftNote() =>
        Balance == 0
            ? null
            : FormattableString.Invariant(
                $"the code squelch word {Name} holds {(DcsCode.WordBits + Balance) / 2} ones and "
            )
                + FormattableString.Invariant(
                    $"{(DcsCode.WordBits - Balance) / 2} zeros: it moves the carrier's mean frequency by about "
                )
                + FormattableString.Invariant($"{MeanShiftHz:+0.#;-0.#} Hz ({Balance:+0;-0} / 23 of its ")
                + FormattableString.Invariant($"{LevelHz:0} Hz deviation); the carrier offset given is the mean ")
                + "frequency, which includes that shift";

    /// <summary>The code as radios print it: three octal digits and N (normal) or I (inverted).</summary>
    public string Name => DcsCode.Name(Code, Inverted);
}

/// <summary>
/// Reads a digital code squelch word from the demodulated frequency against time (block means, see
/// <see cref="Demodulation.BlockStats.Freq"/>): each stretch is averaged over one bit at the bit timing that opens
/// the eye most (found again every <see cref="ChunkWords"/> words, so a clock a little off the nominal rate does
/// not smear the bits), the bit values are folded modulo 23 (a word repeats every 23 bits, at an unknown
/// alignment), and the fold is correlated with every code's word at every rotation, both polarities. The best
/// code is given only when its correlation reaches <see cref="MinCorrelation"/> over at least
/// <see cref="MinWords"/> words and stands clear of the best unrelated word by <see cref="MinMargin"/>: a tone,
/// voice or noise folds towards zero (23 is odd: even a tone at half the bit rate cancels in the fold).
/// </summary>
internal static class DcsDecoder
{
    /// <summary>Correlation needed, 0 to 1 (a clean word reads about 1; noise, a tone or voice well under
    /// 0.4).</summary>
    public const double MinCorrelation = 0.6;

    /// <summary>Correlation by which the best word must lead the best word of another rotation class (two words of
    /// the Golay code differ in at least 7 bits: a clean capture leads by about 0.6).</summary>
    public const double MinMargin = 0.2;

    /// <summary>Fewest words read.</summary>
    public const int MinWords = 4;

    /// <summary>Words per timing chunk.</summary>
    public const int ChunkWords = 10;

    private const int Phases = 16;

    private static readonly int[] Words = [.. Enumerable.Range(0, 512).Select(c => DcsCode.Word(c))];

    /// <summary>Each code's rotation class, normal and inverted.</summary>
    private static readonly int[] NormalClass = [.. Words.Select(DcsCode.Class)],
        InvertedClass = [.. Enumerable.Range(0, 512).Select(c => DcsCode.Class(DcsCode.Word(c, true)))];

    /// <summary>The code read from the blocks' mean frequency (blocks of <paramref name="blockS"/> seconds, the first
    /// at <paramref name="startS"/>) while the transmissions <paramref name="on"/> last (throughout when none is
    /// given), or null when none is read with confidence.</summary>
    public static DigitalCode? Decode(
        Demodulation.BlockStats blocks,
        double blockS,
        double startS,
        IReadOnlyList<Transmission> on
    )
    {
        double[] freq = blocks.Freq;
        (int, int)[] segments =
            on.Count == 0
                ? [(0, freq.Length - 1)]
                :
                [
                    .. on.Select(t =>
                        (
                            (int)Math.Ceiling((t.StartS - startS) / blockS),
                            (int)Math.Floor((t.EndS - startS) / blockS) - 1
                        )
                    ),
                ];
        double bitBlocks = 1 / (DcsCode.BitRateHz * blockS);
        if (!(bitBlocks >= 2))
            return null; // blocks too long to hold the bits
        var chunks = new List<double[]>();
        foreach (var (first, last) in segments)
            chunks.AddRange(BitChunks(freq, Math.Max(0, first), Math.Min(freq.Length - 1, last), bitBlocks));
        int bits = chunks.Sum(c => c.Length);
        if (bits < MinWords * DcsCode.WordBits)
            return null;
        // Each code's best signed score per chunk, summed: positive for the normal word, negative for the inverted.
        double[] normal = new double[512],
            inverted = new double[512];
        double level = 0;
        foreach (double[] v in chunks)
        {
            double[] fold = Fold(v);
            level += v.Sum(Math.Abs);
            for (int c = 0; c < 512; c++)
            {
                var (max, min) = Scores(fold, Words[c]);
                normal[c] += max;
                inverted[c] -= min;
            }
        }
        if (!(level > 0))
            return null;
        int best = -1;
        bool bestInv = false;
        double bestScore = double.NegativeInfinity;
        for (int c = 0; c < 512; c++)
        {
            if (normal[c] > bestScore)
                (best, bestInv, bestScore) = (c, false, normal[c]);
            if (inverted[c] > bestScore)
                (best, bestInv, bestScore) = (c, true, inverted[c]);
        }
        int bestClass = bestInv ? InvertedClass[best] : NormalClass[best];
        double second = double.NegativeInfinity;
        for (int c = 0; c < 512; c++)
        {
            if (normal[c] > second && NormalClass[c] != bestClass)
                second = normal[c];
            if (inverted[c] > second && InvertedClass[c] != bestClass)
                second = inverted[c];
        }
        double rho = bestScore / level,
            rho2 = second / level;
        if (rho < MinCorrelation || rho - rho2 < MinMargin)
            return null;
        var same = DcsCode.SameSignal(DcsCode.Word(best, bestInv));
        var (code, inv) = same[0];
        int word = DcsCode.Word(code, inv);
        int errors = chunks.Sum(v => Errors(v, word));
        var (lastFirst, lastLast) = segments[^1];
        double? turnOff = TurnOff(
            freq,
            Math.Max(0, lastFirst),
            Math.Min(freq.Length - 1, lastLast),
            blockS,
            level / bits
        );
        return new DigitalCode(
            code,
            inv,
            DcsCode.IsStandard(code),
            [.. same.Skip(1).Select(x => DcsCode.Name(x.Code, x.Inverted))],
            rho,
            bits / DcsCode.WordBits,
            errors,
            bits,
            level / bits
        )
        {
            TurnOffS = turnOff,
        };
    }

    /// <summary>Longest turn-off code looked for, s.</summary>
    public const double TurnOffLookS = 0.5;

    /// <summary>
    /// The turn-off code at the end of a stretch: a 134.4 Hz tone in place of the word (a forum account of the
    /// practice, testdata/REFERENCE-VALUES.md). A word of bits at 134.4 bit/s holds nothing at 134.4 Hz (its spectrum's
    /// null at the bit rate), so the tone's level there, read over four of its periods, stands out: the stretch
    /// reaching the end where that level holds at least a quarter of the word's bit level (a tone of half the word's
    /// deviation), for at least 40 ms; null when none.
    /// </summary>
    private static double? TurnOff(double[] freq, int first, int last, double blockS, double wordLevelHz)
    {
        int m = Math.Max(1, (int)Math.Round(4 / DcsCode.BitRateHz / blockS)),
            look = (int)(TurnOffLookS / blockS);
        if (last - first < 2 * look || !(wordLevelHz > 0))
            return null;
        var tone = new BlockTone(freq, first, last, blockS, DcsCode.BitRateHz);
        int end = last;
        for (int i = last; i > last - look && i - m + 1 >= first; i--)
        {
            if (tone.Over(i - m + 1, i + 1).Level < wordLevelHz / 4)
                break;
            end = i - m / 2; // the window's middle: the tone fills at least half of it
        }
        double duration = (freq.Length - end) * blockS;
        return end < last && duration >= 0.04 ? duration : null;
    }

    /// <summary>The stretch's bit values (its mean taken off, each the mean over one bit) in chunks of
    /// <see cref="ChunkWords"/> words, each chunk at the bit timing that maximises the mean magnitude.</summary>
    private static IEnumerable<double[]> BitChunks(double[] freq, int first, int last, double bitBlocks)
    {
        int n = last - first + 1;
        if (n < 2 * bitBlocks)
            yield break;
        double mean = BlockTone.FiniteMean(freq, first, last);
        // Running integral of the piecewise-constant block values (a block not measured counts as the mean).
        double[] sum = new double[n + 1];
        for (int i = 0; i < n; i++)
            sum[i + 1] = sum[i] + (double.IsFinite(freq[first + i]) ? freq[first + i] - mean : 0);
        double At(double u)
        {
            int k = Math.Clamp((int)Math.Floor(u), 0, n - 1);
            return sum[k] + (u - k) * (sum[k + 1] - sum[k]);
        }
        int chunkBits = ChunkWords * DcsCode.WordBits;
        for (double start = 0; start + 2 * bitBlocks <= n; start += chunkBits * bitBlocks)
        {
            int count = (int)Math.Min(chunkBits, Math.Floor((n - start) / bitBlocks) - 1);
            if (count < DcsCode.WordBits)
                yield break;
            double[]? bestBits = null;
            double bestOpen = -1;
            for (int p = 0; p < Phases; p++)
            {
                double phase = start + p * bitBlocks / Phases;
                double[] v = new double[count];
                double open = 0;
                for (int k = 0; k < count; k++)
                {
                    double a = phase + k * bitBlocks;
                    v[k] = (At(a + bitBlocks) - At(a)) / bitBlocks;
                    open += Math.Abs(v[k]);
                }
                if (open > bestOpen)
                    (bestOpen, bestBits) = (open, v);
            }
            yield return bestBits!;
        }
    }

    /// <summary>The bit values summed modulo 23.</summary>
    private static double[] Fold(double[] v)
    {
        double[] f = new double[DcsCode.WordBits];
        for (int k = 0; k < v.Length; k++)
            f[k % DcsCode.WordBits] += v[k];
        return f;
    }

    /// <summary>The fold's largest and smallest correlation with the word's rotations (a 1 bit counted +1, a 0 bit
    /// -1).</summary>
    private static (double Max, double Min) Scores(double[] fold, int word)
    {
        double max = double.NegativeInfinity,
            min = double.PositiveInfinity;
        for (int o = 0; o < DcsCode.WordBits; o++)
        {
            int w = DcsCode.Rotate(word, o);
            double s = 0;
            for (int j = 0; j < DcsCode.WordBits; j++)
                s += (w >> j & 1) != 0 ? fold[j] : -fold[j];
            max = Math.Max(max, s);
            min = Math.Min(min, s);
        }
        return (max, min);
    }

    /// <summary>Bits of the chunk whose sign disagrees with the word at its best rotation.</summary>
    private static int Errors(double[] v, int word)
    {
        int best = int.MaxValue;
        for (int o = 0; o < DcsCode.WordBits; o++)
        {
            int w = DcsCode.Rotate(word, o),
                e = 0;
            for (int k = 0; k < v.Length; k++)
                if ((v[k] > 0) != ((w >> (k % DcsCode.WordBits) & 1) != 0))
                    e++;
            best = Math.Min(best, e);
        }
        return best;
    }
}
