namespace SignalInspect.Dsp;

/// <summary>
/// The digital code squelch (DCS) word: 23 bits sent repeatedly at 134.4 bit/s, least significant bit first: nine
/// code bits (the octal code number), the fixed bits 0, 0, 1, then eleven parity bits of the cyclic Golay (23, 12)
/// code of generator x^11 + x^10 + x^6 + x^5 + x^4 + x^2 + 1 (testdata/REFERENCE-VALUES.md names the sources; the
/// parity is tested against published parity equations for all 512 codes). A rotation of a word is another valid
/// word, so a decoder reads the word at any alignment; inverting a word gives the word of another code.
/// </summary>
public static class DcsCode
{
    /// <summary>Bits per second.</summary>
    public const double BitRateHz = 134.4;

    /// <summary>Bits per word.</summary>
    public const int WordBits = 23;

    /// <summary>Words per second (the word's lines lie at its multiples).</summary>
    public const double WordRateHz = BitRateHz / WordBits;

    /// <summary>The generator polynomial, bit i the coefficient of x^i.</summary>
    public const int Generator = 0xC75;

    private const int AllOnes = (1 << WordBits) - 1;

    /// <summary>The 83 standard codes (TIA-603-E, as listed in testdata/REFERENCE-VALUES.md), octal.</summary>
    public static readonly IReadOnlyList<int> StandardCodes = Octal(
        "023 025 026 031 032 043 047 051 054 065 071 072 073 074 114 115 116 125 131 132 134 143 152 155 156 162 165 "
            + "172 174 205 223 226 243 244 245 251 261 263 265 271 306 311 315 331 343 346 351 364 365 371 411 412 413 "
            + "423 431 432 445 464 465 466 503 506 516 532 546 565 606 612 624 627 631 632 654 662 664 703 712 723 731 "
            + "732 734 743 754"
    );

    private static readonly HashSet<int> Standards = [.. StandardCodes];

    /// <summary>Whether <paramref name="code"/> is one of <see cref="StandardCodes"/>.</summary>
    public static bool IsStandard(int code) => Standards.Contains(code);

    /// <summary>The 23-bit word of a code (0 to 511), bit 0 sent first; every bit complemented when
    /// <paramref name="inverted"/>.</summary>
    public static int Word(int code, bool inverted = false)
    {
        if (code is < 0 or > 511)
            throw new ArgumentOutOfRangeException(nameof(code), code, "a code has nine bits (000 to 777 octal)");
        int data = code | (1 << 11);
        // Systematic cyclic encoding with the data in the low twelve places: x^11 m(x) mod g(x) is the parity of the
        // word with the data on top; rotating that word by twelve places brings the data down and the parity up.
        int r = data << 11;
        for (int bit = 22; bit >= 11; bit--)
            if ((r >> bit & 1) != 0)
                r ^= Generator << (bit - 11);
        int word = data | (r << 12);
        return inverted ? ~word & AllOnes : word;
    }

    /// <summary>A word's rotation class: the smallest of its 23 rotations.</summary>
    public static int Class(int word)
    {
        int min = word;
        for (int k = 1; k < WordBits; k++)
            min = Math.Min(min, Rotate(word, k));
        return min;
    }

    /// <summary>The word rotated right by <paramref name="k"/> places (bit k comes to bit 0).</summary>
    public static int Rotate(int word, int k) => ((word >> k) | (word << (WordBits - k))) & AllOnes;

    /// <summary>The code as printed: three octal digits, N or I.</summary>
    public static string Name(int code, bool inverted) =>
        Convert.ToString(code, 8).PadLeft(3, '0') + (inverted ? "I" : "N");

    /// <summary>Every code and polarity whose word is a rotation of <paramref name="word"/>, standard codes and
    /// normal polarity first.</summary>
    public static IReadOnlyList<(int Code, bool Inverted)> SameSignal(int word)
    {
        int c = Class(word);
        var list = new List<(int, bool)>();
        for (int code = 0; code < 512; code++)
            foreach (bool inv in (bool[])[false, true])
                if (Class(Word(code, inv)) == c)
                    list.Add((code, inv));
        return [.. list.OrderBy(x => IsStandard(x.Item1) ? 0 : 1).ThenBy(x => x.Item2).ThenBy(x => x.Item1)];
    }

    private static int[] Octal(string list) =>
        [.. list.Split(' ', StringSplitOptions.RemoveEmptyEntries).Select(s => Convert.ToInt32(s, 8))];

    /// <summary>Parses a code as written: three octal digits, optionally followed by N or I.</summary>
    /// <returns>The code and polarity, or null when <paramref name="text"/> is not one.</returns>
    public static (int Code, bool Inverted)? Parse(string text)
    {
        string t = text.Trim().ToUpperInvariant();
        bool inverted = t.EndsWith('I');
        if (t.EndsWith('N') || inverted)
            t = t[..^1];
        if (t.Length is < 1 or > 3 || t.Any(ch => ch is < '0' or > '7'))
            return null;
        return (Convert.ToInt32(t, 8), inverted);
    }
}
