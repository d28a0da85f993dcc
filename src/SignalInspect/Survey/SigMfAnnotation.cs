using System.Globalization;
using System.Text.Json;
using System.Text.Json.Nodes;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Reporting;

namespace SignalInspect.Survey;

/// <summary>
/// Writes a survey's findings into a copy of the capture's SigMF metadata (SigMF 1.x: one annotation per emission
/// with <c>core:sample_start</c>, <c>core:sample_count</c>, <c>core:freq_lower_edge</c>,
/// <c>core:freq_upper_edge</c>, <c>core:label</c> and <c>core:comment</c>; the rest in the <c>signalinspect</c>
/// namespace, declared in <c>global.core:extensions</c>). The copy points at the same data file
/// (<c>core:dataset</c>, relative to the copy's folder, when its name does not pair with it); the input is never
/// written.
/// </summary>
public static class SigMfAnnotation
{
    /// <summary>The namespace of the fields SigMF's core has no word for.</summary>
    public const string Namespace = "signalinspect";

    /// <summary>Writes the annotated copy of <paramref name="survey"/>'s capture metadata to
    /// <paramref name="outPath"/>.</summary>
    /// <exception cref="OutputException">The capture is not a SigMF pair, the output is its own metadata, or the
    /// output cannot be written.</exception>
    public static void Write(SurveyResult survey, string outPath, bool overwrite)
    {
        CaptureInfo info = survey.Capture;
        if (
            info.Container != "SigMF"
            || info.DataPath is null
            || !info.Path.EndsWith(".sigmf-meta", StringComparison.OrdinalIgnoreCase)
        )
            throw OutputException.ForFile(
                outPath,
                "annotations are written into a copy of a SigMF pair's metadata (.sigmf-meta beside .sigmf-data); "
                    + $"{Path.GetFileName(info.Path)} is {info.Container}"
            );
        if (!outPath.EndsWith(".sigmf-meta", StringComparison.OrdinalIgnoreCase))
            throw OutputException.ForFile(outPath, "should end in .sigmf-meta");
        if (Path.GetFullPath(outPath) == Path.GetFullPath(info.Path))
            throw OutputException.ForFile(outPath, "is the input's own metadata, which is never written; name a copy");
        JsonNode root = JsonNode.Parse(File.ReadAllBytes(info.Path))
            ?? throw OutputException.ForFile(info.Path, "metadata is empty");
        byte[] bytes = Annotate(root, survey, info.DataPath, outPath);
        AtomicFile.Write(outPath, overwrite, s => s.Write(bytes));
    }

    /// <summary>The annotated metadata: <paramref name="root"/> (the input's metadata, changed in place) with the
    /// survey's annotations added after the ones it held, sorted by first sample.</summary>
    internal static byte[] Annotate(JsonNode root, SurveyResult survey, string dataPath, string outPath)
    {
        CaptureInfo info = survey.Capture;
        JsonObject global =
            root["global"] as JsonObject ?? throw OutputException.ForFile(info.Path, "has no global object");
        if (global["core:extensions"] is not JsonArray ext)
            global["core:extensions"] = ext = [];
        if (
            !ext.Any(e =>
                e is JsonObject o && o["name"] is JsonValue v && v.TryGetValue(out string? n) && n == Namespace
            )
        )
            ext.Add(
                (JsonNode)
                    new JsonObject
                    {
                        ["name"] = Namespace,
                        ["version"] = "1.0.0",
                        ["optional"] = true,
                    }
            );
        string outStem = Path.GetFullPath(outPath)[..^".sigmf-meta".Length];
        string dataFull = Path.GetFullPath(dataPath);
        if (outStem + ".sigmf-data" != dataFull)
            global["core:dataset"] = Path.GetRelativePath(Path.GetDirectoryName(outStem) ?? ".", dataFull);
        else
            global.Remove("core:dataset");
        var list = (root["annotations"] as JsonArray)?.Select(n => n!.DeepClone()).ToList() ?? [];
        double fs = info.SampleRateHz;
        foreach (SurveyEmission e in survey.Emissions)
        {
            if (double.IsNaN(e.FirstSeenS))
                continue;
            long start = (long)Math.Round(e.FirstSeenS * fs);
            long count = Math.Max(1, (long)Math.Round(e.LastSeenS * fs) - start);
            count = Math.Min(count, info.SampleCount - start);
            AnalysisResult? r = e.Analysis;
            var a = new JsonObject
            {
                ["core:sample_start"] = start,
                ["core:sample_count"] = count,
                ["core:freq_lower_edge"] = Edge(r, e, lower: true),
                ["core:freq_upper_edge"] = Edge(r, e, lower: false),
                ["core:label"] = e.ClassName,
                ["core:comment"] = Comment(e),
                [$"{Namespace}:number"] = e.Number,
                [$"{Namespace}:frequency_hz"] = e.CentreHz,
                [$"{Namespace}:snr_db"] = Math.Round(e.SnrDb, 2),
                [$"{Namespace}:on_air_percent"] = Math.Round(e.OnAirPercent, 2),
                [$"{Namespace}:peak_power_db"] = Math.Round(e.PeakPowerDb, 2),
                [$"{Namespace}:occupied_bandwidth_hz"] = e.OccupiedBandwidthHz,
                [$"{Namespace}:emission_designator"] = r?.EmissionDesignator,
            };
            list.Add(a);
        }
        var sorted = new JsonArray([.. list.OrderBy(n => n!["core:sample_start"]?.GetValue<long>() ?? 0)]);
        root["annotations"] = sorted;
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
            root.WriteTo(w);
        return ms.ToArray();
    }

    /// <summary>An edge of the emission: its measured occupied band when measured, else the band it was detected
    /// in (absolute RF when the capture's centre is known).</summary>
    private static double Edge(AnalysisResult? r, SurveyEmission e, bool lower)
    {
        if (r is not null && r.Classification.Kind != ModulationKind.Noise)
        {
            var axis = Spectrum.FrequencyAxis.Of(r.Capture);
            double hz = axis.ToReported(lower ? r.Bandwidth.LowerEdgeHz : r.Bandwidth.UpperEdgeHz);
            return r.FrequencyReference is { } f ? f.Correct(hz) : hz;
        }
        return lower ? e.LowHz : e.HighHz;
    }

    private static string Comment(SurveyEmission e) =>
        string.Create(CultureInfo.InvariantCulture, $"SignalInspect survey #{e.Number}: {e.CentreHz:0.0} Hz, ")
        + string.Create(CultureInfo.InvariantCulture, $"SNR {e.SnrDb:0.0} dB, on air {e.OnAirPercent:0.0} %")
        + (e.Analysis is null ? "" : "; " + SurveyText.Key(e));
}
