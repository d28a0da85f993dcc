using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>A sub-audible tone found under the modulation (tone squelch).</summary>
/// <param name="FrequencyHz">Its frequency, Hz, with its resolution as uncertainty.</param>
/// <param name="DeviationHz">Its peak deviation, Hz.</param>
/// <param name="StandardHz">The listed tone it matches (within <see cref="AudioQuality.ToneMatchPercent"/>), or
/// null for one on neither list.</param>
/// <param name="List">Which list holds it: "EIA" (<see cref="AudioQuality.EiaTones"/>), "common, not EIA"
/// (<see cref="AudioQuality.OtherCommonTones"/>), or null.</param>
public sealed record SubAudibleTone(Measured FrequencyHz, double DeviationHz, double? StandardHz, string? List = null);

/// <summary>The demodulated audio's quality: distortion of the test tone, SINAD, residual modulation of an
/// unmodulated carrier, the sub-audible tone.</summary>
public sealed record AudioQualityResult
{
    /// <summary>Lower edge of the audio band the distortion-plus-noise and residual figures are taken in, Hz.</summary>
    public required double BandLowHz { get; init; }

    /// <summary>Upper edge of that band, Hz.</summary>
    public required double BandHighHz { get; init; }

    /// <summary>The weighting applied within the band.</summary>
    public string Weighting { get; init; } = "none (flat within the band)";

    /// <summary>The test tone the distortion is of, Hz; null when none was measured.</summary>
    public double? ToneHz { get; init; }

    /// <summary>Total harmonic distortion (harmonics 2 to 10 that the stream holds, over the fundamental), percent
    /// of amplitude.</summary>
    public Measured? ThdPercent { get; init; }

    /// <summary>Distortion plus noise in the band over everything in the band (fundamental included), percent of
    /// amplitude: 100 x 10^(-SINAD / 20).</summary>
    public Measured? ThdNPercent { get; init; }

    /// <summary>SINAD in the band, dB: (signal + noise + distortion) / (noise + distortion).</summary>
    public Measured? SinadDb { get; init; }

    /// <summary>Each harmonic found (2 to 10), percent of the fundamental's amplitude.</summary>
    public IReadOnlyList<(int Harmonic, double Percent)> Harmonics { get; init; } = [];

    /// <summary>Residual FM of an unmodulated carrier: rms deviation in the band, Hz.</summary>
    public Measured? ResidualFmHz { get; init; }

    /// <summary>Residual AM of an unmodulated carrier: rms of the envelope in the band over its mean,
    /// percent.</summary>
    public double? ResidualAmPercent { get; init; }

    /// <summary>Hum-and-noise ratio, dB: the reference deviation's rms (a sine: D / sqrt 2) over the residual FM;
    /// null without a reference deviation.</summary>
    public double? HumNoiseDb { get; init; }

    /// <summary>The sub-audible tone, or null.</summary>
    public SubAudibleTone? SubAudible { get; init; }

    /// <summary>The digital code squelch word read, or null (none read with confidence, or not looked for).</summary>
    public DigitalCode? Code { get; init; }

    /// <summary>The sub-audible tone's reverse burst at the window's end, or null (none, or no tone).</summary>
    public ReverseBurstResult? ReverseBurst { get; init; }

    /// <summary>The demodulated audio's line spectrum for the report: (frequency Hz, dB of the stream's unit squared
    /// per bin), at most <see cref="AudioQuality.PlotPoints"/> points (the largest of each group of bins).</summary>
    public IReadOnlyList<(double Hz, double Db)> Spectrum { get; init; } = [];

    /// <summary>Why the tone's distortion is not given (no tone, a tone outside the band ...), or null.</summary>
    public string? DistortionNotTested { get; init; }
}

/// <summary>
/// Audio quality from the demodulated signal's line spectrum (post-detection, the modulation's unit): the test
/// tone's harmonics (THD), distortion plus noise and SINAD in the land-mobile audio band, residual FM and AM of an
/// unmodulated carrier, and the sub-audible tone matched against the EIA list (and the tones in common use beyond it).
/// The band is 300-3000 Hz (the land-mobile audio band of the TIA-603 and ETSI transmitter methods: common practice),
/// flat within it.
/// </summary>
internal static class AudioQuality
{
    /// <summary>The audio band's edges, Hz.</summary>
    public const double BandLowHz = 300,
        BandHighHz = 3000;

    /// <summary>Sub-audible tones are looked for below this, Hz.</summary>
    public const double SubAudibleTopHz = 260;

    /// <summary>A sub-audible tone matches a standard one within this share of it, percent (decoders open within a few
    /// percent; neighbouring standard tones are about 3.5 % apart: common practice).</summary>
    public const double ToneMatchPercent = 1;

