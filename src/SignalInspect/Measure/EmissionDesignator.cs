using System.Globalization;

namespace SignalInspect.Measure;

/// <summary>
/// Emission designators (ITU Radio Regulations Appendix 1; 47 CFR 2.201, 2.202): the necessary
/// bandwidth by the published formulas and its four-character code.
/// </summary>
public static class EmissionDesignator
{
    /// <summary>
    /// The bandwidth code: three significant figures with the letter H, K, M or G standing where
    /// the decimal point is (47 CFR 2.202(b)(3)); e.g. 400 Hz 400H, 2.4 kHz 2K40, 12.5 kHz 12K5,
    /// 180.5 kHz 181K, 1.25 MHz 1M25, 0.002 Hz H002.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Bandwidth not positive, or 1000 GHz or more.</exception>
    public static string BandwidthCode(double hz)
    {
        if (!(hz > 0) || hz >= 1e12)
            throw new ArgumentOutOfRangeException(nameof(hz), hz, "must be positive and below 1000 GHz");
        (double unit, char letter)[] units = [(1, 'H'), (1e3, 'K'), (1e6, 'M'), (1e9, 'G')];
        int u =
            hz < 1e3 ? 0
            : hz < 1e6 ? 1
            : hz < 1e9 ? 2
            : 3;
        while (true)
        {
            double v = hz / units[u].unit;
            // Three significant figures, halves rounded up (180.5 kHz -> 181K).
            int exp = v < 1 ? -1 : (int)Math.Floor(Math.Log10(v));
            double scale = Math.Pow(10, 2 - exp);
            double rounded = Math.Floor(v * scale + 0.5 + 1e-9) / scale;
            if (rounded >= 1000 && u < 3)
            {
                u++;
                continue;
            }
            char letter = units[u].letter;
            if (rounded < 1)
                return letter + ((int)Math.Round(rounded * 1000)).ToString("000", CultureInfo.InvariantCulture);
            string digits = (
                (int)Math.Round(rounded * Math.Pow(10, 2 - (int)Math.Floor(Math.Log10(rounded) + 1e-12)))
            ).ToString(CultureInfo.InvariantCulture);
            int intDigits = (int)Math.Floor(Math.Log10(rounded) + 1e-12) + 1;
            return digits[..intDigits] + letter + digits[intDigits..];
        }
    }

    /// <summary>FM or PM telephony/sound: Bn = 2M + 2DK, K = 1 (47 CFR 2.202(g)).</summary>
    public static double AngleModulationBandwidthHz(double modulatingHz, double peakDeviationHz, double k = 1) =>
        2 * modulatingHz + 2 * peakDeviationHz * k;

    /// <summary>Double-sideband AM: Bn = 2M (47 CFR 2.202(g)).</summary>
    public static double AmBandwidthHz(double modulatingHz) => 2 * modulatingHz;

    /// <summary>
    /// Binary FSK: Bn = 2M + 2DK with M = B/2 and K = 1.2 (47 CFR 2.202(g), frequency-shift
    /// telegraphy; the same as 2.4 D + R given for binary FSK data with 1 &lt; 2D/R &lt; 2).
    /// D is half the shift, B the symbol rate.
    /// </summary>
    public static double FskBandwidthHz(double symbolRateBd, double shiftHz) => symbolRateBd + 2 * (shiftHz / 2) * 1.2;

    /// <summary>The full designator for a measured modulation, or null when none applies (noise).</summary>
    /// <param name="kind">Modulation.</param>
    /// <param name="necessaryHz">Necessary bandwidth in Hz (ignored for CW).</param>
    public static string? Format(ModulationKind kind, double? necessaryHz)
    {
        string? cls = kind switch
        {
            ModulationKind.Cw => "N0N",
            ModulationKind.Am => "A3E",
            ModulationKind.Fm => "F3E",
            ModulationKind.Pm => "G3E",
            ModulationKind.Fsk => "F1D",
            _ => null,
        };
        if (cls is null)
            return null;
        if (kind == ModulationKind.Cw || necessaryHz is not { } bn || !(bn > 0))
            return kind == ModulationKind.Cw ? cls : null;
        return BandwidthCode(bn) + cls;
    }
}
