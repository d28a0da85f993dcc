using SignalInspect.Demodulation;
using SignalInspect.Dsp;

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

    /// <summary>Share of the time the envelope is at the noise's level: the carrier absent (keyed off, or an
    /// overmodulated envelope cut off at zero). 0 when no noise level was given, or when the carrier's peak is
    /// less than three times that level (the noise then hides absence).</summary>
    public double OffShare { get; init; }

    /// <summary>Mean envelope while the carrier is on (above half its peak), full scale.</summary>
    public double OnLevel { get; init; }

    /// <summary>Spread of the envelope while the carrier is on (above half its peak), relative to its mean
    /// there: small for on-off keying, large for AM.</summary>
    public double OnSpread { get; init; }

    /// <summary>The phase's rms about the fitted carrier beyond what the measured noise explains:
    /// sqrt(rms^2 - Pn / (2 A^2)), A^2 the mean squared envelope less the noise (the phase noise of a carrier in
    /// additive noise at high SNR). Equals <see cref="PhaseRmsRad"/> when no noise level was given.</summary>
    public double PhaseExcessRad { get; init; }

    /// <summary>The envelope's depth beyond what the measured noise explains: sqrt(2 (var - noise var)) / mean,
    /// 0 when the noise explains it all.</summary>
    public double ExcessDepth { get; init; }

    /// <summary>Share of the on-time (envelope above the off level) the envelope spends below half the on-level: a
    /// few % for keyed or pulsed carriers (only their edges), far more for AM cut off at zero.</summary>
    public double TransitionShare { get; init; }

    /// <summary>True when the noise level was known, so that <see cref="ExcessDepth"/> and
    /// <see cref="PhaseExcessRad"/> hold.</summary>
    public bool NoiseKnown { get; init; }

    /// <summary>
    /// The envelope level below which the carrier is taken as absent: the 99th percentile of a Rayleigh envelope of
    /// the channel's noise alone, sqrt(2 ln 100) x sigma with sigma^2 half the noise power in the channel, and at
    /// least 5 % of the envelope's peak.
    /// </summary>
    public static double OffLevel(double noisePowerInChannel, double envelopePeak) =>
        Math.Max(Math.Sqrt(2 * Math.Log(100)) * Math.Sqrt(noisePowerInChannel / 2), 0.05 * envelopePeak);

    /// <summary>Reads the features from a demodulation pass; <paramref name="noisePowerInChannel"/> is the noise power
    /// the channel filter passes (floor density x channel width), null when unknown.</summary>
    public static DemodulatedFeatures From(PassResult b, double? noisePowerInChannel = null)
    {
        double meanDev = b.FreqMean;
        double top = b.Envelope.Percentile(Upper);
        double offShare = 0,
            onSpread = 0,
            excess = 0,
            onLevel = 0,
            transition = 0,
            phaseExcess = Math.Sqrt(Math.Max(b.PhaseResidualVariance, 0));
        if (noisePowerInChannel is { } pn && top > 0)
        {
            Histogram h = b.Envelope;
            // Absence can be told from noise only when the carrier stands well above the noise's envelope.
            double off = OffLevel(pn, top);
            offShare = off <= top / 3 ? h.FractionBetween(double.NegativeInfinity, off) : 0;
            (double onMean, double onVar) = Moments(h, top / 2, double.PositiveInfinity);
            onSpread = onMean > 0 ? Math.Sqrt(onVar) / onMean : 0;
            onLevel = onMean;
            double onShare = 1 - h.FractionBetween(double.NegativeInfinity, off);
            transition = offShare > 0 && onShare > 0 ? h.FractionBetween(off, onMean / 2) / onShare : 0;
            (double mean, double var) = Moments(h, double.NegativeInfinity, double.PositiveInfinity);
            excess = mean > 0 ? Math.Sqrt(2 * Math.Max(0, var - pn / 2)) / mean : 0;
            double a2 = Math.Max(mean * mean + var - pn, 1e-30);
            phaseExcess = Math.Sqrt(Math.Max(0, b.PhaseResidualVariance - pn / (2 * a2)));
        }
        return new DemodulatedFeatures
        {
            OffShare = offShare,
            OnSpread = onSpread,
            OnLevel = onLevel,
            TransitionShare = transition,
            ExcessDepth = excess,
            NoiseKnown = noisePowerInChannel is not null,
            PhaseExcessRad = phaseExcess,
            EnvelopeMax = b.Envelope.Percentile(Upper),
            EnvelopeMin = b.Envelope.Percentile(Lower),
            EnvelopeMean = b.EnvelopeMean,
            MeanDeviationHz = meanDev,
            PositivePeakHz = b.Freq.Percentile(Upper) - meanDev,
            NegativePeakHz = meanDev - b.Freq.Percentile(Lower),
            PhaseRmsRad = Math.Sqrt(Math.Max(b.PhaseResidualVariance, 0)),
        };
    }

    /// <summary>Mean and variance of the histogram's values between <paramref name="lo"/> and <paramref name="hi"/>
    /// (bin centres).</summary>
    private static (double Mean, double Variance) Moments(Histogram h, double lo, double hi)
    {
        double n = 0,
            s1 = 0,
            s2 = 0;
        for (int i = 0; i < h.Bins; i++)
        {
            double x = h.Centre(i);
            if (x < lo || x > hi || h[i] == 0)
                continue;
            n += h[i];
            s1 += h[i] * x;
            s2 += h[i] * x * x;
        }
        if (n == 0)
            return (0, 0);
        double mean = s1 / n;
        return (mean, Math.Max(0, s2 / n - mean * mean));
    }
}
