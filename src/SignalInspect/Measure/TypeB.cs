namespace SignalInspect.Measure;

/// <summary>
/// The type-B figures of the uncertainty budgets, each named once, with where it comes from. They
/// were set when the estimators were written, from the spread of the readings in the accuracy tests
/// (tests/SignalInspect.Tests/Measure/AccuracyTests.cs and ReferenceTests.cs: captures of known
/// parameters at 30 dB SNR, from numpy); they have not yet been checked by a Monte Carlo coverage
/// test across SNRs (the issue on real transmissions asks for one). Peak figures grow below 30 dB
/// SNR as <see cref="NoiseGrowth"/>.
/// </summary>
public static class TypeB
{
    /// <summary>SNR (linear, 30 dB) at and above which the peak figures hold as stated.</summary>
    public const double ReferenceSnr = 1000;

    /// <summary>SNR used for the growth is capped at this many dB.</summary>
    public const double GrowthSnrCapDb = 60;

    /// <summary>FM peak deviation: 0.05 % of the reading for the 99.9th-percentile statistic (the Monte Carlo of
    /// docs/COVERAGE.md scattered by 0.03-0.05 % at 50-60 dB SNR; 0.2 %, then 0.1 %, before it).</summary>
    public const double FmPeakFraction = 0.0005;

    /// <summary>
    /// The spread a noise-corrected peak keeps, as a share of the rms of the demodulated noise (in the band up to
    /// the post-detection cutoff): set from the Monte Carlo of docs/COVERAGE.md (tests/Benchmarks/Coverage.cs), where
    /// the one-tone FM readings scattered by 0.10-0.16 of it from 20 to 40 dB SNR and the AM depth by 0.20-0.23 (0.15
    /// and 0.25 first; 0.12 and 0.21 bring U = 2u to about 95 % over 20-60 dB).
    /// </summary>
    public const double FmCorrectedPeakNoiseShare = 0.12,
        AmCorrectedPeakNoiseShare = 0.21;

    /// <summary>
    /// The raw percentile of a sum of tones (no single-tone correction) is lifted by the noise, the more the larger
    /// the noise is beside the peak: its component is the demodulated noise's rms times
    /// <see cref="RawPeakNoiseShare"/> + <see cref="RawPeakNoiseGrowth"/> x (rms / peak). Set from the Monte Carlo of
    /// docs/COVERAGE.md (FM by 1.9 kHz at ~1 kHz plus 600 Hz at 118.8 Hz, 20-60 dB SNR), where the reading stood
    /// above the truth by 1.3 rms at 20 dB, 0.7 at 30 dB and 0.3 at 40 dB (the whole rms before it, which covered
    /// every trial).
    /// </summary>
    public const double RawPeakNoiseShare = 0.2,
        RawPeakNoiseGrowth = 8;

    /// <summary>PM peak phase: 0.3 % of the reading, beside the noise's share (<see cref="PmNoiseShare"/>).</summary>
    public const double PmPeakFraction = 0.003;

    /// <summary>PM peak phase, the noise's share: the reading times this over sqrt(SNR) (linear, in the occupied band;
    /// capped at <see cref="GrowthSnrCapDb"/>). Set from the Monte Carlo of docs/COVERAGE.md (PM of 1.2 rad by a tone
    /// near 1 kHz, 20-60 dB SNR), where the readings scattered by 1.3 % at 20 dB and 0.6 % at 30 dB: the
    /// growth of the peak figures below 30 dB alone (<see cref="NoiseGrowth"/>) covered 63-68 % there.</summary>
    public const double PmNoiseShare = 0.12;

    /// <summary>FSK shift: 0.3 % of the reading, beside the noise's share (<see cref="FskNoiseShare"/>).</summary>
    public const double FskShiftFraction = 0.003;

