using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>FM measurements from the post-detection instantaneous frequency.</summary>
public sealed record FmResult
{
    /// <summary>Peak deviation: the larger of the positive and negative peaks, Hz.</summary>
    public required Measured PeakDeviationHz { get; init; }

    /// <summary>Peak phase of the same signal, rad: the sum of each modulating component's D_i / f_i (the phase
    /// waveform's peak when the tones drift through every phase), or D / fm for one tone; null without a
    /// tone.</summary>
    public double? PeakPhaseRad { get; init; }

    /// <summary>Positive peak (99.9th percentile of the deviation), Hz.</summary>
    public required double PositivePeakHz { get; init; }

    /// <summary>Negative peak (0.1th percentile, as a positive number), Hz.</summary>
    public required double NegativePeakHz { get; init; }

    /// <summary>Half the peak-to-peak deviation, Hz.</summary>
    public required double HalfPeakToPeakHz { get; init; }

    /// <summary>RMS deviation about the carrier, Hz.</summary>
    public required double RmsDeviationHz { get; init; }

    /// <summary>Modulation index D / fm, null without a modulating frequency.</summary>
    public double? ModulationIndex { get; init; }
}

/// <summary>
/// FM peak deviation from the post-detection instantaneous frequency: its 99.9th and 0.1th
/// percentiles about the mean (the carrier), corrected for the noise when one tone dominates.
/// </summary>
internal static class FmMeasurement
{
    /// <summary>
    /// The rms of the discriminator's noise after the post-detection low-pass B, from the channel's measured noise
    /// density N0 and carrier amplitude A alone (not the modulation): the phase noise of a carrier in complex white
    /// noise has the density N0 / (2 A^2), the frequency noise f^2 times that, so sigma^2 = N0 B^3 / (3 A^2) (the
    /// parabolic noise spectrum of FM, a textbook result; derived here, not quoted).
    /// </summary>
    private static double DiscriminatorNoiseHz(MeasurementInputs m)
    {
        double n0 = m.Bandwidth.NoiseFloorDensity * (m.Info.IsComplex ? 1 : 2),
            a2 = m.Features.EnvelopeMean * m.Features.EnvelopeMean,
            b = m.Channel.PostLowPassHz;
        return a2 > 0 ? Math.Sqrt(n0 * b * b * b / (3 * a2)) : 0;
    }

    /// <summary>Measures an FM signal.</summary>
    public static (FmResult Result, MeasurementExtras Extras) Measure(MeasurementInputs m) =>
        Measure(
            new FmStream(
                m.Pass.ToneSpectrum,
                m.Components,
                m.Tone,
                m.MinToneHz,
                m.Channel.PostLowPassHz,
                m.Pass.Freq,
                m.Features.PositivePeakHz,
                m.Features.NegativePeakHz,
                m.Pass.FreqMean,
                m.Pass.FreqRms,
                m.Pass.Samples,
                DiscriminatorNoiseHz(m),
                m.Channel.DecimatedRateHz,
                m.NoiseGrowth
            )
        );