    /// <summary>The EIA sub-audible (CTCSS) tones, Hz: groups A, B and C of the EIA list (37 tones, the EIA/TIA RS-220
    /// list), as printed in a radio maker's programming manual and a tone-number chart (testdata/REFERENCE-VALUES.md
    /// names both).</summary>
    public static readonly double[] EiaTones =
    [
        67.0,
        71.9,
        74.4,
        77.0,
        79.7,
        82.5,
        85.4,
        88.5,
        91.5,
        94.8,
        100.0,
        103.5,
        107.2,
        110.9,
        114.8,
        118.8,
        123.0,
        127.3,
        131.8,
        136.5,
        141.3,
        146.2,
        151.4,
        156.7,
        162.2,
        167.9,
        173.8,
        179.9,
        186.2,
        192.8,
        203.5,
        210.7,
        218.1,
        225.7,
        233.6,
        241.8,
        250.3,
    ];

    /// <summary>Tones in common use beyond the EIA list (a tone encoder-decoder chip's table of 47, named in
    /// testdata/REFERENCE-VALUES.md).</summary>
    public static readonly double[] OtherCommonTones =
    [
        69.3,
        97.4,
        159.8,
        183.5,
        189.9,
        196.6,
        199.5,
        206.5,
        229.1,
        254.1,
    ];

    private const int Guard = ModulatingComponents.Guard;

