namespace SignalInspect.Spectrum;

/// <summary>What one Welch pass over a capture gives: the mean and max-hold spectra and the spectrogram.</summary>
public sealed record SpectrumResult
{
    /// <summary>Mean of the segments' periodograms, density scaling (the Welch PSD).</summary>
    public required PowerSpectrum Mean { get; init; }

    /// <summary>Per-bin maximum over the segments, density scaling.</summary>
    public required PowerSpectrum MaxHold { get; init; }

    /// <summary>Power over time and frequency; null when the settings asked for none (<see
    /// cref="SpectrumSettings.KeepSpectrogram"/>).</summary>
    public required Spectrogram? Spectrogram { get; init; }

    /// <summary>First sample of the analysed window within the capture.</summary>
    public required long FirstSample { get; init; }

    /// <summary>Samples covered by the segments.</summary>
    public required long SamplesAnalysed { get; init; }

    /// <summary>Bins replaced by interpolation around 0 Hz, 0 when DC suppression is off.</summary>
    public int DcBinsSuppressed { get; init; }

    /// <summary>Segments that held NaN or infinite samples (those samples were taken as 0).</summary>
    public long NonFiniteSegments { get; init; }

    /// <summary>Worker threads used.</summary>
    public int Threads { get; init; }
}
