using SignalInspect.Dsp;

namespace SignalInspect.Spectrum;

/// <summary>How a spectrum's values are scaled (the two conventions of scipy.signal.welch).</summary>
public enum SpectrumScaling
{
    /// <summary>Power spectral density in full-scale^2 per Hz: |X|^2 / (fs sum w^2) (scipy 'density'); shown as
    /// dBFS/Hz.</summary>
    DensityPerHz,

    /// <summary>Power per bin in full-scale^2: |X|^2 / (sum w)^2 (scipy 'spectrum'); a tone of amplitude A reads A^2/2
    /// (real) or A^2 (complex). Shown as dBFS.</summary>
    PowerPerBin,
}

/// <summary>How the periodograms of the segments are combined.</summary>
public enum SpectrumAveraging
{
    /// <summary>Mean of the segments' periodograms (Welch 1967).</summary>
    Mean,

    /// <summary>Largest value of each bin over all segments (max-hold, for mask checks).</summary>
    MaxHold,
}

/// <summary>
/// A power spectrum on an ascending frequency axis: two-sided and centred on the capture's centre
/// for complex input (frequencies are offsets from the centre), one-sided from 0 to fs/2 for real
/// input (frequencies are audio frequencies). Values are linear, in the stated scaling; full scale
/// means amplitude 1.0.
/// </summary>
public sealed class PowerSpectrum
{
    private readonly double[] _values;
    private readonly double[] _frequencies;

    internal PowerSpectrum(
        double[] frequenciesHz,
        double[] values,
        SpectrumScaling scaling,
        SpectrumAveraging averaging,
        SpectrumSettings settings,
        Window window,
        double sampleRateHz,
        double? centerFrequencyHz,
        bool isOneSided,
        long segments
    )
    {
        _frequencies = frequenciesHz;
        _values = values;
        Scaling = scaling;
        Averaging = averaging;
        Settings = settings;
        Window = window;
        SampleRateHz = sampleRateHz;
        CenterFrequencyHz = centerFrequencyHz;
        IsOneSided = isOneSided;
        Segments = segments;
    }

    /// <summary>Bin frequencies in Hz, ascending: offsets from the centre (complex) or audio frequencies
    /// (real).</summary>
    public ReadOnlySpan<double> FrequenciesHz => _frequencies;

    /// <summary>Linear values in <see cref="Scaling"/> units.</summary>
    public ReadOnlySpan<double> Values => _values;

    /// <summary>Number of bins.</summary>
    public int Count => _values.Length;

    /// <summary>The scaling of <see cref="Values"/>.</summary>
    public SpectrumScaling Scaling { get; }

    /// <summary>How segments were combined.</summary>
    public SpectrumAveraging Averaging { get; }

    /// <summary>The settings used.</summary>
    public SpectrumSettings Settings { get; }

    /// <summary>The window used.</summary>
    public Window Window { get; }

    /// <summary>Sample rate in Hz.</summary>
    public double SampleRateHz { get; }

    /// <summary>Centre frequency of the capture in Hz, null when unknown (or for real input).</summary>
    public double? CenterFrequencyHz { get; }

    /// <summary>True for the one-sided spectrum of a real signal.</summary>
    public bool IsOneSided { get; }

    /// <summary>Segments averaged.</summary>
    public long Segments { get; }

    /// <summary>Bin spacing fs / N in Hz.</summary>
    public double BinWidthHz => SampleRateHz / Settings.FftSize;

    /// <summary>Resolution bandwidth: the window's equivalent noise bandwidth in Hz.</summary>
    public double RbwHz => Window.EnbwHz(SampleRateHz);

    /// <summary>Absolute RF frequency of bin <paramref name="index"/> when the centre is known, else its
    /// offset.</summary>
    public double AbsoluteFrequencyHz(int index) => _frequencies[index] + (IsOneSided ? 0 : CenterFrequencyHz ?? 0);

    /// <summary>Value of a bin in dB (10 log10) plus the calibration offset: dBFS/Hz or dBFS (dBm/Hz or dBm when
    /// calibrated).</summary>
    public double Db(int index) => ToDb(_values[index]);

    /// <summary>10 log10(value) + calibration offset; -400 dB for zero.</summary>
    public double ToDb(double value) => (value > 0 ? 10 * Math.Log10(value) : -400) + Settings.CalibrationDb;

    /// <summary>
    /// The same spectrum in another scaling. Power per bin = density x ENBW(Hz) (the identity
    /// spectrum/density = ENBW in Hz of scipy's two scalings).
    /// </summary>
    public PowerSpectrum In(SpectrumScaling scaling)
    {
        if (scaling == Scaling)
            return this;
        double k = scaling == SpectrumScaling.PowerPerBin ? RbwHz : 1.0 / RbwHz;
        return new PowerSpectrum(
            _frequencies,
            [.. _values.Select(v => v * k)],
            scaling,
            Averaging,
            Settings,
            Window,
            SampleRateHz,
            CenterFrequencyHz,
            IsOneSided,
            Segments
        );
    }

    /// <summary>
    /// The same spectrum with the bins outside [<paramref name="first"/>, <paramref name="last"/>], and those of
    /// <paramref name="others"/> inside it, set to <paramref name="fill"/> (the noise floor): the spectrum of one
    /// emission, for measuring it alone.
    /// </summary>
    public PowerSpectrum Only(int first, int last, IEnumerable<(int First, int Last)> others, double fill)
    {
        double[] v = [.. _values];
        for (int i = 0; i < v.Length; i++)
            if (i < first || i > last)
                v[i] = fill;
        foreach (var (a, b) in others)
            for (int i = Math.Max(a, first); i <= Math.Min(b, last); i++)
                v[i] = fill;
        return new PowerSpectrum(
            _frequencies,
            v,
            Scaling,
            Averaging,
            Settings,
            Window,
            SampleRateHz,
            CenterFrequencyHz,
            IsOneSided,
            Segments
        );
    }

    /// <summary>The bin nearest <paramref name="hz"/> (clamped to the spectrum).</summary>
    public int BinOf(double hz) =>
        Math.Clamp((int)Math.Round((hz - _frequencies[0]) / BinWidthHz), 0, _values.Length - 1);

    /// <summary>Index of the largest value.</summary>
    public int PeakIndex()
    {
        int best = 0;
        for (int i = 1; i < _values.Length; i++)
            if (_values[i] > _values[best])
                best = i;
        return best;
    }

    /// <summary>Total power in full-scale^2: the sum of density values times the bin width (Parseval for the mean
    /// spectrum).</summary>
    public double TotalPower()
    {
        double s = 0;
        foreach (double v in _values)
            s += v;
        return Scaling == SpectrumScaling.DensityPerHz ? s * BinWidthHz : s * BinWidthHz / RbwHz;
    }
}