    /// <summary>The audio quality of a stream (<paramref name="s"/>, in Hz for FM, envelope units for AM) whose
    /// modulation the analysis found; null for classes without demodulated audio.</summary>
    /// <param name="kind">The class.</param>
    /// <param name="s">The post-detection stream's line spectrum.</param>
    /// <param name="envelope">The envelope's line spectrum (residual AM).</param>
    /// <param name="envelopeMean">The envelope's mean (AM depth's and residual AM's reference).</param>
    /// <param name="tone">The test tone found, or null.</param>
    /// <param name="components">The modulating components.</param>
    /// <param name="topHz">The stream's highest frequency (its post-detection band), Hz.</param>
    /// <param name="referenceDeviationHz">The hum-and-noise ratio's reference deviation, or null.</param>
    /// <param name="code">The digital code squelch word read (<see cref="DcsDecoder"/>), or null.</param>
    /// <param name="weighting">The noise weighting of SINAD, THD+N and the residual figures (it replaces the
    /// 300-3000 Hz band); null for none.</param>
    /// <param name="track">The block means of the frequency (Hz) and the block length (s), where a sub-audible tone's
    /// reverse burst is looked for; null not to look.</param>
    public static AudioQualityResult? Measure(
        ModulationKind kind,
        LineSpectrum s,
        LineSpectrum envelope,
        double envelopeMean,
        Measured? tone,
        IReadOnlyList<ModulatingComponent> components,
        double topHz,
        double? referenceDeviationHz,
        DigitalCode? code = null,
        NoiseWeighting? weighting = null,
        (double[] Freq, double BlockS)? track = null
    )
    {
        if (kind == ModulationKind.Fsk && code is not null)
            return new AudioQualityResult
            {
                BandLowHz = BandLowHz,
                BandHighHz = Math.Min(BandHighHz, topHz),
                Code = code,
                DistortionNotTested = "keyed by the code squelch word alone: no tone to measure the distortion of",
            };
        if (kind is not (ModulationKind.Fm or ModulationKind.Am or ModulationKind.Cw) || s.Segments == 0)
            return null;
        NoiseWeighting w = weighting ?? NoiseWeighting.None;
        double low = w.IsNone ? BandLowHz : w.LowHz,
            high = Math.Min(w.IsNone ? BandHighHz : w.HighHz, topHz);
        LineSpectrum audio = kind == ModulationKind.Am ? envelope : s;
        double plotTop = Math.Min(topHz, Math.Max(3500, tone is { } pt ? 10.5 * pt.Value : 0));
        var result = new AudioQualityResult
        {
            BandLowHz = low,
            BandHighHz = high,
            Weighting = w.Description,
            Spectrum = PlotSpectrum(audio, plotTop),
        };
        if (kind == ModulationKind.Cw)
        {
            double fm = Math.Sqrt(BandVariance(s, low, high, w));
            double am = envelopeMean > 0 ? 100 * Math.Sqrt(BandVariance(envelope, low, high, w)) / envelopeMean : 0;
            Measured residual = Measured.FromBudget(
                fm,
                new UncertaintyComponent(
                    "estimate's spread",
                    fm / Math.Sqrt(2 * Math.Max(1, s.Segments * BandBins(s, low, high))),
                    "a variance summed over B bins of K segments: relative spread 1 / sqrt(2 K B)"
                )
            );
            return result with
            {
                ResidualFmHz = residual,
                ResidualAmPercent = am,
                HumNoiseDb =
                    referenceDeviationHz is { } dref && fm > 0 ? 20 * Math.Log10(dref / Math.Sqrt(2) / fm) : null,
                DistortionNotTested = "an unmodulated carrier: no tone to measure the distortion of",
            };
        }
        // A code word's lines (every 134.4 / 23 Hz) are not a tone: with a word read, no tone is looked for.
        SubAudibleTone? sub = kind == ModulationKind.Fm && code is null ? FindSubAudible(s, components) : null;
        result = result with
        {
            Code = code,
            SubAudible = sub,
            ReverseBurst =
                sub is not null && track is { } tr
                    ? ReverseBurstFinder.Find(tr.Freq, tr.BlockS, sub.FrequencyHz.Value)
                    : null,
        };
        if (tone is not { } t)
            return result with { DistortionNotTested = "no modulating tone was found" };
        double f0 = t.Value;
        if (!(f0 >= low && f0 <= high))
            return result with
            {
                ToneHz = f0,
                DistortionNotTested = FormattableString.Invariant(
                    $"the tone ({f0:0.#} Hz) lies outside the audio band ({low:0}-{high:0} Hz)"
                ),
            };
        double floor = FloorPerBin(audio, low, high, f0);
        double p1 = LineVariance(audio, f0, floor);
        if (!(p1 > 0))
            return result with { ToneHz = f0, DistortionNotTested = "the tone's line holds no power over the noise" };
        var harmonics = new List<(int, double)>();
        double pd = 0,
            pn = 0;
        for (int k = 2; k <= 10 && k * f0 < Math.Min(topHz, 0.45 * audio.BinWidthHz * audio.FftSize); k++)
        {
            double ph = LineVariance(audio, k * f0, floor);
            pd += ph;
            pn += floor * (2 * Guard + 1) * audio.VarianceScale;
            harmonics.Add((k, 100 * Math.Sqrt(ph / p1)));
        }
        double thd = 100 * Math.Sqrt(pd / p1);
        double thdNoisy = 100 * Math.Sqrt((pd + pn) / p1);
        // SINAD and THD+N weigh the band (the tone by its own weight); THD compares the harmonics unweighted.
        double total = BandVariance(audio, low, high, w);
        double rest = Math.Max(total - LineVariance(audio, f0, floor, w), 1e-30);
        double sinad = 10 * Math.Log10(total / rest);
        double spread = 1 / Math.Sqrt(2 * Math.Max(1, audio.Segments * BandBins(audio, low, high)));
        // No harmonic within the demodulated band: a THD of 0 would be no reading at all (the band, not the
        // transmitter, took the harmonics away).
        string? noHarmonic =
            harmonics.Count == 0
                ? FormattableString.Invariant(
                    $"no harmonic of the {f0:0.#} Hz tone lies within the demodulated band (up to {topHz:0} Hz)"
                )
                : null;
        return result with
        {
            ToneHz = f0,
            Harmonics = harmonics,
            DistortionNotTested = noHarmonic,
            ThdPercent = noHarmonic is not null
                ? null
                : Measured.FromBudget(
                    thd,
                    new UncertaintyComponent(
                        "noise in the harmonics' bins",
                        (thdNoisy - thd) / 2,
                        "half of what the noise under the harmonics' lines would add had it not been taken off"
                    )
                ),
            ThdNPercent = Measured.FromBudget(
                100 * Math.Sqrt(rest / total),
                new UncertaintyComponent(
                    "estimate's spread",
                    100 * Math.Sqrt(rest / total) * spread,
                    "a variance summed over B bins of K segments: relative spread 1 / sqrt(2 K B)"
                )
            ),
            SinadDb = Measured.FromBudget(
                sinad,
                new UncertaintyComponent(
                    "estimate's spread",
                    10 / Math.Log(10) * spread,
                    "the noise and distortion's power summed over B bins of K segments: 4.34 / sqrt(2 K B) dB"
                )
            ),
        };
    }

