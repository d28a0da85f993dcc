using System.Text.Json;
using SignalInspect.Measure;
using SignalInspect.Reporting;

namespace SignalInspect.Survey;

/// <summary>
/// Writes a <see cref="SurveyResult"/> as JSON (<c>survey --json</c>): the capture, how the survey looked, one
/// object per emission (its detection figures, its key measurements and its whole analysis in the <c>analyze</c>
/// JSON's form) and the channels' occupancy. Every key always present, null where it does not apply
/// (docs/schema/survey.schema.json).
/// </summary>
public static class SurveyJson
{
    /// <summary>Format version of this JSON.</summary>
    public const string SchemaVersion = "1";

    /// <summary>Serialises the survey to UTF-8 JSON bytes.</summary>
    public static byte[] ToBytes(SurveyResult s)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
            Write(w, s);
        return ms.ToArray();
    }

    private static void Write(Utf8JsonWriter w, SurveyResult s)
    {
        w.WriteStartObject();
        w.WriteString("schemaVersion", SchemaVersion);
        w.WriteString("software", "SignalInspect " + AnalysisJson.Version);
        w.WriteString("softwareCommit", AnalysisJson.Commit);
        w.WritePropertyName("capture");
        CaptureInfoJson.Write(w, s.Capture);
        w.WriteStartObject("method");
        w.WriteNumber("analysedFirstSample", s.Window.First);
        w.WriteNumber("analysedSamples", s.Window.Count);
        w.WriteNumber("fftSize", s.Spectrum.Mean.Settings.FftSize);
        w.WriteNumber("rbwHz", s.Spectrum.Mean.RbwHz);
        w.WriteNumber("timeStepS", s.TimeStepS);
        w.WriteNumber("timeSteps", s.Spectrum.Spectrogram?.Rows ?? 0);
        w.WriteNumber("noiseFloorDbPerHz", Db(s.NoiseFloorDensity) + s.Spectrum.Mean.Settings.CalibrationDb);
        w.WriteNumber("detectionThresholdDb", s.DetectionThresholdDb);
        w.WriteNumber("minSnrDb", s.Settings.MinSnrDb);
        w.WriteNumber("occupancyThresholdDb", s.Settings.OccupancyThresholdDb);
        w.WriteNumber("calibrationDb", s.Spectrum.Mean.Settings.CalibrationDb);
        w.WriteString("powerUnit", s.Spectrum.Mean.Settings.CalibrationDb != 0 ? "dBm" : "dBFS");
        w.WriteEndObject();
        w.WriteStartArray("emissions");
        foreach (SurveyEmission e in s.Emissions)
            WriteEmission(w, e);
        w.WriteEndArray();
        w.WriteStartArray("channels");
        foreach (ChannelOccupancy c in s.Channels)
        {
            w.WriteStartObject();
            w.WriteNumber("frequencyHz", c.CentreHz);
            w.WriteNumber("widthHz", c.WidthHz);
            w.WriteNumber("occupancyPercent", c.OccupancyPercent);
            w.WriteNumber("meanPowerDb", c.MeanPowerDb);
            w.WriteNumber("maxPowerDb", c.MaxPowerDb);
            w.WriteNumber("noisePowerDb", c.NoiseDb);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        WriteLines(w, "notes", s.Notes);
        WriteLines(w, "warnings", s.Warnings);
        w.WriteEndObject();
    }

    private static void WriteEmission(Utf8JsonWriter w, SurveyEmission e)
    {
        AnalysisResult? r = e.Analysis;
        w.WriteStartObject();
        w.WriteNumber("number", e.Number);
        w.WriteNumber("frequencyHz", e.CentreHz);
        w.WriteNumber("detectedLowHz", e.LowHz);
        w.WriteNumber("detectedHighHz", e.HighHz);
        w.WriteNumber("peakPowerDb", e.PeakPowerDb);
        w.WriteNumber("meanPowerDb", e.MeanPowerDb);
        w.WriteNumber("snrDb", e.SnrDb);
        w.WriteNumber("onAirPercent", e.OnAirPercent);
        CaptureInfoJson.WriteNumberOrNull(w, "firstSeenS", double.IsNaN(e.FirstSeenS) ? null : e.FirstSeenS);
        CaptureInfoJson.WriteNumberOrNull(w, "lastSeenS", double.IsNaN(e.LastSeenS) ? null : e.LastSeenS);
        w.WriteString("class", r?.Classification.Kind.Name());
        CaptureInfoJson.WriteNumberOrNull(w, "carrierFrequencyHz", r?.Carrier?.FrequencyHz.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "occupiedBandwidthHz", e.OccupiedBandwidthHz);
        CaptureInfoJson.WriteNumberOrNull(w, "peakDeviationHz", r?.Fm?.PeakDeviationHz.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "amDepthPercent", r?.Am?.DepthPercent.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "fskShiftHz", r?.Fsk?.ShiftHz.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "symbolRateBd", r?.Fsk?.SymbolRateBd?.Value);
        CaptureInfoJson.WriteNumberOrNull(w, "modulatingFrequencyHz", r?.ModulatingFrequencyHz?.Value);
        w.WriteString("emissionDesignator", r?.EmissionDesignator);
        CaptureInfoJson.WriteNumberOrNull(w, "imageOf", e.ImageOf);
        w.WriteString("notMeasuredReason", e.NotMeasuredReason);
        w.WritePropertyName("analysis");
        if (r is null)
            w.WriteNullValue();
        else
            AnalysisJson.Write(w, r);
        w.WriteEndObject();
    }

    private static void WriteLines(Utf8JsonWriter w, string name, IReadOnlyList<string> lines)
    {
        w.WriteStartArray(name);
        foreach (string l in lines)
            w.WriteStringValue(l);
        w.WriteEndArray();
    }

    private static double Db(double x) => x > 0 ? 10 * Math.Log10(x) : -400;
}
