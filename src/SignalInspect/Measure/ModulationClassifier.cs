using System.Globalization;

namespace SignalInspect.Measure;

/// <summary>Classification for triage.</summary>
/// <param name="Kind">The modulation used for the measurements (the --expect kind when given).</param>
/// <param name="Detected">What the classifier found.</param>
/// <param name="Confidence">Confidence of the classifier, 0 to 1.</param>
/// <param name="Expected">True when --expect chose the kind.</param>
/// <param name="Reason">One line on why.</param>
public sealed record Classification(
    ModulationKind Kind,
    ModulationKind Detected,
    double Confidence,
    bool Expected,
    string Reason
);

/// <summary>
/// The modulation classifier for triage: decides on the SNR, the envelope's depth, the phase's spread
/// about the fitted carrier and how much of the time the instantaneous frequency dwells on two tones.
/// </summary>
internal static class ModulationClassifier
{
    /// <summary>Below this SNR in the occupied bandwidth (dB) nothing is taken as a signal.</summary>
    public const double NoiseBelowSnrDb = 3;

    /// <summary>Phase rms (rad) below which the phase is steady: AM or an unmodulated carrier.</summary>
    public const double SteadyPhaseRad = 0.15;

    /// <summary>Envelope depth above which a steady-phase signal is AM.</summary>
    public const double AmDepth = 0.03;

    /// <summary>Share of time on two tones above which angle modulation is FSK.</summary>
    public const double FskDwell = 0.6;

    /// <summary>Share of the time the carrier must be absent (envelope at the noise) to be keyed or cut off.</summary>
    public const double OffShare = 0.02;

    /// <summary>Spread of the envelope while on, relative to its mean, below which an intermittent carrier is
    /// on-off keyed (steady when present) rather than AM cut off at zero.</summary>
    public const double SteadyOnSpread = 0.1;

    /// <summary>Share of the on-time below half the on-level under which an intermittent carrier whose level varies
    /// is pulsed (pulse amplitude modulation: flat-topped pulses with sharp edges) rather than AM cut off at zero,
    /// whose envelope passes through every level. A rectangular pulse through the channel filter spends about
    /// 1 / (channel width) per edge there.</summary>
    public const double PulsedTransitionShare = 0.15;

    /// <summary>Below this SNR (dB) the confidence is scaled down.</summary>
    public const double ConfidentSnrDb = 15;

    /// <summary>An envelope varying this much beyond the noise (20 %) while the phase also varies is neither AM nor
    /// angle modulation (a channel filter's ripple on FM stays well below it).</summary>
    public const double MixedEnvelopeDepth = 0.2;

