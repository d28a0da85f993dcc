using SignalInspect.Measure;

namespace SignalInspect.Survey;

/// <summary>A grid of equal channels: <paramref name="Count"/> channels <paramref name="StepHz"/> wide, the first
/// centred at <paramref name="FirstCentreHz"/> (absolute RF when the capture's centre is known, else on the
/// capture's axis).</summary>
/// <param name="FirstCentreHz">The first channel's centre, Hz.</param>
/// <param name="StepHz">Channel spacing and width, Hz.</param>
/// <param name="Count">Number of channels.</param>
public sealed record ChannelGrid(double FirstCentreHz, double StepHz, int Count)
{
    /// <summary>Most channels in one grid.</summary>
    public const int MaxCount = 100_000;

    /// <summary>Channel <paramref name="k"/>'s centre, Hz.</summary>
    public double CentreHz(int k) => FirstCentreHz + k * StepHz;
}

/// <summary>What <see cref="BandSurvey.Run"/> asks for besides the capture.</summary>
public sealed record SurveySettings
{
    /// <summary>How each emission found is measured (the analysis <c>analyze</c> runs, with the emission selected);
    /// its window, FFT size or RBW, spectrum window and calibration also set the survey's own spectrum.</summary>
    public AnalysisOptions Analysis { get; init; } = new();

    /// <summary>An emission holds at least this SNR in its own bins while on, dB.</summary>
    public double MinSnrDb { get; init; } = 6;

    /// <summary>Time steps of the time-resolved pass (spectrogram rows); the time resolution is the window's length
    /// over this.</summary>
    public int Rows { get; init; } = 512;

    /// <summary>Channels whose occupancy is wanted; null for none.</summary>
    public ChannelGrid? ChannelGrid { get; init; }

    /// <summary>A channel is occupied in a time step when its power stands this far over its noise, dB.</summary>
    public double OccupancyThresholdDb { get; init; } = 6;

    /// <summary>Whether each emission is measured by the analysis (class, deviation, depth ...); false lists them
    /// only.</summary>
    public bool MeasureEach { get; init; } = true;

    /// <summary>Most emissions measured one by one (the strongest); the rest are listed only.</summary>
    public int MaxMeasured { get; init; } = 64;

    /// <summary>Checks every setting; the message names it.</summary>
    /// <exception cref="SettingException">A setting is out of range (named by its property).</exception>
    public void Validate()
    {
        Analysis.Validate();
        if (!(MinSnrDb >= 0 && MinSnrDb <= 100))
            throw new SettingException(nameof(MinSnrDb), MinSnrDb, "must be from 0 to 100 dB");
        if (Rows is < 8 or > 4096)
            throw new SettingException(nameof(Rows), Rows, "must be from 8 to 4096 time steps");
        if (!(OccupancyThresholdDb >= 0 && OccupancyThresholdDb <= 100))
            throw new SettingException(nameof(OccupancyThresholdDb), OccupancyThresholdDb, "must be from 0 to 100 dB");
        if (MaxMeasured is < 0 or > 10_000)
            throw new SettingException(nameof(MaxMeasured), MaxMeasured, "must be from 0 to 10000");
        if (ChannelGrid is { } g)
        {
            if (!(double.IsFinite(g.FirstCentreHz) && g.StepHz > 0 && double.IsFinite(g.StepHz)))
                throw new SettingException(
                    nameof(ChannelGrid),
                    g.StepHz,
                    "needs a finite first centre and a positive step in Hz"
                );
            if (g.Count is < 1 or > ChannelGrid.MaxCount)
                throw new SettingException(
                    nameof(ChannelGrid),
                    g.Count,
                    $"must hold 1 to {ChannelGrid.MaxCount} channels"
                );
        }
    }
}