    /// <summary>
    /// FSK shift, the noise's share: the reading times <see cref="FskNoiseShare"/> x SNR^-<see cref="FskNoisePower"/>
    /// (linear SNR in the occupied band, capped at <see cref="GrowthSnrCapDb"/>). The shift is read from the modes of
    /// the instantaneous frequency's histogram, whose scatter falls more slowly than the noise's amplitude: the
    /// Monte Carlo of docs/COVERAGE.md (1 kHz shift at 1200 Bd, 20-60 dB SNR) scattered it by 4 % at 20 dB, 1.6 % at
    /// 30, 0.9 % at 40, 0.5 % at 50 and 0.3 % at 60; the 0.3 % fraction alone, grown below 30 dB, had covered 20-75 %
    /// of trials below 50 dB.
    /// </summary>
    public const double FskNoiseShare = 0.2,
        FskNoisePower = 0.35;

    /// <summary>The linear SNR of <paramref name="snrDb"/>, capped at <see cref="GrowthSnrCapDb"/>.</summary>
    public static double CappedSnr(double snrDb) => Math.Pow(10, Math.Min(snrDb, GrowthSnrCapDb) / 10);

    /// <summary>FSK carrier (the centre of the tones): 0.2 % of the shift.</summary>
    public const double FskCarrierFractionOfShift = 0.002;

    /// <summary>AM depth: 0.03 percentage points (the Monte Carlo of docs/COVERAGE.md scattered by 0.02-0.07 points at
    /// 50-60 dB SNR; 0.3, then 0.05, before it).</summary>
    public const double AmDepthPoints = 0.03;

    /// <summary>A floor of 0.1 mHz under the carrier's uncertainty, so that a noiseless synthetic capture does not
    /// report an uncertainty of zero (a numerical allowance, not a property of any receiver).</summary>
    public const double CarrierFloorHz = 1e-4;

    /// <summary>Occupied bandwidth: 0.2 % of the reading, beside the edges' resolution (each edge anywhere in the
    /// window's main lobe, rectangular: GUM 4.3.7). The Monte Carlo of docs/COVERAGE.md read single-tone FM 0.4 %
    /// low with a 0.1 % spread (the edge interpolated inside the last line's main lobe).</summary>
    public const double OccupiedFraction = 0.002;

    /// <summary>An occupied band's edge set on a spectral line: its interpolated frequency's spread, in bins. Hann:
    /// the Monte Carlo of docs/COVERAGE.md (single-tone FM, both edges on the fourth Bessel line, 20-60 dB SNR) read
    /// the bandwidth within +/- 0.04 of a bin (the log-parabolic interpolation's bounded bias); 2u covers 95 % of it
    /// (GUM G.2.3's k = 1.65 for a bounded spread, written as u = U95 / 2). Other windows: a tenth of a bin, not
    /// calibrated.</summary>
    public const double LineEdgeBins = 0.011,
        LineEdgeBinsOther = 0.1;

    /// <summary>Modulating frequency: the line spectrum's bin divided by this, at least <see cref="ToneFraction"/> of
    /// the reading. The Monte Carlo of docs/COVERAGE.md (tones drawn across a bin, 20-60 dB SNR) scattered the
    /// interpolated line within about +/- 0.004 of a bin, a bounded error: 2u is set to cover 95 % of it (GUM G.2.3's
    /// k = 1.65 for a rectangular spread, written as u = U95 / 2); a tenth of a bin, then 1/500, before it.</summary>
    public const double ToneBinDivisor = 600,
        ToneFraction = 1e-6;

    /// <summary>A carrier read from the Welch spectrum's line (on-off keying): a tenth of the bin (not calibrated by
    /// a Monte Carlo yet).</summary>
    public const double SpectralLineBinDivisor = 10;

    /// <summary>FSK symbol rate: the line spectrum's bin divided by this (a fifth of a bin), at least
    /// <see cref="SymbolRateFraction"/> of the reading.</summary>
    public const double SymbolRateBinDivisor = 5,
        SymbolRateFraction = 1e-4;

    /// <summary>
    /// How the peak figures grow at low SNR: max(1, sqrt(<see cref="ReferenceSnr"/> / SNR)), the
    /// SNR in the occupied bandwidth capped at <see cref="GrowthSnrCapDb"/> (a percentile's noise
    /// spread scales as the noise amplitude).
    /// </summary>
    public static double NoiseGrowth(double snrDb) =>
        Math.Max(1, Math.Sqrt(ReferenceSnr / Math.Pow(10, Math.Min(snrDb, GrowthSnrCapDb) / 10)));
}
