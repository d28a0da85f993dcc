using System.Globalization;
using System.Text;
using System.Text.Json;

namespace SignalInspect.Batch;

/// <summary>One capture's line in a batch summary (summary.csv / summary.jsonl).</summary>
public sealed record BatchRecord
{
    /// <summary>The capture's path as found.</summary>
    public required string File { get; init; }

    /// <summary>"ok" (measured), "warn" (measured, with warnings: see <see cref="Warnings"/>) or "error" (could
    /// not be read).</summary>
    public required string Status { get; init; }

    /// <summary>The emission's number in a surveyed capture (batch --survey: one record per emission, strongest
    /// first); null for a capture measured whole.</summary>
    public long? Emission { get; init; }

    /// <summary>Share of the capture the emission was on air, percent (surveyed captures only).</summary>
    public double? OnAirPercent { get; init; }

    /// <summary>SHA-256 of the file's content (with its .sigmf-data for a SigMF pair); null when it could not be
    /// read.</summary>
    public string? ContentSha256 { get; init; }

    /// <summary>File size in bytes (with the data file of a SigMF pair).</summary>
    public long Bytes { get; init; }

    /// <summary>Modulation found.</summary>
    public string? Modulation { get; init; }

    /// <summary>Classifier confidence.</summary>
    public double? Confidence { get; init; }

    /// <summary>SNR in the occupied bandwidth, dB.</summary>
    public double? ChannelSnrDb { get; init; }

    /// <summary>Sample rate, Hz.</summary>
    public double? SampleRateHz { get; init; }

    /// <summary>Duration, s.</summary>
    public double? DurationS { get; init; }

    /// <summary>Carrier frequency (absolute when known), Hz.</summary>
    public double? CarrierFrequencyHz { get; init; }

    /// <summary>Carrier offset, Hz.</summary>
    public double? OffsetHz { get; init; }

    /// <summary>Occupied bandwidth, Hz.</summary>
    public double? OccupiedHz { get; init; }

    /// <summary>FM peak deviation, Hz.</summary>
    public double? PeakDeviationHz { get; init; }

    /// <summary>AM depth, percent.</summary>
    public double? DepthPercent { get; init; }

    /// <summary>Expanded uncertainty (k = 2) of the carrier frequency and offset, Hz.</summary>
    public double? CarrierUncertaintyHz { get; init; }

    /// <summary>Expanded uncertainty (k = 2) of the occupied bandwidth, Hz.</summary>
    public double? OccupiedUncertaintyHz { get; init; }

    /// <summary>Expanded uncertainty (k = 2) of the peak deviation, Hz.</summary>
    public double? PeakDeviationUncertaintyHz { get; init; }

    /// <summary>Expanded uncertainty (k = 2) of the AM depth, percent.</summary>
    public double? DepthUncertaintyPercent { get; init; }

    /// <summary>Emission designator.</summary>
    public string? EmissionDesignator { get; init; }

    /// <summary>What decided the numbers (<see cref="BatchRunner.SettingsHash"/>): --resume keeps only records made
    /// with the same.</summary>
    public string? Settings { get; init; }

    /// <summary>The capture's centre frequency, Hz (null when not stated).</summary>
    public double? CenterFrequencyHz { get; init; }

    /// <summary>When the capture started (UTC, RFC 3339), null when not stated.</summary>
    public string? StartTime { get; init; }

    /// <summary>The first check that did not pass (a FAIL before any other), with its reason; null when all
    /// passed or no profile was given.</summary>
    public string? FirstIssue { get; init; }

    /// <summary>Overall verdict when limits were given (PASS, FAIL, INCONCLUSIVE).</summary>
    public string? Verdict { get; init; }

    /// <summary>Warnings, joined with "; ".</summary>
    public string? Warnings { get; init; }

    /// <summary>The one-line error for status "error".</summary>
    public string? Error { get; init; }

    /// <summary>Report PDF written (--reports), relative to the output folder.</summary>
    public string? Report { get; init; }

    /// <summary>Spectrum thumbnail, relative to the output folder.</summary>
    public string? Thumbnail { get; init; }

    /// <summary>The columns of summary.csv, in order (the same keys as the JSON lines).</summary>
    public static readonly string[] Columns =
    [
        "file",
        "status",
        "emission",
        "onAirPercent",
        "modulation",
        "carrierFrequencyHz",
        "offsetHz",
        "occupiedHz",
        "peakDeviationHz",
        "depthPercent",
        "verdict",
        "error",
        "carrierUncertaintyHz",
        "occupiedUncertaintyHz",
        "peakDeviationUncertaintyHz",
        "depthUncertaintyPercent",
        "firstIssue",
        "centerFrequencyHz",
        "startTime",
        "confidence",
        "channelSnrDb",
        "emissionDesignator",
        "sampleRateHz",
        "durationS",
        "bytes",
        "contentSha256",
        "warnings",
        "report",
        "thumbnail",
        "settings",
    ];

    private object?[] Values() =>
        [
            File,
            Status,
            Emission,
            OnAirPercent,
            Modulation,
            CarrierFrequencyHz,
            OffsetHz,
            OccupiedHz,
            PeakDeviationHz,
            DepthPercent,
            Verdict,
            Error,
            CarrierUncertaintyHz,
            OccupiedUncertaintyHz,
            PeakDeviationUncertaintyHz,
            DepthUncertaintyPercent,
            FirstIssue,
            CenterFrequencyHz,
            StartTime,
            Confidence,
            ChannelSnrDb,
            EmissionDesignator,
            SampleRateHz,
            DurationS,
            Bytes,
            ContentSha256,
            Warnings,
            Report,
            Thumbnail,
            Settings,
        ];

