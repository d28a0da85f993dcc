using SignalInspect.Demodulation;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>
/// The modulating frequency: the strongest line of the demodulated signal's spectrum (the envelope's
/// for AM, the instantaneous frequency's for FM and PM), interpolated on a log parabola.
/// </summary>
internal static class ModulatingTone
{
    /// <summary>The tone of a signal of <paramref name="kind"/>, or null when none stands out or the kind has
    /// none.</summary>
    public static Measured? Find(
        ModulationKind kind,
        PassResult pass,
        double minHz,
        double envelopeTopHz,
        double postLowPassHz
    )
    {
        LineSpectrum? source = kind switch
        {
            ModulationKind.Am => pass.EnvelopeSpectrum,
            ModulationKind.Fm or ModulationKind.Pm => pass.ToneSpectrum,
            _ => null,
        };
        double top = kind == ModulationKind.Am ? envelopeTopHz : postLowPassHz;
        return source is null ? null : Find(source, minHz, top);
    }

    /// <summary>The strongest line of <paramref name="source"/> between <paramref name="minHz"/> and
    /// <paramref name="topHz"/>, with its resolution as its uncertainty; null when none stands out.</summary>
    public static Measured? Find(LineSpectrum source, double minHz, double topHz)
    {
        if (source.Peak(minHz, topHz) is not { } peak)
            return null;
        double resolution = Math.Max(source.BinWidthHz / TypeB.ToneBinDivisor, TypeB.ToneFraction * peak.FrequencyHz);
        return Measured.FromBudget(
            peak.FrequencyHz,
            new UncertaintyComponent("resolution (interpolated line)", resolution, "TypeB.ToneBinDivisor, ToneFraction")
        );
    }
}
