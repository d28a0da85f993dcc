using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>Carrier frequency and offset.</summary>
public sealed record CarrierResult
{
    /// <summary>Carrier frequency: absolute RF in Hz when the centre is known, else relative to the centre (audio
    /// frequency for real input).</summary>
    public required Measured FrequencyHz { get; init; }

    /// <summary>Offset from the nominal frequency (or from the centre when no nominal is given), Hz.</summary>
    public required double OffsetHz { get; init; }

    /// <summary>Offset in parts per million of the RF frequency, null when the RF frequency is unknown.</summary>
    public double? OffsetPpm { get; init; }

    /// <summary>The frequency the offset is taken from.</summary>
    public required string OffsetReference { get; init; }

    /// <summary>Estimator used.</summary>
    public required string Method { get; init; }
}

/// <summary>
/// The carrier: a first estimate from the spectrum (the strongest line, or the power centroid when no
/// line holds much of the power), then the frequency from the demodulation pass (the slope of the
/// unwrapped phase, or the centre of the FSK tones), reported absolute or as an offset.
/// </summary>
internal static class CarrierMeasurement
{
    /// <summary>Share of the signal power the strongest line must hold to be taken as the carrier.</summary>
    public const double LineShare = 0.3;

    /// <summary>The first estimate on the capture's axis: the strongest line, or the centroid of the occupied
    /// band.</summary>
    public static double Coarse(PowerSpectrum psd, BandwidthResult bw)
    {
        (double lineHz, double lineFraction) = StrongestLine(psd, bw);
        return lineFraction >= LineShare ? lineHz : bw.CentroidHz;
    }

    /// <summary>
    /// The carrier's result for a frequency of <paramref name="axisHz"/> on the capture's axis.
    /// </summary>
    /// <param name="info">The capture.</param>
    /// <param name="nominalHz">Nominal frequency the offset is taken from, or null.</param>
    /// <param name="axisHz">The carrier on the capture's axis, Hz.</param>
    /// <param name="budget">Its uncertainty components.</param>
    /// <param name="kind">What was measured (chooses the method text).</param>
    public static CarrierResult Make(
        CaptureInfo info,
        double? nominalHz,
        double axisHz,
        UncertaintyComponent[] budget,
        ModulationKind kind
    )
    {
        var axis = FrequencyAxis.Of(info);
        double reported = axis.ToReported(axisHz);
        bool absolute = axis.IsAbsolute;
        double offset;
        string reference;
        double? rf = absolute ? reported : null;
        if (nominalHz is { } nominal)
        {
            offset = reported - nominal;
            reference = string.Create(CultureInfo.InvariantCulture, $"nominal {nominal:0.###} Hz (--nominal)");
            rf ??= absolute || nominal > 0 ? nominal : null;
            if (!absolute && !info.IsComplex)
                rf = null;
        }
        else if (info.IsComplex)
        {
            offset = axisHz;
            reference = info.CenterFrequencyHz is { } c
                ? string.Create(CultureInfo.InvariantCulture, $"capture centre {c:0.###} Hz")
                : "capture centre (RF unknown)";
        }
        else
        {
            offset = axisHz;
            reference = "0 Hz of the audio band (real input; give --nominal for an offset)";
        }
        string method = kind switch
        {
            ModulationKind.Cw or ModulationKind.Am =>
                "envelope-weighted least-squares fit of the unwrapped carrier phase (Tretter 1985; efficient at high "
                    + "SNR, Rife and Boorstyn 1974 bound)",
            ModulationKind.Fsk => "centre of the two tones (the most frequent instantaneous frequencies)",
            _ => "mean instantaneous frequency: least-squares slope of the unwrapped phase over the whole window",
        };
        return new CarrierResult
        {
            FrequencyHz = Measured.FromBudget(reported, budget),
            OffsetHz = offset,
            OffsetPpm = rf is { } r && r != 0 ? offset / r * 1e6 : null,
            OffsetReference = reference,
            Method = method,
        };
    }

    /// <summary>The strongest narrow line: its interpolated frequency and its share of the signal power (floor
    /// removed).</summary>
    private static (double Hz, double Fraction) StrongestLine(PowerSpectrum psd, BandwidthResult bw)
    {
        int k = psd.PeakIndex();
        ReadOnlySpan<double> v = psd.Values;
        double line = 0;
        int hw = psd.Window.MainLobeHalfWidthBins + 1;
        for (int i = Math.Max(0, k - hw); i <= Math.Min(v.Length - 1, k + hw); i++)
            line += Math.Max(0, v[i] - bw.NoiseFloorDensity) * psd.BinWidthHz;
        double hz = psd.FrequenciesHz[k];
        if (k > 0 && k < v.Length - 1)
            hz += PeakInterpolation.LogParabolic(v[k - 1], v[k], v[k + 1]) * psd.BinWidthHz;
        return (hz, bw.SignalPower > 0 ? Math.Min(1, line / bw.SignalPower) : 0);
    }
}
