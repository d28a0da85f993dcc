using SignalInspect.Capture;

namespace SignalInspect.Spectrum;

/// <summary>
/// The frequency axis of a capture's spectrum and of every frequency measured on it: offsets from
/// the tuning centre for complex (IQ) input, audio frequency for real input. Reported frequencies
/// are absolute RF when the input is complex and its centre frequency is known. The one place that
/// decides it.
/// </summary>
/// <param name="IsComplex">Complex (IQ) input.</param>
/// <param name="CenterFrequencyHz">Tuning centre, Hz, when known.</param>
public readonly record struct FrequencyAxis(bool IsComplex, double? CenterFrequencyHz)
{
    /// <summary>The axis of a capture.</summary>
    public static FrequencyAxis Of(CaptureInfo info) => new(info.IsComplex, info.CenterFrequencyHz);

    /// <summary>True when reported frequencies are absolute RF (complex input with a known centre).</summary>
    public bool IsAbsolute => IsComplex && CenterFrequencyHz is not null;

    /// <summary>A frequency on the axis as reported: centre + offset when absolute, else unchanged.</summary>
    public double ToReported(double axisHz) => IsComplex && CenterFrequencyHz is { } c ? c + axisHz : axisHz;

    /// <summary>A reported frequency back on the axis: the inverse of <see cref="ToReported"/>.</summary>
    public double ToAxis(double reportedHz) => IsComplex && CenterFrequencyHz is { } c ? reportedHz - c : reportedHz;
}
