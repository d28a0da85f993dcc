using System.Globalization;

namespace SignalInspect.Measure;

/// <summary>One step of a tone series: a stretch of the capture holding one modulating tone.</summary>
/// <param name="StartS">Its start, s from the capture's first sample.</param>
/// <param name="EndS">Its end, s.</param>
/// <param name="ToneHz">The tone it should hold, Hz; null to take the one found.</param>
/// <param name="LevelDb">The audio input level of the step, dB on any fixed reference (a level series: the
/// deviation against level shows the limiter); null for none.</param>
public sealed record ToneStep(double StartS, double EndS, double? ToneHz = null, double? LevelDb = null);

/// <summary>One step's reading.</summary>
/// <param name="Step">The step as listed.</param>
/// <param name="ToneHz">The tone found, Hz; null when none.</param>
/// <param name="Amount">Its modulation: FM peak deviation (Hz) or AM depth (%); null when not measured.</param>
/// <param name="ResponseDb">20 log10 of the amount over the reference step's, dB; null when not measured.</param>
/// <param name="PreEmphasisDb">The 6 dB/octave pre-emphasis curve at the tone, 20 log10(f / f_ref), dB.</param>
/// <param name="Problem">Why the step gives no reading (outside the capture, no tone, another tone than listed),
/// or null.</param>
/// <param name="AmountUncertainty">The amount's standard uncertainty (k = 1); null when not measured.</param>
/// <param name="ResponseUncertaintyDb">The response's standard uncertainty, dB: the step's and the reference's
/// relative uncertainties combined, 20 / ln 10 x sqrt((u/A)^2 + (u_ref/A_ref)^2); null when not measured.</param>
/// <param name="CompressionDb">For a level series: the response less the level's rise over the reference step's,
/// dB (0 where the deviation follows the level, negative where a limiter holds it); null otherwise.</param>
public sealed record ResponsePoint(
    ToneStep Step,
    double? ToneHz,
    double? Amount,
    double? ResponseDb,
    double? PreEmphasisDb,
    string? Problem,
    double? AmountUncertainty = null,
    double? ResponseUncertaintyDb = null,
    double? CompressionDb = null
);

/// <summary>The audio response read from a tone series: each step's modulation relative to the step nearest
/// 1 kHz, beside the 6 dB/octave pre-emphasis curve.</summary>
/// <param name="ReferenceHz">The reference step's tone, Hz; null when no step was measured.</param>
/// <param name="Unit">The amount's unit: Hz (FM deviation) or % (AM depth).</param>
/// <param name="Points">Every step, in the order listed.</param>
/// <param name="NotTested">Why no response is given, or null.</param>
/// <param name="ReferenceLevelDb">For a level series, the reference step's level (the lowest), dB; null
/// otherwise.</param>
/// <param name="LimitAmount">For a level series in which some step's deviation (or depth) falls 1 dB or more short of
/// the level's rise, the largest amount read: the limiter's ceiling; null otherwise.</param>
public sealed record AudioResponseResult(
    double? ReferenceHz,
    string Unit,
    IReadOnlyList<ResponsePoint> Points,
    string? NotTested,
    double? ReferenceLevelDb = null,
    double? LimitAmount = null
);

/// <summary>
/// The audio response from a capture holding a tone series at one input level, or a level series at one tone (the
/// limiter: each step's level given, the reference is the lowest level's step and each step's compression is its
/// response less the level's rise) (a step list: start, end and the tone
/// of each). Each step is measured on its own (its middle 80 %, the switching between tones left out) by the same
/// analysis; the response is the step's FM peak deviation (or AM depth) over the reference step's (the one nearest
/// 1 kHz), in dB, shown beside the 6 dB/octave pre-emphasis curve of land-mobile FM transmitters, 20 log10(f / f_ref)
/// (common practice). A step the capture does not hold, or holding no tone or another tone than listed, gives no
/// number and says why.
/// </summary>
internal static class AudioResponse
{
    /// <summary>A listed tone and the one found agree within this share, percent.</summary>
    public const double ToneMatchPercent = 2;

    /// <summary>Share of each step left out at either end (the switching between tones), 0 to 0.5.</summary>
    public const double EdgeShare = 0.1;