    /// <summary>The strongest component below <see cref="SubAudibleTopHz"/> (and above 60 Hz), matched against
    /// <see cref="EiaTones"/>, else <see cref="OtherCommonTones"/>.</summary>
    private static SubAudibleTone? FindSubAudible(LineSpectrum s, IReadOnlyList<ModulatingComponent> components)
    {
        ModulatingComponent? c = components
            .Where(x => x.FrequencyHz is >= 60 and < SubAudibleTopHz)
            .OrderByDescending(x => x.PeakAmount)
            .FirstOrDefault();
        if (c is null)
            return null;
        double resolution = Math.Max(s.BinWidthHz / TypeB.ToneBinDivisor, TypeB.ToneFraction * c.FrequencyHz);
        double? match = Match(EiaTones, c.FrequencyHz),
            other = match is null ? Match(OtherCommonTones, c.FrequencyHz) : null;
        return new SubAudibleTone(
            Measured.FromBudget(
                c.FrequencyHz,
                new UncertaintyComponent(
                    "resolution (interpolated line)",
                    resolution,
                    "TypeB.ToneBinDivisor, ToneFraction"
                )
            ),
            c.PeakAmount,
            match ?? other,
            match is not null ? "EIA"
                : other is not null ? "common, not EIA"
                : null
        );
    }

    /// <summary>The tone of <paramref name="list"/> within <see cref="ToneMatchPercent"/> of
    /// <paramref name="hz"/>, or null.</summary>
    private static double? Match(double[] list, double hz)
    {
        double nearest = list.MinBy(t => Math.Abs(t - hz));
        return Math.Abs(nearest - hz) <= ToneMatchPercent / 100 * nearest ? nearest : null;
    }

    /// <summary>Most points of <see cref="AudioQualityResult.Spectrum"/>.</summary>
    public const int PlotPoints = 2000;

    private static IReadOnlyList<(double, double)> PlotSpectrum(LineSpectrum s, double topHz)
    {
        int last = Math.Min(s.FftSize / 2 - 1, (int)(topHz / s.BinWidthHz));
        int group = Math.Max(1, (last + PlotPoints - 1) / PlotPoints);
        var points = new List<(double, double)>();
        double toVar = s.VarianceScale;
        for (int k = 1; k + group - 1 <= last; k += group)
        {
            double p = 0;
            for (int j = k; j < k + group; j++)
                p = Math.Max(p, s.Power(j));
            points.Add(((k + group / 2) * s.BinWidthHz, p > 0 ? 10 * Math.Log10(p * toVar) : -300));
        }
        return points;
    }

    private static (int A, int B) Bins(LineSpectrum s, double lowHz, double highHz) =>
        (
            Math.Max(Guard + 1, (int)Math.Ceiling(lowHz / s.BinWidthHz)),
            Math.Min(s.FftSize / 2 - 1, (int)Math.Floor(highHz / s.BinWidthHz))
        );

    private static int BandBins(LineSpectrum s, double lowHz, double highHz)
    {
        var (a, b) = Bins(s, lowHz, highHz);
        return Math.Max(0, b - a + 1);
    }

    /// <summary>The stream's variance between the edges (everything: lines and noise), each bin weighted by
    /// <paramref name="w"/>.</summary>
    private static double BandVariance(LineSpectrum s, double lowHz, double highHz, NoiseWeighting w)
    {
        var (a, b) = Bins(s, lowHz, highHz);
        double v = 0;
        for (int k = a; k <= b; k++)
            v += s.Power(k) * w.PowerGain(k * s.BinWidthHz);
        return v * s.VarianceScale;
    }

    /// <summary>The median bin power in the band away from the tone's harmonics: the noise per bin.</summary>
    private static double FloorPerBin(LineSpectrum s, double lowHz, double highHz, double toneHz)
    {
        var (a, b) = Bins(s, lowHz, highHz);
        var p = new List<double>();
        for (int k = a; k <= b; k++)
        {
            double f = k * s.BinWidthHz;
            double h = Math.Round(f / toneHz);
            if (h >= 1 && Math.Abs(f - h * toneHz) <= Guard * s.BinWidthHz)
                continue;
            p.Add(s.Power(k));
        }
        if (p.Count == 0)
            return 0;
        p.Sort();
        return p[p.Count / 2];
    }

    /// <summary>The variance of the line at <paramref name="hz"/> (its bins within the guard, less the noise), each
    /// bin weighted by <paramref name="w"/> when given (a tone at a weighting's peak loses its own skirts, not the
    /// peak's weight).</summary>
    private static double LineVariance(LineSpectrum s, double hz, double floor, NoiseWeighting? w = null)
    {
        int k = (int)Math.Round(hz / s.BinWidthHz);
        double v = 0;
        for (int j = Math.Max(1, k - Guard); j <= Math.Min(s.FftSize / 2 - 1, k + Guard); j++)
            v += Math.Max(0, s.Power(j) - floor) * (w?.PowerGain(j * s.BinWidthHz) ?? 1);
        return v * s.VarianceScale;
    }
}
