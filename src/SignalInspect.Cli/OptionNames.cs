namespace SignalInspect.Cli;

/// <summary>
/// The command line's spelling of each setting the core names in a <see cref="SettingException"/>
/// (by its settings property): the one map from core settings to options.
/// </summary>
internal static class OptionNames
{
    /// <summary>Setting (property name) to option.</summary>
    public static IReadOnlyDictionary<string, string> BySetting { get; } =
        new Dictionary<string, string>(StringComparer.Ordinal)
        {
            // Reading (ReaderOptions) and the window (AnalysisOptions, SignalSpec)
            ["SampleRateHz"] = "--sample-rate",
            ["CenterFrequencyHz"] = "--center-frequency",
            ["Datatype"] = "--datatype",
            ["Channels"] = "--channel",
            ["Segment"] = "--segment",
            ["VerifyChecksum"] = "--no-verify",
            ["StartS"] = "--start",
            ["DurationS"] = "--duration",
            ["TrackIntervalS"] = "--track-interval",
            // Spectrum (SpectrumSettings)
            ["FftSize"] = "--fft",
            ["RbwHz"] = "--rbw",
            ["OverlapFraction"] = "--overlap",
            ["KaiserBeta"] = "--window",
            ["CalibrationDb"] = "--calibration",
            ["Threads"] = "--threads",
            // Measuring (AnalysisOptions)
            ["NominalHz"] = "--nominal",
            ["Expect"] = "--expect",
            ["Signal"] = "--signal",
            ["ObwPercent"] = "--obw-percent",
            ["Xdb"] = "--xdb",
            ["PostLowPassHz"] = "--post-lowpass",
            ["PostHighPassHz"] = "--post-highpass",
            ["DeEmphasisUs"] = "--deemphasis",
            ["ReceiverErrorPpm"] = "--receiver-error",
            ["ReceiverErrorUncertaintyPpm"] = "--receiver-error-uncertainty",
            ["ReferenceCarrierHz"] = "--reference-carrier",
            ["DiscriminatorHzPerFullScale"] = "--discriminator",
            ["DiscriminatorUncertaintyPercent"] = "--discriminator-uncertainty",
            // Synthesis (SignalSpec)
            ["Amplitude"] = "--amplitude",
            ["CarrierOffsetHz"] = "--offset",
            ["ModulatingFrequencyHz"] = "--tone",
            ["AmDepth"] = "--depth",
            ["PeakDeviationHz"] = "--deviation",
            ["PeakPhaseRad"] = "--phase-deviation",
            ["FskShiftHz"] = "--shift",
            ["SymbolRateBd"] = "--symbol-rate",
            ["DriftHzPerS"] = "--drift",
            ["SnrDb"] = "--snr",
            ["ExtraTones"] = "--add-tone",
            ["Spurs"] = "--spur",
            ["Bursts"] = "--burst",
            ["KeyUp"] = "--key-up",
            ["PulseWidthS"] = "--pulse-width",
            ["PulsePeriodS"] = "--pulse-period",
            ["PulseAmDepth"] = "--pulse-am",
            ["PulsePositionS"] = "--pulse-ppm",
            ["ImageDbc"] = "--image",
            ["NoiseBandHz"] = "--noise-band",
            ["Others"] = "--also",
            ["ResidualFmHz"] = "--residual-fm",
            ["CodeSquelch"] = "--code-squelch",
            ["ReverseBurst"] = "--reverse-burst",
            ["ReferenceDeviationHz"] = "--reference-deviation",
            // Survey (SurveySettings)
            ["MinSnrDb"] = "--min-snr",
            ["Rows"] = "--time-steps",
            ["ChannelGrid"] = "--channels",
            ["OccupancyThresholdDb"] = "--occupancy-threshold",
            ["MaxMeasured"] = "--max-measured",
        };

    /// <summary>The option for a setting (the setting's own name when the command line has none).</summary>
    public static string For(string setting) => BySetting.TryGetValue(setting, out string? o) ? o : setting;
}
