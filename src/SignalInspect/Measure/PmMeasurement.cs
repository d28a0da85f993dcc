using SignalInspect.Demodulation;

namespace SignalInspect.Measure;

/// <summary>PM measurements from the phase about the fitted carrier.</summary>
public sealed record PmResult
{
    /// <summary>Peak phase deviation: half the peak-to-peak phase (0.1th to 99.9th percentile), rad.</summary>
    public required Measured PeakDeviationRad { get; init; }

    /// <summary>Positive peak phase, rad.</summary>
    public required double PositivePeakRad { get; init; }

    /// <summary>Negative peak phase (as a positive number), rad.</summary>
    public required double NegativePeakRad { get; init; }

    /// <summary>Peak frequency deviation of the same signal, Hz: the sum of each component's P_i f_i, or P fm for
    /// one tone; null without a tone.</summary>
    public double? PeakDeviationHz { get; init; }
}

/// <summary>
/// PM peak phase from a second pass that histograms the phase about the carrier line fitted in the
/// first: half the distance between its 99.9th and 0.1th percentiles. With a tone, the peaks are
/// corrected for the noise: additive noise moves the phase by sigma_a / A (its quadrature part),
/// read from the envelope's noise.
/// </summary>
internal static class PmMeasurement
{
    /// <summary>Measures a PM signal from the phase pass <paramref name="phasePass"/>.</summary>
    public static (PmResult Result, MeasurementExtras Extras) Measure(MeasurementInputs m, PassResult phasePass)
    {
        double up = phasePass.Phase!.Percentile(DemodulatedFeatures.Upper),
            lo = phasePass.Phase.Percentile(DemodulatedFeatures.Lower);
        double aMean = m.Features.EnvelopeMean;
        bool corrected = false;
        if (m.Tone is not null && aMean > 0)
        {
            var (_, nv) = m.Pass.EnvelopeSpectrum.Split(0, m.MinToneHz, 0.45 * m.Channel.DecimatedRateHz);
            double sigmaPhi = Math.Sqrt(nv) / aMean;
            (up, double down) = SinePeak.FromPercentiles(up, -lo, sigmaPhi);
            lo = -down;
            corrected = true;
        }
        double p = (up - lo) / 2;
        var result = new PmResult
        {
            PeakDeviationRad = Measured.FromBudget(
                p,
                new UncertaintyComponent("peak statistic", TypeB.PmPeakFraction * p, "TypeB.PmPeakFraction"),
                new UncertaintyComponent(
                    "noise",
                    TypeB.PmNoiseShare * p / Math.Sqrt(TypeB.CappedSnr(m.SnrDb)),
                    "TypeB.PmNoiseShare x reading / sqrt(SNR in the occupied band)"
                )
            ),
            PositivePeakRad = up,
            NegativePeakRad = -lo,
            PeakDeviationHz =
                m.Components.Count > 0 ? m.Components.Sum(c => c.PeakAmount * c.FrequencyHz)
                : m.Tone is { } t1 ? p * t1.Value
                : null,
        };
        double? necessary = m.Tone is { } t
            ? EmissionDesignator.AngleModulationBandwidthHz(t.Value, p * t.Value)
            : null;
        return (result, new MeasurementExtras(necessary, corrected));
    }
}
