using SignalInspect.Dsp;

namespace SignalInspect.Spectrum;

/// <summary>Settings of a Welch spectrum estimate and its spectrogram.</summary>
public sealed record SpectrumSettings
{
    /// <summary>Default FFT size.</summary>
    public const int DefaultFftSize = 4096;

    /// <summary>FFT (segment) size N: 16 to 1048576 points; powers of two are fastest.</summary>
    public int FftSize { get; init; } = DefaultFftSize;

    /// <summary>Window shape (periodic form).</summary>
    public WindowKind Window { get; init; } = WindowKind.Hann;

    /// <summary>Kaiser beta when <see cref="Window"/> is Kaiser.</summary>
    public double KaiserBeta { get; init; } = 8.6;

    /// <summary>Overlap of consecutive segments, 0 to 0.95 (0.5 = 50 %).</summary>
    public double OverlapFraction { get; init; } = 0.5;

    /// <summary>Replace the bins around 0 Hz of a complex spectrum (a receiver's DC spike) by interpolation.</summary>
    public bool SuppressDc { get; init; }

    /// <summary>Offset in dB added to every dB value (e.g. to read dBm at a calibrated input); 0 for dBFS.</summary>
    public double CalibrationDb { get; init; }

    /// <summary>
    /// Whether to keep the spectrogram (true by default). Off when only the spectra are wanted: the
    /// map, 256 x 4096 values by default (8 MB), is then neither filled nor allocated.
    /// </summary>
    public bool KeepSpectrogram { get; init; } = true;

    /// <summary>Most rows of the spectrogram (segments are grouped to fit), 1 to 4096.</summary>
    public int SpectrogramRows { get; init; } = 256;

    /// <summary>How segments are combined within a spectrogram row.</summary>
    public SpectrumAveraging SpectrogramAveraging { get; init; } = SpectrumAveraging.Mean;

    /// <summary>Most columns of the spectrogram (adjacent bins are averaged to fit).</summary>
    public int SpectrogramColumns { get; init; } = 4096;

    /// <summary>Worker threads; null for one per core.</summary>
    public int? Threads { get; init; }

    /// <summary>Samples between segment starts: N - round(overlap x N), at least 1.</summary>
    public int StepSamples => Math.Max(1, FftSize - (int)Math.Round(OverlapFraction * FftSize));

    /// <summary>The overlap in samples, as scipy's noverlap.</summary>
    public int OverlapSamples => FftSize - StepSamples;

    /// <summary>Checks every setting; the message names it and its range.</summary>
    /// <exception cref="SettingException">A setting is out of range (named by its property).</exception>
    public void Validate()
    {
        if (FftSize is < 16 or > 1 << 20)
            throw new SettingException(nameof(FftSize), FftSize, "must be from 16 to 1048576 points");
        if (!double.IsFinite(OverlapFraction) || OverlapFraction < 0 || OverlapFraction > 0.95)
            throw new SettingException(nameof(OverlapFraction), OverlapFraction * 100, "must be from 0 to 95 percent");
        if (Window == WindowKind.Kaiser && (!double.IsFinite(KaiserBeta) || KaiserBeta < 0))
            throw new SettingException(nameof(KaiserBeta), KaiserBeta, "the Kaiser beta must be 0 or more");
        if (!double.IsFinite(CalibrationDb))
            throw new SettingException(nameof(CalibrationDb), CalibrationDb, "must be a number of dB");
        if (SpectrogramRows is < 1 or > 4096)
            throw new ArgumentOutOfRangeException(nameof(SpectrogramRows), SpectrogramRows, "must be from 1 to 4096");
        if (SpectrogramColumns is < 16 or > 65536)
            throw new ArgumentOutOfRangeException(
                nameof(SpectrogramColumns),
                SpectrogramColumns,
                "must be from 16 to 65536"
            );
        if (Threads is < 1 or > 64)
            throw new SettingException(nameof(Threads), Threads, "must be from 1 to 64");
    }

    /// <summary>
    /// The power-of-two FFT size whose resolution bandwidth (window ENBW x fs / N) is nearest to
    /// <paramref name="rbwHz"/> on a log scale, clamped to 16..1048576.
    /// </summary>
    public static int FftSizeForRbw(double rbwHz, double sampleRateHz, WindowKind window, double kaiserBeta = 8.6)
    {
        if (!double.IsFinite(rbwHz) || rbwHz <= 0)
            throw new SettingException("RbwHz", rbwHz, "must be a positive number of Hz");
        double enbw = Dsp.Window.Create(window, 1024, kaiserBeta).EnbwBins;
        double n = enbw * sampleRateHz / rbwHz;
        int p = (int)Math.Round(Math.Log2(Math.Max(n, 1)));
        return 1 << Math.Clamp(p, 4, 20);
    }
}
