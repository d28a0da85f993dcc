using System.Text.Json;
using SignalInspect.Measure;

namespace SignalInspect.Reporting;

/// <summary>The <c>audio</c> object of the analysis JSON: the demodulated audio's quality, every key always written
/// (null where it does not apply).</summary>
internal static class AudioJson
{
    public static void Write(Utf8JsonWriter w, AudioQualityResult? a)
    {
        w.WriteStartObject("audio");
        CaptureInfoJson.WriteNumberOrNull(w, "bandLowHz", a?.BandLowHz);
        CaptureInfoJson.WriteNumberOrNull(w, "bandHighHz", a?.BandHighHz);
        w.WriteString("weighting", a?.Weighting);
        CaptureInfoJson.WriteNumberOrNull(w, "toneHz", a?.ToneHz);
        Pair(w, "thdPercent", "thdUncertaintyPercent", a?.ThdPercent);
        Pair(w, "thdNPercent", "thdNUncertaintyPercent", a?.ThdNPercent);
        Pair(w, "sinadDb", "sinadUncertaintyDb", a?.SinadDb);
        w.WriteStartArray("harmonics");
        foreach (var (k, pct) in a?.Harmonics ?? [])
        {
            w.WriteStartObject();
            w.WriteNumber("harmonic", k);
            w.WriteNumber("percent", pct);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        Pair(w, "residualFmHz", "residualFmUncertaintyHz", a?.ResidualFmHz);
        CaptureInfoJson.WriteNumberOrNull(w, "residualAmPercent", a?.ResidualAmPercent);
        CaptureInfoJson.WriteNumberOrNull(w, "humNoiseDb", a?.HumNoiseDb);
        ObjectOrNull(w, "subAudibleTone", a?.SubAudible, t =>
        {
            w.WriteNumber("frequencyHz", t.FrequencyHz.Value);
            w.WriteNumber("frequencyUncertaintyHz", t.FrequencyHz.StandardUncertainty);
            w.WriteNumber("deviationHz", t.DeviationHz);
            CaptureInfoJson.WriteNumberOrNull(w, "standardHz", t.StandardHz);
            w.WriteString("list", t.List);
        });
        ObjectOrNull(w, "codeSquelch", a?.Code, c =>
        {
            w.WriteString("code", c.Name);
            w.WriteString("polarity", c.Inverted ? "inverted" : "normal");
            w.WriteBoolean("standard", c.Standard);
            w.WriteStartArray("sameSignal");
            foreach (string other in c.SameSignal)
                w.WriteStringValue(other);
            w.WriteEndArray();
            w.WriteNumber("correlation", c.Correlation);
            w.WriteNumber("words", c.Words);
            w.WriteNumber("bitErrors", c.BitErrors);
            w.WriteNumber("bits", c.Bits);
            w.WriteNumber("levelHz", c.LevelHz);
            w.WriteNumber("meanShiftHz", c.MeanShiftHz);
            CaptureInfoJson.WriteNumberOrNull(w, "turnOffS", c.TurnOffS);
        });
        ObjectOrNull(w, "reverseBurst", a?.ReverseBurst, rb =>
        {
            w.WriteNumber("shiftDeg", rb.ShiftDeg);
            w.WriteNumber("durationS", rb.DurationS);
            w.WriteNumber("resolutionS", rb.ResolutionS);
        });
        w.WriteString("distortionNotTested", a?.DistortionNotTested);
        w.WriteEndObject();
    }

    /// <summary>The <c>response</c> object: the audio response from a tone series (null keys and no points
    /// without one).</summary>
    public static void WriteResponse(Utf8JsonWriter w, AudioResponseResult? r)
    {
        w.WriteStartObject("response");
        CaptureInfoJson.WriteNumberOrNull(w, "referenceHz", r?.ReferenceHz);
        w.WriteString("unit", r?.Unit);
        w.WriteString("notTested", r?.NotTested);
        CaptureInfoJson.WriteNumberOrNull(w, "referenceLevelDb", r?.ReferenceLevelDb);
        CaptureInfoJson.WriteNumberOrNull(w, "limitAmount", r?.LimitAmount);
        w.WriteStartArray("steps");
        foreach (ResponsePoint p in r?.Points ?? [])
        {
            w.WriteStartObject();
            w.WriteNumber("startS", p.Step.StartS);
            w.WriteNumber("endS", p.Step.EndS);
            CaptureInfoJson.WriteNumberOrNull(w, "listedToneHz", p.Step.ToneHz);
            CaptureInfoJson.WriteNumberOrNull(w, "toneHz", p.ToneHz);
            CaptureInfoJson.WriteNumberOrNull(w, "levelDb", p.Step.LevelDb);
            CaptureInfoJson.WriteNumberOrNull(w, "amount", p.Amount);
            CaptureInfoJson.WriteNumberOrNull(w, "amountUncertainty", p.AmountUncertainty);
            CaptureInfoJson.WriteNumberOrNull(w, "responseDb", p.ResponseDb);
            CaptureInfoJson.WriteNumberOrNull(w, "responseUncertaintyDb", p.ResponseUncertaintyDb);
            CaptureInfoJson.WriteNumberOrNull(w, "compressionDb", p.CompressionDb);
            CaptureInfoJson.WriteNumberOrNull(w, "preEmphasisDb", p.PreEmphasisDb);
            w.WriteString("problem", p.Problem);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteEndObject();
    }

    /// <summary>Property <paramref name="name"/>: an object written by <paramref name="body"/>, or null.</summary>
    private static void ObjectOrNull<T>(Utf8JsonWriter w, string name, T? value, Action<T> body)
        where T : class
    {
        w.WritePropertyName(name);
        if (value is null)
        {
            w.WriteNullValue();
            return;
        }
        w.WriteStartObject();
        body(value);
        w.WriteEndObject();
    }

    /// <summary>A value and its standard uncertainty (k = 1), or two nulls.</summary>
    private static void Pair(Utf8JsonWriter w, string value, string uncertainty, Measured? m)
    {
        CaptureInfoJson.WriteNumberOrNull(w, value, m?.Value);
        CaptureInfoJson.WriteNumberOrNull(w, uncertainty, m?.StandardUncertainty);
    }
}
