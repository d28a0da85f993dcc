using System.Text.Json;

namespace SignalInspect.Capture;

/// <summary>How a capture file is read, chosen from its name (and, for WAV, its header).</summary>
public enum CaptureFileKind
{
    /// <summary>RIFF WAV, RF64 or BW64 (<c>.wav</c>, <c>.rf64</c>, <c>.bw64</c>).</summary>
    Wav,

    /// <summary>A SigMF pair: <c>.sigmf-meta</c> with its <c>.sigmf-data</c>.</summary>
    SigMfPair,

    /// <summary>A SigMF archive (<c>.sigmf</c>, tar).</summary>
    SigMfArchive,

    /// <summary>Headerless raw samples.</summary>
    Raw,
}

/// <summary>
/// The one registry of capture file names: the endings each reader takes, the datatype a raw file's
/// ending suggests, the SigMF pair's two names, and the sidecar beside a raw file. <c>info</c>,
/// <c>analyze</c>, <c>spectrum</c> (through <see cref="CaptureSource.Open"/>), <c>batch</c> (to find
/// captures in folders) and <c>synth</c> (to choose what to write) all ask it.
/// </summary>
public static class CaptureFormats
{
    /// <summary>Name of a raw capture's sidecar: the capture's file name plus this ending.</summary>
    public const string SidecarSuffix = ".si.json";

    /// <summary>Ending of SigMF metadata.</summary>
    public const string SigMfMetaEnding = ".sigmf-meta";

    /// <summary>Ending of SigMF sample data.</summary>
    public const string SigMfDataEnding = ".sigmf-data";

    /// <summary>Ending of a SigMF archive.</summary>
    public const string SigMfArchiveEnding = ".sigmf";

    /// <summary>Endings of the WAV family (the header decides which).</summary>
    public static IReadOnlyList<string> WavEndings { get; } = [".wav", ".rf64", ".bw64"];

    /// <summary>
    /// Short raw endings in common use and the SigMF datatype each stands for. A full SigMF datatype
    /// word as the ending (<c>.ci16_le</c>, <c>.cf32_be</c>, <c>.ru8</c> ...) is read as that datatype too.
    /// </summary>
    public static IReadOnlyDictionary<string, string> RawEndings { get; } =
        new Dictionary<string, string>(StringComparer.Ordinal)
        {
            [".cu8"] = "cu8",
            [".cs8"] = "ci8",
            [".ci8"] = "ci8",
            [".cs16"] = "ci16_le",
            [".ci16"] = "ci16_le",
            [".cs32"] = "ci32_le",
            [".ci32"] = "ci32_le",
            [".cf32"] = "cf32_le",
            [".cfile"] = "cf32_le",
            [".fc32"] = "cf32_le",
            [".cf64"] = "cf64_le",
            [".ru8"] = "ru8",
            [".rs16"] = "ri16_le",
            [".ri16"] = "ri16_le",
            [".rf32"] = "rf32_le",
        };

    /// <summary>The reader for a file name (case-insensitive). A WAV name still needs a RIFF, RF64 or BW64 header;
    /// any other name is raw.</summary>
    public static CaptureFileKind KindOf(string path)
    {
        string lower = path.ToLowerInvariant();
        if (
            lower.EndsWith(SigMfMetaEnding, StringComparison.Ordinal)
            || lower.EndsWith(SigMfDataEnding, StringComparison.Ordinal)
        )
            return CaptureFileKind.SigMfPair;
        if (lower.EndsWith(SigMfArchiveEnding, StringComparison.Ordinal))
            return CaptureFileKind.SigMfArchive;
        if (WavEndings.Any(e => lower.EndsWith(e, StringComparison.Ordinal)))
            return CaptureFileKind.Wav;
        return CaptureFileKind.Raw;
    }

    /// <summary>
    /// The SigMF datatype a raw file's ending suggests (a short ending of <see cref="RawEndings"/>, or a
    /// full SigMF datatype word), or null.
    /// </summary>
    public static string? DatatypeOfEnding(string path)
    {
        string ext = Path.GetExtension(path).ToLowerInvariant();
        if (ext.Length < 2)
            return null;
        if (RawEndings.TryGetValue(ext, out string? word))
            return word;
        return SampleFormat.TryParse(ext[1..], out _, out _) ? ext[1..] : null;
    }

