using System.Text.Json;
using SignalInspect.Measure;
using SignalInspect.Spectrum;

namespace SignalInspect.Reporting;

/// <summary>
/// Writes an <see cref="AnalysisResult"/> as JSON (the <c>analyze --json</c> output): units in
/// the key names, SI units, stable key order, null where a value does not apply. Documented key by
/// key in the README.
/// </summary>
public static class AnalysisJson
{
    /// <summary>Format version of this JSON.</summary>
    public const string SchemaVersion = "4";

    /// <summary>Serialises the result to UTF-8 JSON bytes.</summary>
    public static byte[] ToBytes(AnalysisResult r, bool indented = true)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = indented }))
            Write(w, r);
        return ms.ToArray();
    }

    /// <summary>The analysis as <see cref="ToBytes(AnalysisResult, bool)"/>, with the judgement of its report
    /// (<c>limits</c>, <c>checks</c>, <c>verdict</c>) after the analysis's own keys when a profile was given.</summary>
    public static byte[] ToBytes(MeasurementReport report)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
            Write(w, report.Analysis, report.Profile is null ? null : report);
        return ms.ToArray();
    }

    /// <summary>The receiver reference correction applied to every frequency (<c>applied</c> false, with the reason,
    /// when none was).</summary>
    private static void WriteCorrection(Utf8JsonWriter w, FrequencyReference? f)
    {
        w.WriteStartObject("correction");
        w.WriteBoolean("applied", f is not null);
        w.WriteString("note", f is null ? FrequencyReference.NotCorrected : null);
        w.WriteString("source", f?.Source);
        CaptureInfoJson.WriteNumberOrNull(w, "receiverErrorPpm", f?.ErrorPpm);
        CaptureInfoJson.WriteNumberOrNull(w, "receiverErrorUncertaintyPpm", f?.StandardUncertaintyPpm);
        CaptureInfoJson.WriteNumberOrNull(w, "referenceCarrierHz", f?.ReferenceCarrierHz);
        CaptureInfoJson.WriteNumberOrNull(w, "referenceReadHz", f?.ReferenceReadHz?.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "referenceReadUncertaintyHz", f?.ReferenceReadHz?.StandardUncertainty);
        w.WriteString("text", f?.Text);
        w.WriteEndObject();
    }

    /// <summary>Writes the result as one JSON object; with <paramref name="judged"/> its limits, checks and verdict
    /// too.</summary>
    /// <param name="w">The writer.</param>
    /// <param name="r">The analysis.</param>
    /// <param name="judged">The report whose judgement follows the analysis's keys; null for none.</param>
    /// <param name="judgementKeys">Whether to write <c>limits</c>, <c>checks</c> and <c>verdict</c> (null and empty
    /// without <paramref name="judged"/>); false inside the report model, which writes them beside the
    /// analysis.</param>
    public static void Write(
        Utf8JsonWriter w,
        AnalysisResult r,
        MeasurementReport? judged = null,
        bool judgementKeys = true
    )
    {
        var info = r.Capture;
        var axis = FrequencyAxis.Of(info);
        bool abs = axis.IsAbsolute;
        double Abs(double axisHz) =>
            r.FrequencyReference is { } f ? f.Correct(axis.ToReported(axisHz)) : axis.ToReported(axisHz);
        w.WriteStartObject();
        w.WriteString("schemaVersion", SchemaVersion);
        w.WriteString("software", "SignalInspect " + Version);
        w.WriteString("softwareCommit", Commit);
        w.WriteStartObject("capture");
        w.WriteString("file", info.Path);
        w.WriteString("container", info.Container);
        w.WriteString("datatype", info.Datatype);
        w.WriteNumber("sampleRateHz", info.SampleRateHz);
        CaptureInfoJson.WriteNumberOrNull(w, "centerFrequencyHz", info.CenterFrequencyHz);
        w.WriteBoolean("isComplex", info.IsComplex);
        w.WriteNumber("samples", info.SampleCount);
        w.WriteNumber("durationS", info.DurationS);
        w.WriteNumber("analysedFirstSample", r.Window.First);
        w.WriteNumber("analysedSamples", r.Window.Count);
        w.WriteString("sha256", r.Sha256);
        w.WriteEndObject();
        w.WriteString("modulation", r.Classification.Kind.Name());
        w.WriteStartObject("classification");
        w.WriteString("detected", r.Classification.Detected.Name());
        w.WriteNumber("confidence", Math.Round(r.Classification.Confidence, 3));
        w.WriteBoolean("expected", r.Classification.Expected);
        w.WriteString("reason", r.Classification.Reason);
        w.WriteNumber("channelSnrDb", Math.Round(r.ChannelSnrDb, 2));
        w.WriteEndObject();
        if (r.Carrier is { } c)
        {
            w.WriteStartObject("carrier");
            w.WriteNumber("frequencyHz", c.FrequencyHz.Value);
            w.WriteNumber("frequencyUncertaintyHz", c.FrequencyHz.StandardUncertainty);
            w.WriteNumber("offsetHz", c.OffsetHz);
            CaptureInfoJson.WriteNumberOrNull(w, "offsetPpm", c.OffsetPpm);
            w.WriteString("offsetReference", c.OffsetReference);
            w.WriteString("method", c.Method);
            WriteCorrection(w, r.FrequencyReference);
            w.WriteEndObject();
        }
        else
        {
            w.WriteStartObject("carrier");
            w.WriteNull("frequencyHz");
            w.WriteNull("frequencyUncertaintyHz");
            w.WriteNull("offsetHz");
            w.WriteNull("offsetPpm");
            w.WriteNull("offsetReference");
            w.WriteNull("method");
            WriteCorrection(w, r.FrequencyReference);
            w.WriteEndObject();
        }
        var b = r.Bandwidth;
        // Discriminator audio holds no RF spectrum: its bandwidths are not written.
        bool rf = r.DiscriminatorHzPerFullScale is null;
        w.WriteStartObject("bandwidth");
        CaptureInfoJson.WriteNumberOrNull(w, "occupiedHz", rf ? b.OccupiedHz : null);
        CaptureInfoJson.WriteNumberOrNull(w, "occupiedUncertaintyHz", rf ? r.OccupiedUncertaintyHz : null);
        w.WriteNumber("occupiedPercent", 100 * (1 - b.Beta));
        CaptureInfoJson.WriteNumberOrNull(w, "lowerEdgeHz", rf ? Abs(b.LowerEdgeHz) : null);
        CaptureInfoJson.WriteNumberOrNull(w, "upperEdgeHz", rf ? Abs(b.UpperEdgeHz) : null);
        CaptureInfoJson.WriteNumberOrNull(w, "xdbHz", rf ? b.XdbHz : null);
        w.WriteNumber("xdb", b.Xdb);
        CaptureInfoJson.WriteNumberOrNull(w, "xdbLowerEdgeHz", rf ? Abs(b.XdbLowerEdgeHz) : null);
        CaptureInfoJson.WriteNumberOrNull(w, "xdbUpperEdgeHz", rf ? Abs(b.XdbUpperEdgeHz) : null);
        w.WriteNumber("rbwHz", r.Method.RbwHz);
        w.WriteString("noiseFloor", b.Treatment == NoiseFloorTreatment.Subtract ? "subtracted" : "kept");
        w.WriteNumber(
            "noiseFloorDbfsPerHz",
            b.NoiseFloorDensity > 0 ? Math.Round(10 * Math.Log10(b.NoiseFloorDensity), 3) : -400
        );
        w.WriteBoolean("edgesAbsolute", abs);
        w.WriteEndObject();
        w.WriteStartObject("am");
        if (r.Am is { } am)
        {
            w.WriteNumber("depthPercent", am.DepthPercent.Value);
            w.WriteNumber("depthUncertaintyPercent", am.DepthPercent.StandardUncertainty);
            w.WriteNumber("positivePeakPercent", am.PositivePeakPercent);
            w.WriteNumber("negativePeakPercent", am.NegativePeakPercent);
            CaptureInfoJson.WriteNumberOrNull(w, "sidebandDepthPercent", am.SidebandDepthPercent);
        }
        else
        {
            w.WriteNull("depthPercent");
            w.WriteNull("depthUncertaintyPercent");
            w.WriteNull("positivePeakPercent");
            w.WriteNull("negativePeakPercent");
            w.WriteNull("sidebandDepthPercent");
        }
        w.WriteEndObject();
        w.WriteStartObject("fm");
        if (r.Fm is { } fm)
        {
            w.WriteNumber("peakDeviationHz", fm.PeakDeviationHz.Value);
            w.WriteNumber("peakDeviationUncertaintyHz", fm.PeakDeviationHz.StandardUncertainty);
            w.WriteNumber("positivePeakHz", fm.PositivePeakHz);
            w.WriteNumber("negativePeakHz", fm.NegativePeakHz);
            w.WriteNumber("halfPeakToPeakHz", fm.HalfPeakToPeakHz);
            w.WriteNumber("rmsDeviationHz", fm.RmsDeviationHz);
            CaptureInfoJson.WriteNumberOrNull(w, "modulationIndex", fm.ModulationIndex);
            CaptureInfoJson.WriteNumberOrNull(w, "peakPhaseRad", fm.PeakPhaseRad);
        }
        else
        {
            w.WriteNull("peakDeviationHz");
            w.WriteNull("peakDeviationUncertaintyHz");
            w.WriteNull("positivePeakHz");
            w.WriteNull("negativePeakHz");
            w.WriteNull("halfPeakToPeakHz");
            w.WriteNull("rmsDeviationHz");
            w.WriteNull("modulationIndex");
            w.WriteNull("peakPhaseRad");
        }
        w.WriteEndObject();
        w.WriteStartObject("pm");
        if (r.Pm is { } pm)
        {
            w.WriteNumber("peakDeviationRad", pm.PeakDeviationRad.Value);
            w.WriteNumber("peakDeviationUncertaintyRad", pm.PeakDeviationRad.StandardUncertainty);
            w.WriteNumber("positivePeakRad", pm.PositivePeakRad);
            w.WriteNumber("negativePeakRad", pm.NegativePeakRad);
            CaptureInfoJson.WriteNumberOrNull(w, "peakDeviationHz", pm.PeakDeviationHz);
        }
        else
        {
            w.WriteNull("peakDeviationRad");
            w.WriteNull("peakDeviationUncertaintyRad");
            w.WriteNull("positivePeakRad");
            w.WriteNull("negativePeakRad");
            w.WriteNull("peakDeviationHz");
        }
        w.WriteEndObject();
        w.WriteStartObject("fsk");
        if (r.Fsk is { } fsk)
        {
            w.WriteNumber("shiftHz", fsk.ShiftHz.Value);
            w.WriteNumber("shiftUncertaintyHz", fsk.ShiftHz.StandardUncertainty);
            w.WriteNumber("deviationHz", fsk.DeviationHz);
            CaptureInfoJson.WriteNumberOrNull(w, "symbolRateBd", fsk.SymbolRateBd?.Value);
            CaptureInfoJson.WriteNumberOrNull(w, "symbolRateUncertaintyBd", fsk.SymbolRateBd?.StandardUncertainty);
            CaptureInfoJson.WriteNumberOrNull(w, "modulationIndex", fsk.ModulationIndex);
            w.WriteStartArray("toneFrequenciesHz");
            foreach (double t in fsk.ToneFrequenciesHz)
                w.WriteNumberValue(t);
            w.WriteEndArray();
        }
        else
        {
            w.WriteNull("shiftHz");
            w.WriteNull("shiftUncertaintyHz");
            w.WriteNull("deviationHz");
            w.WriteNull("symbolRateBd");
            w.WriteNull("symbolRateUncertaintyBd");
            w.WriteNull("modulationIndex");
            w.WriteStartArray("toneFrequenciesHz");
            w.WriteEndArray();
        }
        w.WriteEndObject();
        CaptureInfoJson.WriteNumberOrNull(w, "modulatingFrequencyHz", r.ModulatingFrequencyHz?.Value);
        w.WriteStartObject("ook");
        CaptureInfoJson.WriteNumberOrNull(w, "onSharePercent", r.Ook?.OnSharePercent);
        CaptureInfoJson.WriteNumberOrNull(w, "onLevel", r.Ook?.OnLevel);
        WritePulses(w, r.Ook?.Pulses);
        w.WriteEndObject();
        WriteBudgets(w, r);
        w.WriteStartArray("modulatingComponents");
        foreach (ModulatingComponent mc in r.ModulatingComponents)
        {
            w.WriteStartObject();
            w.WriteNumber("frequencyHz", mc.FrequencyHz);
            w.WriteNumber("peak", mc.PeakAmount);
            w.WriteString(
                "peakUnit",
                r.Classification.Kind switch
                {
                    ModulationKind.Am => "%",
                    ModulationKind.Pm => "rad",
                    _ => "Hz",
                }
            );
            w.WriteNumber("powerShare", mc.PowerShare);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        AudioJson.Write(w, r.Audio);
        AudioJson.WriteResponse(w, r.Response);
        CaptureInfoJson.WriteNumberOrNull(w, "necessaryBandwidthHz", r.NecessaryBandwidthHz);
        if (r.EmissionDesignator is { } d)
            w.WriteString("emissionDesignator", d);
        else
            w.WriteNull("emissionDesignator");
        WriteTransmissions(w, r);
        WriteTimeline(w, r.Timeline);
        var m = r.Method;
        w.WriteStartObject("method");
        w.WriteString("window", r.Spectrum.Mean.Window.Name);
        w.WriteNumber("fftSize", m.Spectrum.FftSize);
        w.WriteNumber("overlapPercent", 100.0 * m.Spectrum.OverlapSamples / m.Spectrum.FftSize);
        w.WriteNumber("calibrationDb", m.Spectrum.CalibrationDb);
        w.WriteNumber("segments", r.Spectrum.Mean.Segments);
        w.WriteString("channelFilter", m.ChannelFilter);
        w.WriteNumber("demodRateHz", m.DemodRateHz);
        w.WriteNumber("postLowPassHz", m.PostLowPassHz);
        CaptureInfoJson.WriteNumberOrNull(w, "postHighPassHz", m.PostHighPassHz);
        CaptureInfoJson.WriteNumberOrNull(w, "deEmphasisUs", m.DeEmphasisUs);
        w.WriteString("peakStatistic", m.PeakStatistic);
        w.WriteBoolean("dcSuppressed", r.Spectrum.DcBinsSuppressed > 0);
        CaptureInfoJson.WriteNumberOrNull(w, "discriminatorHzPerFullScale", r.DiscriminatorHzPerFullScale);
        w.WriteEndObject();
        w.WriteStartArray("notes");
        foreach (string n in info.Notes.Concat(r.Notes))
            w.WriteStringValue(n);
        w.WriteEndArray();
        w.WriteStartArray("warnings");
        foreach (string s in r.Warnings)
            w.WriteStringValue(s);
        w.WriteEndArray();
        // The judgement's keys are always there: null, empty and null without a profile.
        if (judged is not null)
            ReportJson.WriteJudgement(w, judged);
        else if (judgementKeys)
        {
            w.WriteNull("limits");
            w.WriteStartArray("checks");
            w.WriteEndArray();
            w.WriteNull("verdict");
        }
        w.WriteEndObject();
    }

    /// <summary>
    /// <c>transmissions</c>: each carrier-on interval (<c>startS</c>, <c>endS</c>, <c>durationS</c> from the capture's
    /// first sample) with its own class and main figures and their expanded uncertainties (k = 2), null where they do
    /// not apply; <c>measuredTransmission</c>: which of them (from 0) the document's figures are, null when they are
    /// of the whole window.
    /// </summary>
    private static void WriteTransmissions(Utf8JsonWriter w, AnalysisResult r)
    {
        w.WriteStartArray("transmissions");
        foreach (Transmission t in r.Transmissions)
        {
            // Without its own result a transmission is the whole analysis's (a capture with one transmission).
            AnalysisResult x = t.Result ?? r;
            w.WriteStartObject();
            w.WriteNumber("startS", Math.Round(t.StartS, 6));
            w.WriteNumber("endS", Math.Round(t.EndS, 6));
            w.WriteNumber("durationS", Math.Round(t.DurationS, 6));
            w.WriteString("modulation", x.Classification.Kind.Name());
            CaptureInfoJson.WriteNumberOrNull(w, "channelSnrDb", x.ChannelSnrDb);
            CaptureInfoJson.WriteNumberOrNull(w, "carrierFrequencyHz", x.Carrier?.FrequencyHz.Value);
            CaptureInfoJson.WriteNumberOrNull(w, "carrierOffsetHz", x.Carrier?.OffsetHz);
            CaptureInfoJson.WriteNumberOrNull(w, "carrierOffsetPpm", x.Carrier?.OffsetPpm);
            CaptureInfoJson.WriteNumberOrNull(w, "carrierExpandedUncertaintyHz", Expanded(x.Carrier?.FrequencyHz));
            CaptureInfoJson.WriteNumberOrNull(w, "peakDeviationHz", x.Fm?.PeakDeviationHz.Value);
            CaptureInfoJson.WriteNumberOrNull(w, "peakDeviationExpandedUncertaintyHz", Expanded(x.Fm?.PeakDeviationHz));
            CaptureInfoJson.WriteNumberOrNull(w, "depthPercent", x.Am?.DepthPercent.Value);
            CaptureInfoJson.WriteNumberOrNull(w, "depthExpandedUncertaintyPercent", Expanded(x.Am?.DepthPercent));
            CaptureInfoJson.WriteNumberOrNull(w, "modulatingFrequencyHz", x.ModulatingFrequencyHz?.Value);
            CaptureInfoJson.WriteNumberOrNull(w, "occupiedBandwidthHz", x.Bandwidth.OccupiedHz);
            CaptureInfoJson.WriteNumberOrNull(w, "occupiedBandwidthExpandedUncertaintyHz", 2 * x.OccupiedUncertaintyHz);
            WriteKey(w, "keyUp", t.KeyUp);
            WriteKey(w, "keyDown", t.KeyDown);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        CaptureInfoJson.WriteNumberOrNull(w, "measuredTransmission", r.MeasuredTransmission);
    }

    /// <summary>
    /// <c>timeline</c> (null without a carrier): <c>windowS</c>, <c>driftHzPerS</c> and its standard uncertainty,
    /// the windows' <c>maxOffsetHz</c>, <c>minOffsetHz</c>, <c>meanOffsetHz</c>, <c>deviationAboutLocalCarrier</c>,
    /// and <c>windows[]</c> (<c>startS</c>, <c>endS</c>, <c>carrierFrequencyHz</c>, <c>carrierOffsetHz</c>,
    /// <c>carrierOffsetPpm</c>, <c>carrierUncertaintyHz</c> (k = 1), <c>levelDbfs</c>, <c>rawPeakDeviationHz</c>,
    /// <c>rawDepthPercent</c>).
    /// </summary>
    private static void WriteTimeline(Utf8JsonWriter w, Timeline? t)
    {
        if (t is null)
        {
            w.WriteNull("timeline");
            return;
        }
        w.WriteStartObject("timeline");
        w.WriteNumber("windowS", Math.Round(t.WindowS, 6));
        CaptureInfoJson.WriteNumberOrNull(w, "driftHzPerS", t.DriftHzPerS?.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "driftUncertaintyHzPerS", t.DriftHzPerS?.StandardUncertainty);
        w.WriteNumber("maxOffsetHz", t.MaxOffsetHz);
        w.WriteNumber("minOffsetHz", t.MinOffsetHz);
        w.WriteNumber("meanOffsetHz", t.MeanOffsetHz);
        w.WriteBoolean("deviationAboutLocalCarrier", t.Detrended);
        w.WriteStartArray("windows");
        foreach (TrackWindow x in t.Windows)
        {
            w.WriteStartObject();
            w.WriteNumber("startS", Math.Round(x.StartS, 6));
            w.WriteNumber("endS", Math.Round(x.EndS, 6));
            w.WriteNumber("carrierFrequencyHz", x.CarrierFrequencyHz);
            w.WriteNumber("carrierOffsetHz", x.CarrierOffsetHz);
            CaptureInfoJson.WriteNumberOrNull(w, "carrierOffsetPpm", x.OffsetPpm);
            w.WriteNumber("carrierUncertaintyHz", x.StandardUncertaintyHz);
            w.WriteNumber("levelDbfs", x.LevelDbfs);
            CaptureInfoJson.WriteNumberOrNull(w, "rawPeakDeviationHz", x.RawPeakDeviationHz);
            CaptureInfoJson.WriteNumberOrNull(w, "rawDepthPercent", x.RawDepthPercent);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>A key instant's transient: <c>instantS</c>, <c>settledHz</c>, <c>peakExcursionHz</c> (signed, from
    /// the settled carrier), <c>peakAtS</c> (from the instant), <c>settlingS</c> (key-up), <c>settleBandHz</c>,
    /// <c>uncertaintyHz</c> (k = 1, of one reading), <c>visibleHz</c>, and the trace as <c>traceS[]</c>,
    /// <c>traceHz[]</c>; null when the instant is not in the capture.</summary>
    private static void WriteKey(Utf8JsonWriter w, string name, KeyTransient? k)
    {
        if (k is null)
        {
            w.WriteNull(name);
            return;
        }
        w.WriteStartObject(name);
        w.WriteNumber("instantS", Math.Round(k.InstantS, 6));
        w.WriteNumber("settledHz", k.SettledHz);
        w.WriteNumber("peakExcursionHz", k.PeakExcursionHz);
        w.WriteNumber("peakAtS", Math.Round(k.PeakAtS, 6));
        CaptureInfoJson.WriteNumberOrNull(w, "settlingS", k.SettlingS is { } st ? Math.Round(st, 6) : null);
        w.WriteNumber("settleBandHz", k.SettleBandHz);
        w.WriteNumber("uncertaintyHz", k.StandardUncertaintyHz);
        w.WriteNumber("visibleHz", k.VisibleHz);
        w.WriteStartArray("traceS");
        foreach (var (t, _) in k.Trace)
            w.WriteNumberValue(Math.Round(t, 6));
        w.WriteEndArray();
        w.WriteStartArray("traceHz");
        foreach (var (_, f) in k.Trace)
            w.WriteNumberValue(Math.Round(f, 3));
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary><c>ook.pulses</c> (null when fewer than three were found): <c>count</c>, <c>widthS</c>,
    /// <c>periodS</c>, <c>dutyCyclePercent</c> each with its standard uncertainty (<c>...Uncertainty...</c>),
    /// <c>prfHz</c>, <c>periodJitterS</c>, <c>amplitudeSpreadPercent</c>, <c>positionSpreadS</c>,
    /// <c>worstDutyPercent</c> and <c>averagingCorrectionDb</c> (47 CFR 15.35(c)), <c>bitRateBd</c>, and
    /// <c>list[]</c> (<c>startS</c>, <c>widthS</c>, <c>amplitude</c>) of the first pulses.</summary>
    private static void WritePulses(Utf8JsonWriter w, PulseResult? p)
    {
        if (p is null)
        {
            w.WriteNull("pulses");
            return;
        }
        w.WriteStartObject("pulses");
        w.WriteNumber("count", p.Count);
        w.WriteNumber("widthS", p.WidthS.Value);
        w.WriteNumber("widthUncertaintyS", p.WidthS.StandardUncertainty);
        w.WriteNumber("periodS", p.PeriodS.Value);
        w.WriteNumber("periodUncertaintyS", p.PeriodS.StandardUncertainty);
        w.WriteNumber("prfHz", p.PrfHz);
        w.WriteNumber("dutyCyclePercent", p.DutyCyclePercent.Value);
        w.WriteNumber("dutyCycleUncertaintyPercent", p.DutyCyclePercent.StandardUncertainty);
        w.WriteNumber("periodJitterS", p.PeriodJitterS);
        w.WriteNumber("amplitudeSpreadPercent", p.AmplitudeSpreadPercent);
        w.WriteNumber("positionSpreadS", p.PositionSpreadS);
        w.WriteNumber("worstDutyPercent", p.WorstDutyPercent);
        w.WriteNumber("averagingCorrectionDb", p.AveragingCorrectionDb);
        CaptureInfoJson.WriteNumberOrNull(w, "bitRateBd", p.BitRateBd);
        w.WriteStartArray("list");
        foreach (Pulse x in p.Pulses)
        {
            w.WriteStartObject();
            w.WriteNumber("startS", Math.Round(x.StartS, 9));
            w.WriteNumber("widthS", Math.Round(x.WidthS, 9));
            w.WriteNumber("amplitude", x.Amplitude);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    private static double? Expanded(Measured? m) => m is { } v ? 2 * v.StandardUncertainty : null;

    /// <summary>The software version written into outputs.</summary>
    public static string Version => typeof(AnalysisJson).Assembly.GetName().Version?.ToString(3) ?? "0";

    /// <summary>The commit the engine was built from (the SDK writes it after '+' in the informational version when
    /// built in a git checkout), or "unknown".</summary>
    public static string Commit =>
        typeof(AnalysisJson)
            .Assembly.GetCustomAttributes(typeof(System.Reflection.AssemblyInformationalVersionAttribute), false)
            .OfType<System.Reflection.AssemblyInformationalVersionAttribute>()
            .Select(a => a.InformationalVersion.Split('+'))
            .FirstOrDefault(p => p.Length == 2 && p[1].Length > 0)
            ?[1]
        ?? "unknown";

    /// <summary>
    /// <c>uncertaintyBudget</c>: for each measured value with a standard uncertainty, the components it was
    /// combined from (name, standard uncertainty in the value's unit, source), keyed by the value's JSON path.
    /// </summary>
    private static void WriteBudgets(Utf8JsonWriter w, AnalysisResult r)
    {
        w.WriteStartObject("uncertaintyBudget");
        void One(string key, Measured? m) => Components(key, m?.Budget ?? []);
        void Components(string key, IReadOnlyList<UncertaintyComponent> budget)
        {
            if (budget.Count == 0)
                return;
            w.WriteStartArray(key);
            foreach (UncertaintyComponent c in budget)
            {
                w.WriteStartObject();
                w.WriteString("name", c.Name);
                w.WriteNumber("standardUncertainty", c.StandardUncertainty);
                w.WriteString("source", c.Source);
                w.WriteEndObject();
            }
            w.WriteEndArray();
        }
        One("carrier.frequencyHz", r.Carrier?.FrequencyHz);
        One("am.depthPercent", r.Am?.DepthPercent);
        One("fm.peakDeviationHz", r.Fm?.PeakDeviationHz);
        One("pm.peakDeviationRad", r.Pm?.PeakDeviationRad);
        One("fsk.shiftHz", r.Fsk?.ShiftHz);
        One("fsk.symbolRateBd", r.Fsk?.SymbolRateBd);
        One("modulatingFrequencyHz", r.ModulatingFrequencyHz);
        Components("bandwidth.occupiedHz", r.OccupiedBudget);
        w.WriteEndObject();
    }
}