    /// <summary>Classifies; with <paramref name="expect"/> the kind measured is the one given, and the reason says
    /// what the classifier found.</summary>
    public static Classification Classify(double snrDb, DemodulatedFeatures f, double dwell, ModulationKind? expect)
    {
        // A steady carrier is cw unless its envelope varies beyond what the measured noise explains.
        double mEnv = f.NoiseKnown ? f.ExcessDepth : f.EnvelopeDepth,
            sigmaPhase = f.PhaseExcessRad;
        ModulationKind detected;
        double conf;
        string why;
        CultureInfo c = CultureInfo.InvariantCulture;
        if (snrDb < NoiseBelowSnrDb)
        {
            detected = ModulationKind.Noise;
            conf = Math.Clamp(0.6 + (NoiseBelowSnrDb - snrDb) / 10, 0.5, 0.95);
            why = string.Create(c, $"no signal stands above the noise floor (SNR in band {snrDb:0.#} dB)");
        }
        else if (f.OffShare >= OffShare && f.OnSpread < SteadyOnSpread)
        {
            detected = ModulationKind.Ook;
            conf = Math.Clamp(0.7 + (SteadyOnSpread - f.OnSpread) * 2, 0.5, 0.97);
            why =
                string.Create(c, $"the carrier is absent {100 * f.OffShare:0} % of the time and steady when ")
                + string.Create(c, $"present (spread {100 * f.OnSpread:0.#} %): on-off keying");
        }
        else if (f.OffShare >= OffShare && f.TransitionShare < PulsedTransitionShare)
        {
            detected = ModulationKind.Ook;
            conf = Math.Clamp(0.6 + (PulsedTransitionShare - f.TransitionShare) * 2, 0.5, 0.9);
            why =
                string.Create(c, $"the carrier is absent {100 * f.OffShare:0} % of the time and jumps to levels that ")
                + string.Create(c, $"vary (spread {100 * f.OnSpread:0.#} %; {100 * f.TransitionShare:0.#} % of the ")
                + "on-time between): pulses of varying amplitude";
        }
        else if (f.OffShare >= OffShare)
        {
            detected = ModulationKind.Am;
            conf = 0.8;
            why =
                string.Create(c, $"the envelope falls to zero {100 * f.OffShare:0} % of the time and varies ")
                + "continuously in between: AM cut off at zero (overmodulated)";
        }
        else if (sigmaPhase < SteadyPhaseRad)
        {
            if (mEnv > AmDepth)
            {
                detected = ModulationKind.Am;
                conf = Math.Clamp(0.6 + 4 * (mEnv - AmDepth) + (SteadyPhaseRad - sigmaPhase), 0.5, 0.99);
                why = string.Create(
                    c,
                    $"steady phase (rms {sigmaPhase:0.###} rad) with an envelope that varies (depth {100 * mEnv:0.#} %)"
                );
            }
            else
            {
                detected = ModulationKind.Cw;
                conf = Math.Clamp(0.7 + (AmDepth - mEnv) * 5 + (SteadyPhaseRad - sigmaPhase), 0.5, 0.99);
                why =
                    string.Create(
                        c,
                        $"steady phase (rms {sigmaPhase:0.###} rad) and envelope (depth {100 * mEnv:0.##} %): an "
                    ) + "unmodulated carrier";
            }
        }
        else if (mEnv > MixedEnvelopeDepth)
        {
            // Angle modulation keeps its envelope; AM keeps its phase. Both moving is neither.
            detected = ModulationKind.Unknown;
            conf = Math.Clamp(0.5 + (mEnv - MixedEnvelopeDepth), 0.5, 0.9);
            why =
                string.Create(c, $"both the envelope (depth {100 * mEnv:0} % beyond the noise) and the phase (rms ")
                + string.Create(c, $"{sigmaPhase:0.##} rad) vary: neither AM nor angle modulation (a digital or ")
                + "combined modulation); measured for its bandwidths only";
        }
        else if (dwell > FskDwell)
        {
            detected = ModulationKind.Fsk;
            conf = Math.Clamp(0.5 + (dwell - FskDwell) * 1.5, 0.5, 0.99);
            why = string.Create(
                c,
                $"the instantaneous frequency dwells on discrete tones ({100 * dwell:0} % of the time)"
            );
        }
        else if (sigmaPhase * Math.Sqrt(2) <= Math.PI / 2)
        {
            // One tone cannot tell PM from FM (a tone's phase and its frequency are both sines); analogue voice
            // radios transmit FM (with pre-emphasis, phase-like above 300 Hz), so FM is the default: the
            // standard 1 kHz test tone at 1.5 kHz deviation is an index 1.5 signal, not PM.
            detected = ModulationKind.Fm;
            conf = 0.7;
            why =
                string.Create(
                    c,
                    $"angle modulation of small peak phase (about {sigmaPhase * Math.Sqrt(2):0.##} rad), read as FM "
                ) + "(one tone cannot tell PM from FM; give --expect pm for a phase-modulated transmitter)";
        }
        else
        {
            detected = ModulationKind.Fm;
            conf = Math.Clamp(0.6 + (sigmaPhase * Math.Sqrt(2) - Math.PI / 2) / 4 + (FskDwell - dwell) / 2, 0.5, 0.97);
            why =
                string.Create(
                    c,
                    $"angle modulation (peak phase about {sigmaPhase * Math.Sqrt(2):0.#} rad) with a continuous "
                ) + "instantaneous frequency";
        }
        if (snrDb < ConfidentSnrDb && detected != ModulationKind.Noise)
            conf *= Math.Clamp((snrDb - NoiseBelowSnrDb) / (ConfidentSnrDb - NoiseBelowSnrDb), 0.3, 1);
        return expect is { } e
            ? new Classification(
                e,
                detected,
                conf,
                true,
                $"measured as {e.Name()} (--expect); the classifier found {detected.Name()}: {why}"
            )
            : new Classification(detected, detected, conf, false, why);
    }
}