    /// <summary>
    /// True when a file found in a folder is a capture to measure: a WAV, SigMF metadata or archive,
    /// a raw file whose ending names a datatype, a raw file with a sidecar, or a lone
    /// <c>.sigmf-data</c> whose metadata is missing (so that the missing file is reported). Never a
    /// sidecar, and never the data half of a complete pair (its metadata stands for both).
    /// </summary>
    public static bool IsCaptureName(string path)
    {
        string lower = path.ToLowerInvariant();
        if (lower.EndsWith(SidecarSuffix, StringComparison.Ordinal))
            return false;
        if (lower.EndsWith(SigMfDataEnding, StringComparison.Ordinal))
            return !File.Exists(MetaOf(path));
        return KindOf(path) != CaptureFileKind.Raw
            || DatatypeOfEnding(path) is not null
            || File.Exists(path + SidecarSuffix);
    }

    /// <summary>The metadata file of a SigMF data file (same stem).</summary>
    public static string MetaOf(string dataPath) => dataPath[..^SigMfDataEnding.Length] + SigMfMetaEnding;

    /// <summary>The data file of a SigMF metadata file (same stem).</summary>
    public static string DataOf(string metaPath) => metaPath[..^SigMfMetaEnding.Length] + SigMfDataEnding;

    /// <summary>The container <c>synth</c> writes for an output name: <c>.wav</c> and <c>.rf64</c> WAV (RF64 above
    /// 4 GiB), <c>.sigmf</c> an archive, <c>.sigmf-meta</c>/<c>.sigmf-data</c> a pair, anything else raw.</summary>
    public static CaptureContainer ContainerForWriting(string path)
    {
        string p = path.ToLowerInvariant();
        if (p.EndsWith(".wav", StringComparison.Ordinal) || p.EndsWith(".rf64", StringComparison.Ordinal))
            return CaptureContainer.Wav;
        return KindOf(path) switch
        {
            CaptureFileKind.SigMfArchive => CaptureContainer.SigMfArchive,
            CaptureFileKind.SigMfPair => CaptureContainer.SigMf,
            _ => CaptureContainer.Raw,
        };
    }

    /// <summary>
    /// The reader options for a raw capture given on its own: what the options leave unset is taken from its
    /// sidecar (<c>FILE.si.json</c>), when there is one. Options given win over the sidecar (batch, where the
    /// options are defaults for a folder, lets each sidecar win instead: <see cref="WithSidecar"/>).
    /// </summary>
    /// <exception cref="CaptureException">The sidecar is malformed.</exception>
    public static ReaderOptions UnderSidecar(string capture, ReaderOptions given)
    {
        ReaderOptions side = WithSidecar(capture, ReaderOptions.Default);
        return given with
        {
            Datatype = given.Datatype ?? side.Datatype,
            SampleRateHz = given.SampleRateHz ?? side.SampleRateHz,
            CenterFrequencyHz = given.CenterFrequencyHz ?? side.CenterFrequencyHz,
        };
    }

    /// <summary>Reads a raw capture's sidecar (<c>datatype</c>, <c>sampleRateHz</c>, <c>centerFrequencyHz</c>) over
    /// the defaults; the defaults unchanged when there is none.</summary>
    /// <exception cref="CaptureException">The sidecar is malformed.</exception>
    public static ReaderOptions WithSidecar(string capture, ReaderOptions defaults)
    {
        string side = capture + SidecarSuffix;
        if (!File.Exists(side))
            return defaults;
        try
        {
            using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(side));
            JsonElement e = doc.RootElement;
            if (e.ValueKind != JsonValueKind.Object)
                throw CaptureException.ForFile(side, "a sidecar must be a JSON object");
            string? dt = e.TryGetProperty("datatype", out JsonElement d)
                ? (
                    d.ValueKind == JsonValueKind.String
                        ? d.GetString()
                        : throw CaptureException.ForFile(side, "datatype must be a string")
                )
                : null;
            double? Num(string k) =>
                e.TryGetProperty(k, out JsonElement v)
                    ? (
                        v.ValueKind == JsonValueKind.Number
                            ? v.GetDouble()
                            : throw CaptureException.ForFile(side, $"{k} must be a number")
                    )
                    : null;
            return defaults with
            {
                Datatype = dt ?? defaults.Datatype,
                SampleRateHz = Num("sampleRateHz") ?? defaults.SampleRateHz,
                CenterFrequencyHz = Num("centerFrequencyHz") ?? defaults.CenterFrequencyHz,
            };
        }
        catch (JsonException)
        {
            throw CaptureException.ForFile(side, "sidecar is not valid JSON");
        }
    }
}
