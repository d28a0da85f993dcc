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

    /// <summary>The RF frequency a ppm figure divides by (null when unknown).</summary>
    public double? PpmReferenceHz { get; init; }

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

    /// <summary>
    /// The budget of a carrier read as the least-squares slope of the unwrapped phase over a window of
    /// <paramref name="windowS"/> seconds: the noise (the slope's standard error with the residual phase variance
    /// less the modulation's own, sum P_i^2 / 2 with P_i each component's peak phase), the modulation's leakage
    /// into the slope (for a phase P sin(wt + theta) over T the slope moves by at most 12 P / (w T^2) rad/s, rms
    /// 6 sqrt(2) P / (w T^2) over theta: a closed form), and a numerical floor.
    /// </summary>
    public static UncertaintyComponent[] SlopeBudget(
        Demodulation.PassResult b,
        double decimatedRateHz,
        ModulationKind kind,
        IReadOnlyList<ModulatingComponent> components,
        double windowS
    )
    {
        double[] peakPhases = kind switch
        {
            ModulationKind.Fm => [.. components.Select(c => c.PeakAmount / c.FrequencyHz)],
            ModulationKind.Pm => [.. components.Select(c => c.PeakAmount)],
            _ => [],
        };
        double modulation = peakPhases.Sum(p => p * p / 2);
        double residual = Math.Max(b.PhaseResidualVariance, 0);
        double share = residual > 0 ? Math.Max(residual - modulation, 0) / residual : 0;
        double noise = Math.Sqrt(Math.Max(b.SlopeVariance, 0) * share) * decimatedRateHz / (2 * Math.PI);
        double leak = Math.Sqrt(
            components
                .Zip(peakPhases)
                .Sum(x =>
                    Math.Pow(
                        6
                            * Math.Sqrt(2)
                            * x.Second
                            / (2 * Math.PI * x.First.FrequencyHz * windowS * windowS)
                            / (2 * Math.PI),
                        2
                    )
                )
        );
        return
        [
            new(
                "noise (phase-slope fit)",
                noise,
                "standard error of the slope, the residual phase less the modulation's"
            ),
            new("modulation's leakage into the slope", leak, "6 sqrt 2 P / (w T^2), each modulating component"),
            new("numerical floor", TypeB.CarrierFloorHz, "TypeB.CarrierFloorHz"),
        ];
    }

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
            PpmReferenceHz = rf is { } r2 && r2 != 0 ? r2 : null,
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
