using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>The receiver's error read from a carrier of known frequency in the capture (a frequency standard fed in
/// with the signal): that carrier measured alone, as any emission is.</summary>
internal static class ReferenceCarrierMeasurement
{
    /// <summary>A reference carrier is sought within this many ppm of its stated frequency (a receiver without a
    /// disciplined oscillator is typically within a few tens of ppm: common practice).</summary>
    public const double ReferenceSearchPpm = 50;

    /// <summary>A reference carrier read further than this from its stated frequency, ppm, is warned about (a
    /// temperature-compensated receiver reference errs by a few ppm: common practice).</summary>
    public const double UnusualErrorPpm = 5;

    /// <summary>A reference carrier whose fit leaves a larger standard uncertainty than this, ppm, is too weak to
    /// correct a frequency tolerance of a few ppm.</summary>
    public const double MaxReferenceUncertaintyPpm = 0.1;

    internal static void RequireRf(CaptureInfo info, string setting, double value)
    {
        if (!FrequencyAxis.Of(info).IsAbsolute)
            throw new SettingException(
                setting,
                value,
                "needs the capture's RF centre frequency (an IQ capture with its centre stated), and this capture has "
                    + "none",
                info.Path
            );
    }

    /// <summary>
    /// Measures the carrier known to be at <paramref name="knownHz"/>: the narrowest emission within
    /// <see cref="ReferenceSearchPpm"/> of it, measured alone as the capture's other emissions are; it must be an
    /// unmodulated carrier read to <see cref="MaxReferenceUncertaintyPpm"/>. Returns the receiver error it shows and
    /// the carrier's place on the capture's axis (so the measured emission is never taken from it).
    /// </summary>
    public static (FrequencyReference, double AxisHz) Measure(
        CaptureSource source,
        AnalysisOptions options,
        double knownHz,
        Task<string> hash,
        CancellationToken cancel
    )
    {
        CaptureInfo info = source.Info;
        const string setting = nameof(AnalysisOptions.ReferenceCarrierHz);
        RequireRf(info, setting, knownHz);
        var axis = FrequencyAxis.Of(info);
        CultureInfo c = CultureInfo.InvariantCulture;
        var (first, count) = source.WindowSamples(options.StartS, options.DurationS);
        SpectrumSettings settings = Analyzer.SpectrumSettingsFor(options, count, info.SampleRateHz) with
        {
            KeepSpectrogram = false,
        };
        SpectrumResult spectrum = WelchEstimator.Estimate(source, settings, first, count, null, cancel);
        double search = Math.Max(ReferenceSearchPpm * 1e-6 * knownHz, 4 * spectrum.Mean.BinWidthHz);
        Emission? found = EmissionSelection.Narrowest(spectrum.Mean, axis.ToAxis(knownHz), search);
        if (found is null)
            throw new SettingException(
                setting,
                knownHz,
                string.Create(c, $"no carrier stands out of the noise within +/-{search:0} Hz ")
                    + string.Create(c, $"({ReferenceSearchPpm:0} ppm) of it in the capture"),
                info.Path
            );
        AnalysisOptions alone = options with
        {
            Signal = new SignalSelection(axis.ToReported(found.CentreHz)),
            NominalHz = knownHz,
            Expect = null,
            KeepSpectrogram = false,
            TrackIntervalS = null,
            ReferenceCarrierHz = null,
        };
        AnalysisResult r = Analyzer.Run(source, alone, null, cancel, null, hash, split: false, excludeAxisHz: null);
        string at = string.Create(c, $"the emission at {axis.ToReported(found.CentreHz):0.#} Hz");
        if (r.Carrier is not { } car || r.Classification.Kind != ModulationKind.Cw)
            throw new SettingException(
                setting,
                knownHz,
                $"{at} was classed {r.Classification.Kind.Name()}, not an unmodulated carrier: it cannot serve as the "
                    + "frequency reference",
                info.Path
            );
        double errorPpm = (car.FrequencyHz.Value / knownHz - 1) * 1e6,
            uPpm = car.FrequencyHz.StandardUncertainty / knownHz * 1e6;
        if (!(uPpm <= MaxReferenceUncertaintyPpm))
            throw new SettingException(
                setting,
                knownHz,
                string.Create(c, $"{at} is too weak to fit: its frequency is known to {uPpm:0.###} ppm (u), more ")
                    + string.Create(c, $"than the {MaxReferenceUncertaintyPpm} ppm a correction needs"),
                info.Path
            );
        var reference = new FrequencyReference
        {
            Source = FrequencyReference.ByReferenceCarrier,
            ErrorPpm = errorPpm,
            StandardUncertaintyPpm = uPpm,
            ReferenceCarrierHz = knownHz,
            ReferenceReadHz = car.FrequencyHz,
        };
        return (reference, found.CentreHz);
    }
}
