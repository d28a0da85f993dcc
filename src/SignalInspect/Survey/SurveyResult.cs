using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Survey;

/// <summary>One emission a survey found.</summary>
public sealed record SurveyEmission
{
    /// <summary>Its number in the survey, from 1 (strongest first).</summary>
    public required int Number { get; init; }

    /// <summary>Lower edge of the band it was detected in, Hz (reported axis: absolute RF when the centre is
    /// known).</summary>
    public required double LowHz { get; init; }

    /// <summary>Upper edge of that band, Hz.</summary>
    public required double HighHz { get; init; }

    /// <summary>Its centre, Hz: the measured carrier when it has one, else the occupied band's middle, else the
    /// detected band's power-weighted centre.</summary>
    public required double CentreHz { get; init; }

    /// <summary>Highest power in its band over one time step (noise included), dBFS (dBm with a
    /// calibration).</summary>
    public required double PeakPowerDb { get; init; }

    /// <summary>Mean power in its band over the time steps it was on (noise included), dBFS (dBm with a
    /// calibration).</summary>
    public required double MeanPowerDb { get; init; }

    /// <summary>Its power over the noise in its detected band while on, dB.</summary>
    public required double SnrDb { get; init; }

    /// <summary>Share of the analysed window it was on, percent.</summary>
    public required double OnAirPercent { get; init; }

    /// <summary>Start of the first time step it was on, s from the capture's first sample.</summary>
    public required double FirstSeenS { get; init; }

    /// <summary>End of the last time step it was on, s.</summary>
    public required double LastSeenS { get; init; }

    /// <summary>The number of the stronger emission whose mirror about 0 Hz this one is (the receiver's suspected IQ
    /// image of it), null when it mirrors none.</summary>
    public int? ImageOf { get; init; }

    /// <summary>Its analysis (class, carrier, bandwidth, deviation ...), null when not measured.</summary>
    public AnalysisResult? Analysis { get; init; }

    /// <summary>Why it was not measured, null when it was.</summary>
    public string? NotMeasuredReason { get; init; }

    /// <summary>Its class as the analysis found it, or "not measured".</summary>
    public string ClassName => Analysis?.Classification.Kind.ToString().ToLowerInvariant() ?? "not measured";

    /// <summary>Occupied bandwidth from its analysis, Hz; null when not measured.</summary>
    public double? OccupiedBandwidthHz => Analysis?.Bandwidth.OccupiedHz;
}

/// <summary>One channel's occupancy (ITU-R SM.1880 practice: the share of time steps whose channel power exceeds
/// a threshold over the channel's noise).</summary>
/// <param name="CentreHz">Channel centre, Hz (reported axis).</param>
/// <param name="WidthHz">Channel width, Hz.</param>
/// <param name="OccupancyPercent">Share of time steps occupied, percent.</param>
/// <param name="MeanPowerDb">Mean channel power over the window, dBFS (dBm with a calibration).</param>
/// <param name="MaxPowerDb">Highest channel power over one time step, dBFS.</param>
/// <param name="NoiseDb">The channel's noise power (the floor times its width), dBFS.</param>
public sealed record ChannelOccupancy(
    double CentreHz,
    double WidthHz,
    double OccupancyPercent,
    double MeanPowerDb,
    double MaxPowerDb,
    double NoiseDb
);

/// <summary>What a survey found.</summary>
public sealed record SurveyResult
{
    /// <summary>What was read.</summary>
    public required CaptureInfo Capture { get; init; }

    /// <summary>First analysed sample and the number analysed.</summary>
    public required (long First, long Count) Window { get; init; }

    /// <summary>The survey's spectrum: mean, max-hold and spectrogram.</summary>
    public required SpectrumResult Spectrum { get; init; }

    /// <summary>The noise density (mean spectrum), full scale^2 per Hz.</summary>
    public required double NoiseFloorDensity { get; init; }

    /// <summary>The detection threshold over the noise floor of one bin in one time step, dB (chi-square quantile of
    /// the maximum over the time steps at the false-alarm probability).</summary>
    public required double DetectionThresholdDb { get; init; }

    /// <summary>Length of one time step, s.</summary>
    public required double TimeStepS { get; init; }

    /// <summary>The settings used.</summary>
    public required SurveySettings Settings { get; init; }

    /// <summary>The emissions, strongest first.</summary>
    public required IReadOnlyList<SurveyEmission> Emissions { get; init; }

    /// <summary>The channels' occupancy (empty without a channel grid).</summary>
    public IReadOnlyList<ChannelOccupancy> Channels { get; init; } = [];

    /// <summary>Warnings, one line each.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];

    /// <summary>Notes on how the figures were obtained, one line each.</summary>
    public IReadOnlyList<string> Notes { get; init; } = [];
}
