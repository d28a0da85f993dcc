using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// The warnings that protect the reader from a wrong number, one line each, in the order the
/// analysis meets them.
/// </summary>
internal static class MeasurementWarnings
{
    /// <summary>Below this SNR in the occupied bandwidth (dB) readings are flagged as unreliable.</summary>
    public const double UnreliableSnrDb = 10;

    /// <summary>Fewer periods of the modulating tone than this in the window are flagged.</summary>
    public const double MinTonePeriods = 10;

    /// <summary>More full-scale sample values than this (and than 1e-5 of the window) mean clipping.</summary>
    public const long ClippedValues = 3;

    /// <summary>Share of the Nyquist frequency beyond which a signal reaches the band's edge.</summary>
    public const double BandEdge = 0.9;

    /// <summary>Share of the sampled band an occupied bandwidth may fill before it is flagged.</summary>
    public const double BandFill = 0.8;

    public const string MirrorKept =
        "the carrier sits close to 0 Hz or to half the sample rate for its bandwidth: the analytic signal keeps some "
        + "of the mirror image";

    /// <summary>Another emission too near for the channel filter to stop it while passing the measured one.</summary>
    public const string Crowded =
        "another emission lies so near the measured one that the channel filter cannot stop it while passing the "
        + "measured occupied band: deviation, depth and modulating components may be disturbed (give a narrower "
        + "channel with a width to the selection, or record with the other emission off)";

    /// <summary>The low-SNR warning, or null.</summary>
    public static string? LowSnr(double snrDb, ModulationKind kind) =>
        snrDb < UnreliableSnrDb && kind != ModulationKind.Noise
            ? string.Create(CultureInfo.InvariantCulture, $"SNR in the occupied bandwidth is about {snrDb:0.#} dB: ")
                + "readings are unreliable and the classification uncertain"
            : null;

    /// <summary>The overmodulation warning of an AM signal whose envelope is cut off at zero, or null.</summary>
    public static string? Overmodulation(ModulationKind kind, DemodulatedFeatures f) =>
        kind == ModulationKind.Am && f.OffShare >= ModulationClassifier.OffShare
            ? string.Create(CultureInfo.InvariantCulture, $"overmodulation: the envelope is cut off at zero ")
                + string.Create(CultureInfo.InvariantCulture, $"{100 * f.OffShare:0.#} % of the time (negative peaks ")
                + "reach 100 %; the depth reads 100 % and the positive peak and the sidebands show how far beyond)"
            : null;

    /// <summary>The short-capture warning, or null.</summary>
    public static string? FewTonePeriods(Measured? tone, double windowS) =>
        tone is { } t && windowS < MinTonePeriods / t.Value
            ? string.Create(
                CultureInfo.InvariantCulture,
                $"the capture holds fewer than 10 periods of the {t.Value:0.#} Hz modulating frequency"
            )
            : null;

    /// <summary>The warnings about the band, clipping, a DC spike and unreadable segments.</summary>
    public static IEnumerable<string> AfterMeasuring(
        CaptureInfo info,
        ModulationKind kind,
        BandwidthResult bw,
        PowerSpectrum psd,
        double carrierAxisHz,
        long nearFullScale,
        long count,
        bool suppressDc,
        long nonFiniteSegments,
        double snrDb = 0
    )
    {
        double fs = info.SampleRateHz;
        double nyquist = fs / 2;
        if (
            kind != ModulationKind.Noise
            && (
                info.IsComplex
                    ? Math.Max(Math.Abs(bw.LowerEdgeHz), Math.Abs(bw.UpperEdgeHz)) > BandEdge * nyquist
                    : bw.UpperEdgeHz > BandEdge * nyquist
            )
        )
            yield return "the signal reaches the edge of the sampled band: the sample rate may be too low for its "
                + "bandwidth, and the bandwidth reads low";
        if (kind != ModulationKind.Noise && bw.OccupiedHz > BandFill * (info.IsComplex ? fs : nyquist))
            yield return "the occupied bandwidth fills most of the sampled band: the sample rate is too low for this "
                + "signal, or it is noise";
        if (nearFullScale > Math.Max(ClippedValues, 1e-5 * count))
            yield return string.Create(CultureInfo.InvariantCulture, $"{nearFullScale} sample value(s) at full scale: ")
                + "the capture is probably clipped, and levels, depth and bandwidth read wrong";
        if (info.IsComplex && !suppressDc && HasDcSpike(psd, carrierAxisHz, bw.NoiseFloorDensity))
            yield return "a narrow spike sits at 0 Hz apart from the carrier (the receiver's DC offset or LO leakage): "
                + "it can bias bandwidth and classification; --suppress-dc removes it";
        if (nonFiniteSegments > 0)
            yield return $"{nonFiniteSegments} spectrum segment(s) held NaN or infinite samples (taken as 0)";
        if (BelowRounding(info, bw.NoiseFloorDensity) is { } rounding)
            yield return rounding;
        if (kind != ModulationKind.Noise && snrDb >= BandwidthMeasurement.MaxSnrDb - 0.5)
            yield return "no noise was found beside the signal (the SNR reads at its 200 dB cap): the samples are "
                + "synthetic or digitally generated, not a receiver's; the uncertainties that come from noise are nil";
        if (
            info.IsComplex
            && kind is not (ModulationKind.Noise or ModulationKind.Ook)
            && Math.Abs(carrierAxisHz) < psd.RbwHz
        )
            yield return "the carrier sits at the capture's centre (0 Hz), where a receiver's DC offset or LO leakage "
                + "also sits: check that it is the transmitter's (tune off-centre to tell them apart)";
    }

