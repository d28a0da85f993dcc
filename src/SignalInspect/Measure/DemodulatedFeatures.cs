using SignalInspect.Demodulation;

namespace SignalInspect.Measure;

/// <summary>
/// The figures of the demodulated signal that the classifier and the AM and FM measurements read:
/// envelope peaks and mean, the deviation's peaks about its mean, the phase's spread about the
/// fitted carrier. Peaks are percentiles (<see cref="Upper"/>, <see cref="Lower"/>), not extremes:
/// noise inflates a maximum.
/// </summary>
internal sealed record DemodulatedFeatures
{
    /// <summary>The percentiles read as the positive and the negative peak (99.9th and 0.1th).</summary>
    public const double Upper = 0.999,
        Lower = 0.001;

    /// <summary>Envelope's positive peak, full scale.</summary>
    public required double EnvelopeMax { get; init; }

    /// <summary>Envelope's negative peak, full scale.</summary>
    public required double EnvelopeMin { get; init; }

    /// <summary>Envelope's mean, full scale.</summary>
    public required double EnvelopeMean { get; init; }

    /// <summary>Envelope depth (max - min) / (max + min), 0 when the envelope is zero.</summary>
    public double EnvelopeDepth =>
        EnvelopeMax + EnvelopeMin > 0 ? (EnvelopeMax - EnvelopeMin) / (EnvelopeMax + EnvelopeMin) : 0;

    /// <summary>Mean instantaneous frequency on the channel's axis, Hz.</summary>
    public required double MeanDeviationHz { get; init; }

    /// <summary>Positive peak of the deviation about its mean, Hz.</summary>
    public required double PositivePeakHz { get; init; }

    /// <summary>Negative peak of the deviation about its mean (a positive number), Hz.</summary>
    public required double NegativePeakHz { get; init; }

    /// <summary>RMS of the phase about the fitted carrier line, rad.</summary>
    public required double PhaseRmsRad { get; init; }

    /// <summary>Reads the features from a demodulation pass.</summary>
    public static DemodulatedFeatures From(PassResult b)
    {
        double meanDev = b.FreqMean;
        return new DemodulatedFeatures
        {
            EnvelopeMax = b.Envelope.Percentile(Upper),
            EnvelopeMin = b.Envelope.Percentile(Lower),
            EnvelopeMean = b.EnvelopeMean,
            MeanDeviationHz = meanDev,
            PositivePeakHz = b.Freq.Percentile(Upper) - meanDev,
            NegativePeakHz = meanDev - b.Freq.Percentile(Lower),
            PhaseRmsRad = Math.Sqrt(Math.Max(b.PhaseResidualVariance, 0)),
        };
    }
}
