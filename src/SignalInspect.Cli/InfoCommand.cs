using System.CommandLine;
using System.Globalization;
using System.Text.Json;
using SignalInspect.Capture;
using SignalInspect.Diagnostics;
using SignalInspect.Reporting;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect info</c>: what was read from a capture.</summary>
internal static class InfoCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var capture = new Argument<string>("capture")
        {
            Description =
                "The capture file: WAV/RF64/BW64, SigMF (.sigmf-meta, .sigmf-data or .sigmf archive) or raw IQ.",
        };
        var json = new Option<bool>("--json")
        {
            Description = "Print the result as JSON (keys in SI units; null where unknown).",
        };
        var reader = new ReaderOptionSet();
        var cmd = new Command(
            "info",
            "Show what a capture holds: sample rate, centre frequency, real or complex, samples, duration, datatype, "
                + "channels, segments, annotations."
        )
        {
            capture,
            json,
        };
        reader.AddTo(cmd);
        cmd.SetAction(r =>
        {
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            CaptureInfo info = source.Info;
            if (r.GetValue(json))
            {
                using var ms = new MemoryStream();
                using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
                    CaptureInfoJson.Write(w, info);
                stdout.WriteLine(System.Text.Encoding.UTF8.GetString(ms.ToArray()));
            }
            else
            {
                WriteText(stdout, info);
            }
            foreach (string warning in info.Warnings)
                stderr.WriteLine(
                    $"signalinspect: warning: {SafeText.ForTerminal(Path.GetFileName(info.Path))}: "
                        + SafeText.ForTerminal(warning)
                );
            return ExitCodes.Success;
        });
        return cmd;
    }

    private static void WriteText(TextWriter o, CaptureInfo info)
    {
        CultureInfo inv = CultureInfo.InvariantCulture;
        // Text from the file is shown with its control characters escaped (SafeText).
        void Row(string k, string v) => o.WriteLine($"{k,-19}{SafeText.ForTerminal(v)}");
        Row("file", info.Path);
        Row("container", info.Container);
        Row("sample rate", Units.Hz(info.SampleRateHz));
        Row("centre frequency", Units.Hz(info.CenterFrequencyHz));
        Row("signal", (info.IsComplex ? "complex (I/Q)" : "real") + ", " + info.ChannelUse);
        Row("datatype", info.Datatype);
        Row("channels", info.Channels.ToString(inv));
        Row("samples", info.SampleCount.ToString(inv));
        Row("duration", info.DurationS.ToString("0.######", inv) + " s");
        Row("start time", info.StartTime?.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss.fff 'UTC'", inv) ?? "unknown");
        Row("file size", info.FileSizeBytes.ToString(inv) + " bytes");
        if (info.Container.StartsWith("SigMF", StringComparison.Ordinal))
            Row("sha512", info.ChecksumStatus);
        if (info.Description is { } d)
            Row("description", d);
        if (info.Hardware is { } hw)
            Row("hardware", hw);
        if (info.Segments.Count > 0)
        {
            o.WriteLine(
                $"segments ({info.Segments.Count})"
                    + (info.SelectedSegment is { } s ? $", reading segment {s}" : string.Empty)
            );
            foreach (CaptureSegment seg in info.Segments)
                o.WriteLine(
                    $"  [{seg.Index}] start {seg.SampleStart}, {seg.SampleCount} samples, {Units.Hz(seg.FrequencyHz)}"
                        + (
                            seg.StartTime is { } t
                                ? ", " + t.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss.fff 'UTC'", inv)
                                : string.Empty
                        )
                        + (seg.HeaderBytes > 0 ? $", {seg.HeaderBytes} header bytes" : string.Empty)
                );
        }
        if (info.Annotations.Count > 0)
        {
            o.WriteLine($"annotations ({info.Annotations.Count})");
            foreach (CaptureAnnotation a in info.Annotations)
                o.WriteLine(
                    $"  start {a.SampleStart}"
                        + (a.SampleCount is { } c ? $", {c} samples" : string.Empty)
                        + (
                            a.LowerEdgeHz is { } lo && a.UpperEdgeHz is { } hi
                                ? $", {Units.Hz(lo)} to {Units.Hz(hi)}"
                                : string.Empty
                        )
                        + (a.Label is { } l ? $", '{SafeText.ForTerminal(l)}'" : string.Empty)
                        + (a.Comment is { } cm ? $": {SafeText.ForTerminal(cm)}" : string.Empty)
                );
        }
        foreach (string n in info.Notes)
            o.WriteLine($"note: {SafeText.ForTerminal(n)}");
    }
}