    /// <summary>A floor this far below the datatype's rounding noise (10 dB) means the rounding error is not
    /// noise.</summary>
    public const double BelowRoundingFactor = 10;

    /// <summary>
    /// The warning for a floor far below what rounding to the datatype's codes leaves when the error is noise-like
    /// (uniform over one code q: q^2 / 12 per component, a density of q^2 / (6 fs) for I and Q over fs as for a
    /// real signal over fs / 2), or null. A real receiver's own noise dithers the rounding; a noiseless synthetic
    /// or undithered recording has a periodic rounding error instead, its power in a comb of spurs between which
    /// the floor reads low: the spurs demodulate as modulation and the readings suffer.
    /// </summary>
    public static string? BelowRounding(CaptureInfo info, double floorDensity)
    {
        if (!SampleFormat.TryParse(info.Datatype, out SampleFormat f, out _) || f.IsFloat)
            return null;
        double q = 1 / f.CodeFullScale;
        double rounding = q * q / (6 * info.SampleRateHz);
        if (!(floorDensity < rounding / BelowRoundingFactor))
            return null;
        return string.Create(
                CultureInfo.InvariantCulture,
                $"the noise floor reads {10 * Math.Log10(rounding / floorDensity):0} dB below the {f.Name} datatype's "
            )
            + "rounding noise: the rounding error is not noise (an undithered recording without the receiver's noise) "
            + "and its spurs may read as modulation, raising peaks and adding components";
    }

    /// <summary>A line at exactly 0 Hz, 10 dB above its surroundings and the floor, away from the carrier: a
    /// receiver's DC spike.</summary>
    private static bool HasDcSpike(PowerSpectrum psd, double carrierAxisHz, double floor)
    {
        int centre = Array.IndexOf(psd.FrequenciesHz.ToArray(), 0.0);
        int hw = psd.Window.MainLobeHalfWidthBins;
        if (centre < 0 || Math.Abs(carrierAxisHz) < 4 * hw * psd.BinWidthHz)
            return false;
        var around = new List<double>();
        for (int k = 3 * hw; k <= 8 * hw; k++)
        {
            if (centre - k >= 0)
                around.Add(psd.Values[centre - k]);
            if (centre + k < psd.Count)
                around.Add(psd.Values[centre + k]);
        }
        if (around.Count == 0)
            return false;
        around.Sort();
        double med = around[around.Count / 2];
        double at0 = psd.Values[centre];
        if (!(at0 > 10 * med && at0 > 10 * floor))
            return false;
        // A line at 0 Hz mirrored about the carrier (as strong at twice the carrier's offset) is one of the
        // emission's own sidebands, not the receiver's DC.
        double mirrorHz = 2 * carrierAxisHz;
        if (mirrorHz < psd.FrequenciesHz[0] || mirrorHz > psd.FrequenciesHz[^1])
            return true;
        int m = psd.BinOf(mirrorHz);
        double mirror = 0;
        for (int i = Math.Max(0, m - hw); i <= Math.Min(psd.Count - 1, m + hw); i++)
            mirror = Math.Max(mirror, psd.Values[i]);
        return mirror * 10 < at0;
    }
}
