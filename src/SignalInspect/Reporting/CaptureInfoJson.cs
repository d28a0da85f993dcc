using System.Globalization;
using System.Text.Json;
using SignalInspect.Capture;

namespace SignalInspect.Reporting;

/// <summary>Writes a <see cref="CaptureInfo"/> as JSON: stable key order, SI units in the key names, null where
/// unknown.</summary>
public static class CaptureInfoJson
{
    /// <summary>Writes the capture as a JSON object (the <c>info --json</c> output).</summary>
    public static void Write(Utf8JsonWriter w, CaptureInfo info)
    {
        w.WriteStartObject();
        w.WriteString("file", info.Path);
        w.WriteString("container", info.Container);
        w.WriteNumber("sampleRateHz", info.SampleRateHz);
        WriteNumberOrNull(w, "centerFrequencyHz", info.CenterFrequencyHz);
        w.WriteBoolean("isComplex", info.IsComplex);
        w.WriteNumber("samples", info.SampleCount);
        w.WriteNumber("durationS", info.DurationS);
        w.WriteString("datatype", info.Datatype);
        w.WriteNumber("channels", info.Channels);
        w.WriteString("channelUse", info.ChannelUse);
        if (info.StartTime is { } t)
            w.WriteString(
                "startTime",
                t.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss.FFFFFFF'Z'", CultureInfo.InvariantCulture)
            );
        else
            w.WriteNull("startTime");
        w.WriteNumber("fileSizeBytes", info.FileSizeBytes);
        w.WriteString("checksum", info.ChecksumStatus);
        w.WriteString("hardware", info.Hardware);
        w.WriteString("recorder", info.Recorder);
        w.WriteString("author", info.Author);
        w.WriteString("location", info.Location);
        if (info.SelectedSegment is { } s)
            w.WriteNumber("segment", s);
        else
            w.WriteNull("segment");
        w.WriteStartArray("segments");
        foreach (CaptureSegment seg in info.Segments)
        {
            w.WriteStartObject();
            w.WriteNumber("index", seg.Index);
            w.WriteNumber("sampleStart", seg.SampleStart);
            w.WriteNumber("samples", seg.SampleCount);
            WriteNumberOrNull(w, "frequencyHz", seg.FrequencyHz);
            if (seg.StartTime is { } st)
                w.WriteString(
                    "startTime",
                    st.UtcDateTime.ToString("yyyy-MM-dd'T'HH:mm:ss.FFFFFFF'Z'", CultureInfo.InvariantCulture)
                );
            else
                w.WriteNull("startTime");
            w.WriteNumber("headerBytes", seg.HeaderBytes);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteStartArray("annotations");
        foreach (CaptureAnnotation a in info.Annotations)
        {
            w.WriteStartObject();
            w.WriteNumber("sampleStart", a.SampleStart);
            if (a.SampleCount is { } c)
                w.WriteNumber("samples", c);
            else
                w.WriteNull("samples");
            WriteNumberOrNull(w, "lowerEdgeHz", a.LowerEdgeHz);
            WriteNumberOrNull(w, "upperEdgeHz", a.UpperEdgeHz);
            w.WriteString("label", a.Label);
            w.WriteString("comment", a.Comment);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        WriteStrings(w, "notes", info.Notes);
        WriteStrings(w, "warnings", info.Warnings);
        w.WriteEndObject();
    }

    /// <summary>Writes a number, or null when there is none.</summary>
    public static void WriteNumberOrNull(Utf8JsonWriter w, string name, double? value)
    {
        if (value is { } v && double.IsFinite(v))
            w.WriteNumber(name, v);
        else
            w.WriteNull(name);
    }

    private static void WriteStrings(Utf8JsonWriter w, string name, IEnumerable<string> items)
    {
        w.WriteStartArray(name);
        foreach (string s in items)
            w.WriteStringValue(s);
        w.WriteEndArray();
    }
}