    /// <summary>Measures FM from its instantaneous frequency stream, however it was obtained (demodulated here or
    /// recorded at a receiver's discriminator).</summary>
    public static (FmResult Result, MeasurementExtras Extras) Measure(FmStream m)
    {
        double pPos = m.PositivePeakHz,
            pNeg = m.NegativePeakHz;
        bool corrected =
            m.Tone is { } tone
            && TonePeaks.TryCorrect(m.ToneSpectrum, m.Components, tone.Value, m.MinToneHz, m.TopHz, ref pPos, ref pNeg);
        // Several components: the peak of their sum is rare (tones align seldom) and a percentile reads it low (eight
        // tones: 2825 Hz for 3720). Each side's peak is then the larger of the percentile and the extreme less what
        // the noise can add to an extreme (sqrt(2 ln N) of its rms, from the channel's SNR alone).
        double extremeLift = 0;
        if (!corrected && m.Components.Count >= 2)
        {
            double lift = TonePeaks.ExtremeLift(m.NoiseHz, m.Samples);
            double xPos = m.Freq.Max - m.MeanHz - lift,
                xNeg = m.MeanHz - m.Freq.Min - lift;
            // The budget carries the extreme's terms only where the extreme decides.
            if (Math.Max(xPos, xNeg) > Math.Max(pPos, pNeg))
                extremeLift = lift;
            pPos = Math.Max(pPos, xPos);
            pNeg = Math.Max(pNeg, xNeg);
        }
        double peak = Math.Max(pPos, pNeg);
        UncertaintyComponent[] budget = PeakBudget.Of(
            peak,
            TypeB.FmPeakFraction,
            m.NoiseGrowth,
            m.Freq.BinWidth,
            "TypeB.FmPeakFraction"
        );
        if (corrected && m.Tone is { } tc)
            budget =
            [
                .. budget,
                new(
                    "noise under the corrected peak",
                    TypeB.FmCorrectedPeakNoiseShare
                        * Math.Sqrt(m.ToneSpectrum.Split(tc.Value, m.MinToneHz, m.TopHz).Noise),
                    "TypeB.FmCorrectedPeakNoiseShare x rms of the demodulated noise"
                ),
            ];
        if (!corrected && m.Tone is { } raw)
            budget =
            [
                .. budget,
                RawNoiseComponent(
                    TonePeaks.RawPeakNoise(m.ToneSpectrum, m.Components, raw.Value, m.MinToneHz, m.TopHz, 1),
                    peak,
                    m.Components.Count
                ),
            ];
        if (extremeLift > 0)
            budget = [.. budget, .. TonePeaks.ExtremeBudget(extremeLift, m.Components, m.RateHz)];
        if (!corrected && m.Components.Count >= 2)
            budget =
            [
                .. budget,
                new(
                    "percentile below the sum's peak",
                    2
                        * Math.PI
                        * (1 - DemodulatedFeatures.Upper)
                        * Math.Sqrt(m.Components[0].PeakAmount * m.Components[1].PeakAmount),
                    "the 99.9th percentile of two incommensurate tones of peaks A and B lies about "
                        + "2 pi 0.001 sqrt(A B) below A + B (the cap of the torus above the level)"
                ),
            ];
        if (m.Extra is { } extra)
            budget = [.. budget, extra(peak)];

        var result = new FmResult
        {
            PeakDeviationHz = Measured.FromBudget(peak, budget),
            PositivePeakHz = pPos,
            NegativePeakHz = pNeg,
            HalfPeakToPeakHz = (pPos + pNeg) / 2,
            RmsDeviationHz = m.RmsHz,
            ModulationIndex = m.Tone is { } t ? peak / t.Value : null,
            PeakPhaseRad =
                m.Components.Count > 0 ? m.Components.Sum(c => c.PeakAmount / c.FrequencyHz)
                : m.Tone is { } t1 ? peak / t1.Value
                : null,
        };
        double? necessary = m.Tone is { } mt ? EmissionDesignator.AngleModulationBandwidthHz(mt.Value, peak) : null;
        return (result, new MeasurementExtras(necessary, corrected));
    }

    /// <summary>The noise's share of a raw (uncorrected) peak's uncertainty: <paramref name="rms"/> times
    /// <see cref="TypeB.RawPeakNoiseShare"/> + <see cref="TypeB.RawPeakNoiseGrowth"/> x rms / peak for a sum of two
    /// tones (what the Monte Carlo sampled); the whole rms for more components (a code word's many lines under a
    /// tone keep the sum near its peak for long stretches, where the noise lifts a percentile by about its rms: FM
    /// 2 kHz by 1 kHz with a 600 Hz word read 58 Hz high at 38 dB).</summary>
    internal static UncertaintyComponent RawNoiseComponent(double rms, double peak, int components) =>
        components <= 2
            ? new(
                "noise on the raw peak",
                rms * (TypeB.RawPeakNoiseShare + TypeB.RawPeakNoiseGrowth * rms / Math.Max(peak, 1e-30)),
                "rms of the demodulated noise (band power less the modulating components') x "
                    + "(TypeB.RawPeakNoiseShare + TypeB.RawPeakNoiseGrowth x rms / peak)"
            )
            : new(
                "noise on the raw peak",
                rms,
                "rms of the demodulated noise (more than two components: the whole rms)"
            );
}

internal sealed record FmStream(
    LineSpectrum ToneSpectrum,
    IReadOnlyList<ModulatingComponent> Components,
    Measured? Tone,
    double MinToneHz,
    double TopHz,
    Dsp.Histogram Freq,
    double PositivePeakHz,
    double NegativePeakHz,
    double MeanHz,
    double RmsHz,
    long Samples,
    double NoiseHz,
    double RateHz,
    double NoiseGrowth,
    Func<double, UncertaintyComponent>? Extra = null
);