    /// <summary>One JSON line, keys in <see cref="Columns"/> order.</summary>
    public string ToJsonLine()
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms))
        {
            w.WriteStartObject();
            object?[] v = Values();
            for (int i = 0; i < Columns.Length; i++)
            {
                switch (v[i])
                {
                    case null:
                        w.WriteNull(Columns[i]);
                        break;
                    case string s:
                        w.WriteString(Columns[i], s);
                        break;
                    case double d when double.IsFinite(d):
                        w.WriteNumber(Columns[i], d);
                        break;
                    case double:
                        w.WriteNull(Columns[i]);
                        break;
                    case long l:
                        w.WriteNumber(Columns[i], l);
                        break;
                }
            }
            w.WriteEndObject();
        }
        return Encoding.UTF8.GetString(ms.ToArray());
    }

    /// <summary>One CSV row (RFC 4180 quoting, invariant numbers).</summary>
    public string ToCsvRow()
    {
        // A value with an uncertainty is written rounded with it (GUM 7.2.6, as the reports print it); the JSON lines
        // keep every digit.
        var rounded = new Dictionary<string, string>();
        void Pair(string value, double? v, string? uKey, double? u)
        {
            if (v is { } x && u is { } e && double.IsFinite(x) && double.IsFinite(e) && e > 0)
            {
                var (vt, ut) = Reporting.ResultRow.RoundPair(x, e);
                rounded[value] = vt;
                if (uKey is not null)
                    rounded[uKey] = ut;
            }
        }
        Pair("carrierFrequencyHz", CarrierFrequencyHz, "carrierUncertaintyHz", CarrierUncertaintyHz);
        Pair("offsetHz", OffsetHz, null, CarrierUncertaintyHz);
        Pair("occupiedHz", OccupiedHz, "occupiedUncertaintyHz", OccupiedUncertaintyHz);
        Pair("peakDeviationHz", PeakDeviationHz, "peakDeviationUncertaintyHz", PeakDeviationUncertaintyHz);
        Pair("depthPercent", DepthPercent, "depthUncertaintyPercent", DepthUncertaintyPercent);
        object?[] values = Values();
        return string.Join(
            ',',
            Columns.Select(
                (column, i) =>
                    rounded.TryGetValue(column, out string? text)
                        ? text
                        : values[i] switch
                        {
                            null => string.Empty,
                            double d => double.IsFinite(d)
                                ? d.ToString(CsvFixed, CultureInfo.InvariantCulture)
                                : string.Empty,
                            long l => l.ToString(CultureInfo.InvariantCulture),
                            string s => Diagnostics.SafeText.CsvCell(s),
                            _ => string.Empty,
                        }
            )
        );
    }

    /// <summary>The CSV's format of a number written without an uncertainty: up to nine decimals, never
    /// e-notation (a spreadsheet reads either, a person only one).</summary>
    public const string CsvFixed = "0.#########";

    /// <summary>Reads a JSON line back.</summary>
    /// <exception cref="Capture.CaptureException">The line is not a summary record.</exception>
    public static BatchRecord FromJsonLine(string line, string source)
    {
        try
        {
            using JsonDocument doc = JsonDocument.Parse(line);
            JsonElement e = doc.RootElement;
            string? S(string k) =>
                e.TryGetProperty(k, out JsonElement v) && v.ValueKind == JsonValueKind.String ? v.GetString() : null;
            double? D(string k) =>
                e.TryGetProperty(k, out JsonElement v) && v.ValueKind == JsonValueKind.Number ? v.GetDouble() : null;
            return new BatchRecord
            {
                File = S("file") ?? throw new FormatException("no file"),
                Status = S("status") ?? throw new FormatException("no status"),
                Emission = D("emission") is { } em ? (long)em : null,
                OnAirPercent = D("onAirPercent"),
                ContentSha256 = S("contentSha256"),
                Bytes = (long)(D("bytes") ?? 0),
                Modulation = S("modulation"),
                Confidence = D("confidence"),
                ChannelSnrDb = D("channelSnrDb"),
                SampleRateHz = D("sampleRateHz"),
                DurationS = D("durationS"),
                CarrierFrequencyHz = D("carrierFrequencyHz"),
                OffsetHz = D("offsetHz"),
                OccupiedHz = D("occupiedHz"),
                PeakDeviationHz = D("peakDeviationHz"),
                DepthPercent = D("depthPercent"),
                CarrierUncertaintyHz = D("carrierUncertaintyHz"),
                OccupiedUncertaintyHz = D("occupiedUncertaintyHz"),
                PeakDeviationUncertaintyHz = D("peakDeviationUncertaintyHz"),
                DepthUncertaintyPercent = D("depthUncertaintyPercent"),
                CenterFrequencyHz = D("centerFrequencyHz"),
                StartTime = S("startTime"),
                FirstIssue = S("firstIssue"),
                Settings = S("settings"),
                EmissionDesignator = S("emissionDesignator"),
                Verdict = S("verdict"),
                Warnings = S("warnings"),
                Error = S("error"),
                Report = S("report"),
                Thumbnail = S("thumbnail"),
            };
        }
        catch (Exception ex) when (ex is JsonException or FormatException or InvalidOperationException)
        {
            throw Capture.CaptureException.ForFile(
                source,
                "holds a line that is not a batch summary record: " + ex.Message.ReplaceLineEndings(" ")
            );
        }
    }
}