    public static AudioResponseResult Measure(
        Capture.CaptureSource source,
        AnalysisOptions options,
        IReadOnlyList<ToneStep> steps,
        AnalysisResult whole,
        Task<string> hash,
        CancellationToken cancel
    )
    {
        // Without a list, each transmission is a step (a tone series keyed step by step), else each stretch of one
        // deviation (or depth) in the timeline.
        if (steps.Count == 0)
        {
            steps =
                whole.Transmissions.Count >= 2
                    ? [.. whole.Transmissions.Select(t => new ToneStep(t.StartS, t.EndS))]
                    : FromTimeline(whole.Timeline);
            if (steps.Count < 2)
                return new AudioResponseResult(
                    null,
                    whole.Am is not null ? "%" : "Hz",
                    [],
                    "no step list, and no steps found: the capture holds neither two transmissions nor two stretches "
                        + "of different deviation (or depth) in one"
                );
        }
        CultureInfo c = CultureInfo.InvariantCulture;
        double length = source.Info.DurationS;
        var read = new List<(ToneStep Step, double? Tone, double? Amount, double? U, string? Problem)>();
        string unit = "Hz";
        foreach (ToneStep s in steps)
        {
            cancel.ThrowIfCancellationRequested();
            if (!(s.StartS >= 0 && s.EndS <= length && s.EndS > s.StartS))
            {
                read.Add((s, null, null, null, string.Create(c, $"lies outside the capture (0 to {length:0.###} s)")));
                continue;
            }
            double edge = EdgeShare * (s.EndS - s.StartS);
            AnalysisResult r;
            try
            {
                r = Analyzer.Analyze(
                    source,
                    options with
                    {
                        StartS = s.StartS + edge,
                        DurationS = s.EndS - s.StartS - 2 * edge,
                        KeepSpectrogram = false,
                    },
                    cancel: cancel,
                    knownHash: hash
                );
            }
            catch (UserInputException e)
            {
                read.Add((s, null, null, null, e.Message));
                continue;
            }
            Measured? m = r.Fm?.PeakDeviationHz ?? r.Am?.DepthPercent;
            double? amount = m?.Value;
            if (r.Am is not null)
                unit = "%";
            double? tone = r.ModulatingFrequencyHz?.Value;
            string? problem =
                tone is null || amount is null ? "no modulating tone found (" + r.Classification.Kind.Name() + ")"
                : s.ToneHz is { } listed && Math.Abs(tone.Value - listed) > ToneMatchPercent / 100 * listed
                    ? string.Create(c, $"holds {tone:0.#} Hz, not the {listed:0.#} Hz listed")
                : null;
            read.Add((s, tone, problem is null ? amount : null, m?.StandardUncertainty, problem));
        }
        var good = read.Where(x => x.Problem is null).ToList();
        if (good.Count == 0)
            return new AudioResponseResult(
                null,
                unit,
                [.. read.Select(x => new ResponsePoint(x.Step, x.Tone, null, null, null, x.Problem))],
                "no step of the list gave a reading"
            );
        bool levels = steps.Any(x => x.LevelDb is not null);
        var reference = levels
            ? good.Where(x => x.Step.LevelDb is not null).MinBy(x => x.Step.LevelDb!.Value)
            : good.MinBy(x => Math.Abs(Math.Log(x.Tone!.Value / 1000)));
        double fRef = reference.Tone!.Value,
            aRef = reference.Amount!.Value,
            uRef = reference.U ?? 0;
        double? lRef = levels ? reference.Step.LevelDb : null;
        ResponsePoint Point((ToneStep Step, double? Tone, double? Amount, double? U, string? Problem) x)
        {
            if (x.Problem is not null || !(aRef > 0))
                return new ResponsePoint(x.Step, x.Tone, null, null, null, x.Problem);
            double a = x.Amount!.Value,
                db = 20 * Math.Log10(a / aRef),
                u = 20 / Math.Log(10) * Math.Sqrt(Math.Pow((x.U ?? 0) / a, 2) + Math.Pow(uRef / aRef, 2));
            return new ResponsePoint(
                x.Step,
                x.Tone,
                a,
                db,
                20 * Math.Log10(x.Tone!.Value / fRef),
                null,
                x.U,
                u,
                lRef is { } l0 && x.Step.LevelDb is { } l ? db - (l - l0) : null
            );
        }
        var points = read.Select(Point).ToList();
        bool limited = points.Any(p => p.CompressionDb <= -1);
        return new AudioResponseResult(
            fRef,
            unit,
            points,
            aRef > 0 ? null : "the reference step's modulation is zero",
            lRef,
            limited ? points.Max(p => p.Amount) : null
        );
    }

    /// <summary>A step ends where the timeline's raw deviation (or depth) moves by more than this, dB.</summary>
    public const double StepChangeDb = 1;

    /// <summary>Fewest windows a stretch needs to be a step (shorter ones are the changes between steps).</summary>
    public const int MinStepWindows = 3;

    /// <summary>Steps from the timeline of one transmission: runs of windows whose raw deviation (or depth) stays
    /// within <see cref="StepChangeDb"/> of the run's first, at least <see cref="MinStepWindows"/> long. A series
    /// whose steps share one deviation (tones of a flat response at one level) shows no step.</summary>
    private static IReadOnlyList<ToneStep> FromTimeline(Timeline? timeline)
    {
        var steps = new List<ToneStep>();
        if (timeline is null)
            return steps;
        var w = timeline.Windows;
        double? Amount(TrackWindow x) => x.RawPeakDeviationHz ?? x.RawDepthPercent;
        int start = 0;
        for (int i = 1; i <= w.Count; i++)
        {
            bool ends =
                i == w.Count
                || Amount(w[i]) is not { } a
                || Amount(w[start]) is not { } a0
                || !(a > 0 && a0 > 0)
                || Math.Abs(20 * Math.Log10(a / a0)) > StepChangeDb
                || w[i].StartS > w[i - 1].EndS + 1e-6;
            if (!ends)
                continue;
            if (i - start >= MinStepWindows)
                steps.Add(new ToneStep(w[start].StartS, w[i - 1].EndS));
            start = i;
        }
        return steps;
    }
}
