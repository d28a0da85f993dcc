using System.CommandLine;
using SignalInspect.Measure;
using SignalInspect.Survey;

namespace SignalInspect.Cli;

/// <summary>The options of a survey, shared by <c>survey</c> and <c>batch --survey</c>.</summary>
internal sealed class SurveyOptionSet
{
    private readonly Option<string?> channels = new("--channels")
    {
        Description =
            "Channel grid for occupancy, START:STEP:COUNT: COUNT channels STEP Hz wide, the first centred at START "
            + "(absolute RF when the centre is known), e.g. 462.5625M:12.5k:8.",
        HelpName = "START:STEP:COUNT",
    };

    private readonly Option<double> minSnr = new("--min-snr")
    {
        Description = "Least SNR of an emission in its own bins while on, dB.",
        DefaultValueFactory = _ => 6,
        HelpName = "DB",
    };

    private readonly Option<double> threshold = new("--occupancy-threshold")
    {
        Description = "A channel is occupied in a time step when its power exceeds its noise by this much, dB.",
        DefaultValueFactory = _ => 6,
        HelpName = "DB",
    };

    private readonly Option<int> steps = new("--time-steps")
    {
        Description = "Time steps of the time-resolved pass (the time resolution is the window over this).",
        DefaultValueFactory = _ => 512,
        HelpName = "N",
    };

    private readonly Option<bool> listOnly = new("--list-only")
    {
        Description = "List the emissions without measuring each (faster: one pass over the capture).",
    };

    private readonly Option<int> maxMeasured = new("--max-measured")
    {
        Description = "Measure at most this many emissions (the strongest); the rest are listed.",
        DefaultValueFactory = _ => 64,
        HelpName = "N",
    };

    public void AddTo(Command cmd)
    {
        foreach (Option o in new Option[] { channels, minSnr, threshold, steps, listOnly, maxMeasured })
            cmd.Options.Add(o);
    }

    /// <summary>The first of these options given on the command line, or null.</summary>
    public string? FirstGiven(ParseResult r) =>
        new Option[] { channels, minSnr, threshold, steps, listOnly, maxMeasured }
            .FirstOrDefault(o => r.GetResult(o) is { Implicit: false })
            ?.Name;

    /// <summary>The survey settings of the command line, each emission measured with <paramref name="analysis"/>;
    /// checked.</summary>
    public SurveySettings Read(ParseResult r, AnalysisOptions analysis)
    {
        var settings = new SurveySettings
        {
            Analysis = analysis,
            MinSnrDb = r.GetValue(minSnr),
            OccupancyThresholdDb = r.GetValue(threshold),
            Rows = r.GetValue(steps),
            ChannelGrid = r.GetValue(channels) is { } g ? ParseGrid(g) : null,
            MeasureEach = !r.GetValue(listOnly),
            MaxMeasured = r.GetValue(maxMeasured),
        };
        settings.Validate();
        return settings;
    }

    /// <summary>Parses START:STEP:COUNT (START and STEP with optional SI suffixes).</summary>
    private static ChannelGrid ParseGrid(string text)
    {
        string[] p = text.Split(':');
        if (
            p.Length == 3
            && Units.TryParseSi(p[0], out double start)
            && Units.TryParseSi(p[1], out double step)
            && int.TryParse(p[2], System.Globalization.CultureInfo.InvariantCulture, out int count)
        )
            return new ChannelGrid(start, step, count);
        throw new UsageException($"--channels: '{text}' is not START:STEP:COUNT (e.g. 462.5625M:12.5k:8)");
    }
}
