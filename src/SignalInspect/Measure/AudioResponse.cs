using System.Globalization;

namespace SignalInspect.Measure;

/// <summary>One step of a tone series: a stretch of the capture holding one modulating tone.</summary>
/// <param name="StartS">Its start, s from the capture's first sample.</param>
/// <param name="EndS">Its end, s.</param>
/// <param name="ToneHz">The tone it should hold, Hz; null to take the one found.</param>
public sealed record ToneStep(double StartS, double EndS, double? ToneHz = null);

/// <summary>One step's reading.</summary>
/// <param name="Step">The step as listed.</param>
/// <param name="ToneHz">The tone found, Hz; null when none.</param>
/// <param name="Amount">Its modulation: FM peak deviation (Hz) or AM depth (%); null when not measured.</param>
/// <param name="ResponseDb">20 log10 of the amount over the reference step's, dB; null when not measured.</param>
/// <param name="PreEmphasisDb">The 6 dB/octave pre-emphasis curve at the tone, 20 log10(f / f_ref), dB.</param>
/// <param name="Problem">Why the step gives no reading (outside the capture, no tone, another tone than listed),
/// or null.</param>
public sealed record ResponsePoint(
    ToneStep Step,
    double? ToneHz,
    double? Amount,
    double? ResponseDb,
    double? PreEmphasisDb,
    string? Problem
);

/// <summary>The audio response read from a tone series: each step's modulation relative to the step nearest
/// 1 kHz, beside the 6 dB/octave pre-emphasis curve.</summary>
/// <param name="ReferenceHz">The reference step's tone, Hz; null when no step was measured.</param>
/// <param name="Unit">The amount's unit: Hz (FM deviation) or % (AM depth).</param>
/// <param name="Points">Every step, in the order listed.</param>
/// <param name="NotTested">Why no response is given, or null.</param>
public sealed record AudioResponseResult(
    double? ReferenceHz,
    string Unit,
    IReadOnlyList<ResponsePoint> Points,
    string? NotTested
);

/// <summary>
/// The audio response from a capture holding a tone series at one input level (a step list: start, end and the tone
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
        Task<string> hash,
        CancellationToken cancel
    )
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        double length = source.Info.DurationS;
        var read = new List<(ToneStep Step, double? Tone, double? Amount, string? Problem)>();
        string unit = "Hz";
        foreach (ToneStep s in steps)
        {
            cancel.ThrowIfCancellationRequested();
            if (!(s.StartS >= 0 && s.EndS <= length && s.EndS > s.StartS))
            {
                read.Add((s, null, null, string.Create(c, $"lies outside the capture (0 to {length:0.###} s)")));
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
                read.Add((s, null, null, e.Message));
                continue;
            }
            double? amount = r.Fm?.PeakDeviationHz.Value ?? r.Am?.DepthPercent.Value;
            if (r.Am is not null)
                unit = "%";
            double? tone = r.ModulatingFrequencyHz?.Value;
            string? problem =
                tone is null || amount is null ? "no modulating tone found (" + r.Classification.Kind.Name() + ")"
                : s.ToneHz is { } listed && Math.Abs(tone.Value - listed) > ToneMatchPercent / 100 * listed
                    ? string.Create(c, $"holds {tone:0.#} Hz, not the {listed:0.#} Hz listed")
                : null;
            read.Add((s, tone, problem is null ? amount : null, problem));
        }
        var good = read.Where(x => x.Problem is null).ToList();
        if (good.Count == 0)
            return new AudioResponseResult(
                null,
                unit,
                [.. read.Select(x => new ResponsePoint(x.Step, x.Tone, null, null, null, x.Problem))],
                "no step of the list gave a reading"
            );
        var reference = good.MinBy(x => Math.Abs(Math.Log(x.Tone!.Value / 1000)));
        double fRef = reference.Tone!.Value,
            aRef = reference.Amount!.Value;
        return new AudioResponseResult(
            fRef,
            unit,
            [
                .. read.Select(x =>
                    x.Problem is null && aRef > 0
                        ? new ResponsePoint(
                            x.Step,
                            x.Tone,
                            x.Amount,
                            20 * Math.Log10(x.Amount!.Value / aRef),
                            20 * Math.Log10(x.Tone!.Value / fRef),
                            null
                        )
                        : new ResponsePoint(x.Step, x.Tone, null, null, null, x.Problem)
                ),
            ],
            aRef > 0 ? null : "the reference step's modulation is zero"
        );
    }
}
