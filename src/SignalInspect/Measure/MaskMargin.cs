using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>The worst margin of a spectrum to an emission mask, and whether the noise floor hid part of it.</summary>
/// <param name="WorstMarginDb">Smallest attenuation minus the required one, dB, over the bins where the mask
/// applies and the emission stands above the floor; positive infinity when there is no such bin.</param>
/// <param name="WorstOffsetHz">Offset from the carrier of that bin, Hz.</param>
/// <param name="FloorLimited">True when a bin at the capture's noise floor came within the tolerance of the
/// mask: the capture cannot show compliance there.</param>
public readonly record struct MaskMarginResult(double WorstMarginDb, double WorstOffsetHz, bool FloorLimited);

/// <summary>
/// Measures a spectrum against an emission mask: the max-hold PSD, as power in the mask's reference
/// bandwidth, against the required attenuation below the total mean power (the unmodulated carrier
/// power for constant-envelope signals). Judging the margin is the limit judge's (Compliance).
/// </summary>
public static class MaskMargin
{
    /// <summary>A bin whose mean level is at most this many times the noise floor (about 5 dB) shows the capture,
    /// not the emission.</summary>
    public const double FloorFactor = 3;

    /// <summary>Measures the margin.</summary>
    /// <param name="spectrum">Mean and max-hold spectra.</param>
    /// <param name="noiseFloorDensity">Noise density of the mean spectrum.</param>
    /// <param name="carrierAxisHz">The carrier on the spectrum's axis, Hz.</param>
    /// <param name="referenceBandwidthHz">The mask's reference bandwidth, Hz.</param>
    /// <param name="requiredAttenuationDb">Required attenuation (dB) at an offset from the carrier (Hz); 0 or less
    /// where the mask does not apply.</param>
    /// <param name="floorToleranceDb">A floor bin closer than this to the mask marks the result floor-limited.</param>
    public static MaskMarginResult Measure(
        SpectrumResult spectrum,
        double noiseFloorDensity,
        double carrierAxisHz,
        double referenceBandwidthHz,
        Func<double, double> requiredAttenuationDb,
        double floorToleranceDb
    )
    {
        PowerSpectrum hold = spectrum.MaxHold;
        PowerSpectrum mean = spectrum.Mean;
        double total = mean.TotalPower();
        double floor = noiseFloorDensity;
        double worst = double.PositiveInfinity,
            worstAt = 0;
        bool floorLimited = false;
        // Power in the reference bandwidth around each bin: the density summed over the bins within
        // +/- B/2 (right for lines and for continuous spectra alike).
        // (A reference bandwidth wider than the capture covers it all: the count is clamped before it is an int.)
        int halfBins = (int)Math.Clamp(Math.Round(referenceBandwidthHz / hold.BinWidthHz / 2), 0, hold.Count);
        var prefix = new double[hold.Count + 1];
        for (int i = 0; i < hold.Count; i++)
            prefix[i + 1] = prefix[i] + hold.Values[i] * hold.BinWidthHz;
        for (int i = 0; i < hold.Count; i++)
        {
            double fd = hold.FrequenciesHz[i] - carrierAxisHz;
            double req = requiredAttenuationDb(fd);
            if (req <= 0)
                continue;
            int a = Math.Max(0, i - halfBins),
                b = Math.Min(hold.Count - 1, i + halfBins);
            double inRef =
                (prefix[b + 1] - prefix[a]) * Math.Min(1, referenceBandwidthHz / ((b - a + 1) * hold.BinWidthHz));
            double att = 10 * Math.Log10(total / Math.Max(inRef, 1e-300));
            double margin = att - req;
            if (mean.Values[i] <= FloorFactor * floor)
            {
                if (margin < floorToleranceDb)
                    floorLimited = true;
                continue;
            }
            if (margin < worst)
            {
                worst = margin;
                worstAt = fd;
            }
        }
        return new MaskMarginResult(worst, worstAt, floorLimited);
    }
}
