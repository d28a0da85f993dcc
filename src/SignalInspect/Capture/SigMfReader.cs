using System.Globalization;
using System.Security.Cryptography;
using System.Text.Json;

namespace SignalInspect.Capture;

/// <summary>
/// SigMF v1.2 recordings: a <c>.sigmf-meta</c> JSON file beside its <c>.sigmf-data</c> file, or a
/// <c>.sigmf</c> tar archive holding both (read in place, never extracted). Reads the global
/// object (datatype, sample rate, offset, channels, checksum), the capture segments and the
/// annotations. Unknown namespaces are ignored, as the specification asks.
/// </summary>
internal static class SigMfReader
{
    /// <summary>Largest metadata file read (bytes); SigMF metadata is normally a few kB.</summary>
    public const long MaxMetadataBytes = 64L << 20;

    private const string MetaExt = ".sigmf-meta";
    private const string DataExt = ".sigmf-data";

    public static CaptureSource OpenPair(string path, ReaderOptions options)
    {
        string stem = path[..^MetaExt.Length];
        string metaPath = stem + MetaExt;
        string dataPath = stem + DataExt;
        if (!File.Exists(metaPath))
            throw CaptureException.ForFile(
                path,
                $"metadata file {Path.GetFileName(metaPath)} not found beside the data"
            );
        long metaSize = ByteSource.LengthOf(metaPath);
        if (metaSize == 0)
            throw CaptureException.ForFile(metaPath, "metadata file is empty");
        if (metaSize > MaxMetadataBytes)
            throw CaptureException.ForFile(
                metaPath,
                $"metadata file of {metaSize} bytes is larger than the {MaxMetadataBytes >> 20} MiB read"
            );
        byte[] json;
        using (FileStream fs = ByteSource.OpenReadOnly(metaPath))
        {
            json = new byte[metaSize];
            fs.ReadExactly(json);
        }
        // A non-conforming dataset: the metadata names its data file (SigMF global core:dataset), relative to the
        // metadata's folder.
        if (DatasetName(json) is { } named)
            dataPath = Path.Combine(Path.GetDirectoryName(Path.GetFullPath(metaPath)) ?? ".", named);
        if (!File.Exists(dataPath))
            throw CaptureException.ForFile(metaPath, $"data file {Path.GetFileName(dataPath)} not found");
        long dataSize = ByteSource.LengthOf(dataPath);
        return Build(metaPath, json, dataPath, 0, dataSize, "SigMF", metaSize + dataSize, options);
    }

    /// <summary>The global core:dataset of a metadata file, when it is a non-empty string; null otherwise (invalid
    /// JSON is reported by the full parse).</summary>
    private static string? DatasetName(byte[] json)
    {
        try
        {
            using var doc = JsonDocument.Parse(json, new JsonDocumentOptions { MaxDepth = 64 });
            return
                doc.RootElement.ValueKind == JsonValueKind.Object
                && doc.RootElement.TryGetProperty("global", out JsonElement g)
                && g.ValueKind == JsonValueKind.Object
                && g.TryGetProperty("core:dataset", out JsonElement d)
                && d.ValueKind == JsonValueKind.String
                && d.GetString() is { Length: > 0 } name
                ? name
                : null;
        }
        catch (JsonException)
        {
            return null;
        }
    }

    public static CaptureSource OpenArchive(string path, ReaderOptions options)
    {
        IReadOnlyList<TarMember> members = TarArchive.List(path);
        List<TarMember> metas =
        [
            .. members
                .Where(m => m.Name.EndsWith(MetaExt, StringComparison.Ordinal))
                .OrderBy(m => m.Name, StringComparer.Ordinal),
        ];
        if (metas.Count == 0)
            throw CaptureException.ForFile(path, "the archive holds no .sigmf-meta member");
        TarMember meta = metas[0];
        string dataName = meta.Name[..^MetaExt.Length] + DataExt;
        TarMember data = members.FirstOrDefault(m => m.Name == dataName)
            ?? throw CaptureException.ForFile(
                path,
                $"the archive holds {meta.Name} but not its data member {dataName}"
            );
        if (meta.Size > MaxMetadataBytes)
            throw CaptureException.ForFile(
                path,
                $"metadata member of {meta.Size} bytes is larger than the {MaxMetadataBytes >> 20} MiB read"
            );
        byte[] json = new byte[meta.Size];
        using (FileStream fs = ByteSource.OpenReadOnly(path))
        {
            fs.Position = meta.DataOffset;
            fs.ReadExactly(json);
        }
        CaptureSource source = Build(
            path,
            json,
            path,
            data.DataOffset,
            data.Size,
            "SigMF archive",
            ByteSource.LengthOf(path),
            options
        );
        if (metas.Count > 1)
        {
            var notes = source
                .Info.Notes.Append(
                    $"the archive holds {metas.Count} recordings; {meta.Name} is read "
                        + $"({string.Join(", ", metas.Skip(1).Select(m => m.Name))} are not)"
                )
                .ToList();
            source = source.WithInfo(source.Info with { Notes = notes });
        }
        return source;
    }

    private static CaptureSource Build(
        string metaPath,
        byte[] json,
        string dataPath,
        long dataOffset,
        long dataLength,
        string container,
        long fileSize,
        ReaderOptions options
    )
    {
        try
        {
            new System.Text.UTF8Encoding(false, throwOnInvalidBytes: true).GetCharCount(json);
        }
        catch (System.Text.DecoderFallbackException e)
        {
            throw CaptureException.ForFile(metaPath, $"metadata is not valid UTF-8 (byte {e.Index})");
        }
        JsonDocument doc;
        try
        {
            doc = JsonDocument.Parse(json, new JsonDocumentOptions { MaxDepth = 64 });
        }
        catch (JsonException e)
        {
            string where = JsonErrors.Where(e);
            throw CaptureException.ForFile(metaPath, $"metadata is not valid JSON{where}: {FirstSentence(e.Message)}");
        }
        using (doc)
        {
            var m = new Meta(metaPath);
            JsonElement root = doc.RootElement;
            if (root.ValueKind != JsonValueKind.Object)
                throw m.Error("the metadata must be a JSON object");
            JsonElement global = m.Object(root, "global", required: true)!.Value;
            string datatype = m.String(global, "global", "core:datatype")
                ?? throw m.Error("global.core:datatype is missing");
            if (!SampleFormat.TryParse(datatype, out SampleFormat format, out string dtError))
                throw m.Error("global.core:datatype: " + dtError);
            var notes = new List<string>();
            var warnings = new List<string>();
            if (m.String(global, "global", "core:version") is null)
                warnings.Add("global.core:version is missing (required by SigMF)");
            double? fileRate = m.Number(global, "global", "core:sample_rate");
            double rate;
            if (options.SampleRateHz is { } userRate)
            {
                rate = CaptureSource.CheckRate(metaPath, userRate, CaptureSource.UserGiven);
                notes.Add(
                    fileRate is { } fr
                        ? $"sample rate {rate:R} Hz from --sample-rate overrides core:sample_rate {fr:R} Hz"
                        : $"sample rate {rate:R} Hz from --sample-rate (the metadata has no core:sample_rate)"
                );
            }
            else
            {
                rate = CaptureSource.CheckRate(
                    metaPath,
                    fileRate,
                    fileRate is null ? "no global.core:sample_rate in the metadata" : "global.core:sample_rate"
                );
            }
            long channels = m.Integer(global, "global", "core:num_channels") ?? 1;
            if (channels < 1)
                throw m.Error("global.core:num_channels must be 1 or more");
            if (channels > 4096)
                throw m.Error($"global.core:num_channels {channels} is more than the 4096 read");
            long indexOffset = m.Integer(global, "global", "core:offset") ?? 0;
            string? sha = m.String(global, "global", "core:sha512");
            string? description = m.String(global, "global", "core:description");
            string? hardware = m.String(global, "global", "core:hw");
            string? recorder = m.String(global, "global", "core:recorder");
            string? author = m.String(global, "global", "core:author");
            string? location = Geolocation(global, notes);
            if (options.Datatype is not null)
                notes.Add("--datatype is ignored: SigMF metadata states core:datatype");

            int frameBytes = checked(format.BytesPerSample * (int)channels);
            List<(long Start, double? Freq, DateTimeOffset? Time, long Header)> caps = [];
            if (m.Array(root, "captures") is { } capArray)
            {
                int i = 0;
                foreach (JsonElement c in capArray.EnumerateArray())
                {
                    string where = $"captures[{i}]";
                    if (c.ValueKind != JsonValueKind.Object)
                        throw m.Error($"{where} must be an object");
                    long start = m.Integer(c, where, "core:sample_start") ?? 0;
                    double? freq = m.Number(c, where, "core:frequency");
                    DateTimeOffset? time = m.Time(c, where, "core:datetime");
                    long header = m.Integer(c, where, "core:header_bytes") ?? 0;
                    if (start < indexOffset)
                        throw m.Error($"{where}.core:sample_start {start} is before global.core:offset {indexOffset}");
                    if (caps.Count > 0 && start < caps[^1].Start)
                        throw m.Error(
                            $"{where}.core:sample_start {start} is out of order (captures must be sorted by "
                                + "core:sample_start)"
                        );
                    caps.Add((start - indexOffset, freq, time, header));
                    i++;
                }
            }
            if (caps.Count == 0)
            {
                caps.Add((0, null, null, 0));
                warnings.Add("the metadata has no capture segment; the whole data file is read as one");
            }

            // Map segments to byte extents of the data file; header bytes precede each segment's samples.
            var extents = new List<FileExtent>();
            var segments = new List<CaptureSegment>();
            long headerSum = 0;
            for (int i = 0; i < caps.Count; i++)
            {
                // Every size from the metadata is bounded by the data file before any arithmetic (a sample_start of
                // 2^61 wrapped to byte 0, or ran a reader for ever).
                if (caps[i].Header < 0 || caps[i].Header > dataLength - headerSum)
                    throw m.Error(
                        $"captures[{i}].core:header_bytes {caps[i].Header} runs beyond the {dataLength}-byte data file"
                    );
                headerSum += caps[i].Header;
                if (caps[i].Start > (dataLength - headerSum) / frameBytes)
                    throw m.Error(
                        $"captures[{i}].core:sample_start {caps[i].Start + indexOffset} lies beyond the end of the "
                            + $"{dataLength}-byte data file"
                    );
                long byteStart = headerSum + caps[i].Start * (long)frameBytes;
                if (byteStart > dataLength)
                    throw m.Error(
                        $"captures[{i}] starts at byte {byteStart} (core:header_bytes and core:sample_start), beyond "
                            + $"the {dataLength}-byte data file"
                    );
                long count;
                if (i + 1 < caps.Count)
                {
                    count = caps[i + 1].Start - caps[i].Start;
                    if (count > (dataLength - byteStart) / frameBytes)
                        throw m.Error($"captures[{i}] runs beyond the end of the {dataLength}-byte data file");
                }
                else
                {
                    long rest = dataLength - byteStart;
                    if (rest % frameBytes != 0)
                        warnings.Add(
                            $"data file length is not a whole number of {format.Name} x {channels} samples: the last "
                                + $"{rest % frameBytes} byte(s) are ignored"
                        );
                    count = rest / frameBytes;
                }
                extents.Add(new FileExtent(dataOffset + byteStart, count * frameBytes));
                segments.Add(
                    new CaptureSegment(
                        i,
                        caps[i].Start + indexOffset,
                        count,
                        caps[i].Freq,
                        caps[i].Time,
                        caps[i].Header
                    )
                );
            }
            long total = segments.Sum(s => s.SampleCount);

            var annotations = new List<CaptureAnnotation>();
            if (m.Array(root, "annotations") is { } annArray)
            {
                int i = 0;
                foreach (JsonElement a in annArray.EnumerateArray())
                {
                    string where = $"annotations[{i}]";
                    if (a.ValueKind != JsonValueKind.Object)
                        throw m.Error($"{where} must be an object");
                    annotations.Add(
                        new CaptureAnnotation(
                            m.Integer(a, where, "core:sample_start")
                                ?? throw m.Error($"{where}.core:sample_start is missing"),
                            m.Integer(a, where, "core:sample_count"),
                            m.Number(a, where, "core:freq_lower_edge"),
                            m.Number(a, where, "core:freq_upper_edge"),
                            m.String(a, where, "core:label"),
                            m.String(a, where, "core:comment")
                        )
                    );
                    i++;
                }
            }

            string checksum = "not present";
            if (sha is not null)
            {
                if (!options.VerifyChecksum)
                    checksum = "not checked (--no-verify)";
                else
                {
                    string actual = Sha512Hex(dataPath, dataOffset, dataLength);
                    if (!string.Equals(actual, sha.Trim(), StringComparison.OrdinalIgnoreCase))
                        throw new CaptureException(
                            m.Error(
                                $"core:sha512 does not match the data (metadata {Short(sha)}, data {Short(actual)}): "
                                    + "the data is damaged or belongs to another recording"
                            ).Message
                        )
                        {
                            OverriddenBy = nameof(ReaderOptions.VerifyChecksum),
                        };
                    checksum = "verified";
                }
            }

            // SigMF states complex data by its datatype (c...): a real datatype with several channels is several
            // real channels, not I and Q (as a two-channel WAV is by convention). Channel 0 unless one is picked.
            ReaderOptions picking = options;
            if (!format.IsComplex && channels > 1 && options.Channels == ChannelSelection.Auto)
            {
                picking = options with { Channels = ChannelSelection.Index, ChannelIndex = 0 };
                notes.Add(
                    $"{format.Name} with {channels} channels is {channels} real channels (SigMF: complex data has a "
                        + "c datatype): channel 0 is read; --channel N reads another, --channel iq reads 0 and 1 as I/Q"
                );
            }
            (int[] pick, bool complex, string use) = CaptureSource.PickChannels(
                metaPath,
                format,
                (int)channels,
                picking
            );
            double?[] freqs = [.. segments.Select(s => s.FrequencyHz)];
            bool oneFrequency = freqs.Distinct().Count() == 1;
            if (!oneFrequency && options.Segment is null)
                notes.Add($"{segments.Count} capture segments at different frequencies: pick one with --segment N");
            double? centre = oneFrequency ? freqs[0] : null;
            if (options.CenterFrequencyHz is { } cf)
            {
                notes.Add(
                    centre is { } c0
                        ? $"centre frequency {cf:R} Hz from --center-frequency overrides core:frequency {c0:R} Hz"
                        : $"centre frequency {cf:R} Hz from --center-frequency"
                );
                centre = cf;
            }
            var info = new CaptureInfo
            {
                Path = metaPath,
                DataPath = dataPath,
                Container = container,
                SampleRateHz = rate,
                CenterFrequencyHz = centre,
                IsComplex = complex,
                SampleCount = total,
                Channels = (int)channels,
                ChannelUse = use,
                Datatype = format.Name,
                StartTime = segments[0].StartTime,
                FileSizeBytes = fileSize,
                Segments = segments,
                Annotations = annotations,
                Description = description,
                Hardware = hardware,
                Recorder = recorder,
                Author = author,
                Location = location,
                ChecksumStatus = checksum,
                Notes = notes,
                Warnings = warnings,
            };
            var source = new CaptureSource(
                info,
                () => new FileExtentSource(dataPath, extents),
                format,
                format.ComponentsPerSample * (int)channels,
                pick
            )
            {
                CenterOverrideHz = options.CenterFrequencyHz,
            };
            return options.Segment is { } seg ? source.ForSegment(seg) : source;
        }
    }

    private static string Short(string hex) => hex.Length > 16 ? hex[..16] + "..." : hex;

    private static string FirstSentence(string s)
    {
        s = s.ReplaceLineEndings(" ");
        int cut = s.IndexOf(" LineNumber:", StringComparison.Ordinal);
        if (cut < 0)
            cut = s.IndexOf(" Path:", StringComparison.Ordinal);
        return (cut > 0 ? s[..cut] : s).Trim();
    }

    internal static string Sha512Hex(string path, long offset, long length)
    {
        using FileStream fs = ByteSource.OpenReadOnly(path);
        fs.Position = offset;
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA512);
        byte[] buf = new byte[1 << 20];
        long left = length;
        while (left > 0)
        {
            int n = fs.Read(buf, 0, (int)Math.Min(buf.Length, left));
            if (n <= 0)
                break;
            hash.AppendData(buf, 0, n);
            left -= n;
        }
        return Convert.ToHexStringLower(hash.GetHashAndReset());
    }

    /// <summary>Typed access to metadata fields, with one-line errors that name the field.</summary>
    /// <summary>SigMF core:geolocation (a GeoJSON point, RFC 7946 3.1.2: [longitude, latitude(, altitude m)]) as one
    /// line; null when absent, with a note when it is not such a point (it is information, not a reason to
    /// refuse the recording).</summary>
    private static string? Geolocation(JsonElement global, List<string> notes)
    {
        if (!global.TryGetProperty("core:geolocation", out JsonElement g) || g.ValueKind == JsonValueKind.Null)
            return null;
        if (
            g.ValueKind == JsonValueKind.Object
            && g.TryGetProperty("coordinates", out JsonElement c)
            && c.ValueKind == JsonValueKind.Array
            && c.GetArrayLength() is 2 or 3
            && c.EnumerateArray().All(x => x.ValueKind == JsonValueKind.Number)
        )
        {
            double lon = c[0].GetDouble(),
                lat = c[1].GetDouble();
            if (Math.Abs(lat) <= 90 && Math.Abs(lon) <= 180)
                return string.Create(CultureInfo.InvariantCulture, $"latitude {lat:0.######}, longitude {lon:0.######}")
                    + (
                        c.GetArrayLength() == 3
                            ? string.Create(CultureInfo.InvariantCulture, $", altitude {c[2].GetDouble():0.#} m")
                            : string.Empty
                    )
                    + " (WGS 84, from core:geolocation)";
        }
        notes.Add("global.core:geolocation is not a GeoJSON point [longitude, latitude(, altitude)]: not shown");
        return null;
    }

    private sealed class Meta(string path)
    {
        public CaptureException Error(string problem) => CaptureException.ForFile(path, problem);

        public JsonElement? Object(JsonElement parent, string key, bool required)
        {
            if (!parent.TryGetProperty(key, out JsonElement v))
                return required ? throw Error($"'{key}' object is missing") : null;
            return v.ValueKind == JsonValueKind.Object
                ? v
                : throw Error($"'{key}' must be a JSON object, not {Kind(v)}");
        }

        public JsonElement? Array(JsonElement parent, string key)
        {
            if (!parent.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            return v.ValueKind == JsonValueKind.Array ? v : throw Error($"'{key}' must be a JSON array, not {Kind(v)}");
        }

        public string? String(JsonElement obj, string where, string key)
        {
            if (!obj.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            return v.ValueKind == JsonValueKind.String
                ? v.GetString()
                : throw Error($"{where}.{key} must be a string, not {Kind(v)}");
        }

        public double? Number(JsonElement obj, string where, string key)
        {
            if (!obj.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            if (v.ValueKind != JsonValueKind.Number)
                throw Error($"{where}.{key} must be a number, not {Kind(v)}");
            double d = v.GetDouble();
            return double.IsFinite(d) ? d : throw Error($"{where}.{key} is not a finite number");
        }

        public long? Integer(JsonElement obj, string where, string key)
        {
            if (!obj.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            if (v.ValueKind != JsonValueKind.Number)
                throw Error($"{where}.{key} must be a whole number, not {Kind(v)}");
            if (!v.TryGetInt64(out long n))
            {
                double d = v.GetDouble();
                if (d != Math.Floor(d) || Math.Abs(d) > 9e15)
                    throw Error($"{where}.{key} must be a whole number, not {v.GetRawText()}");
                n = (long)d;
            }
            return n >= 0 ? n : throw Error($"{where}.{key} must not be negative ({n})");
        }

        public DateTimeOffset? Time(JsonElement obj, string where, string key)
        {
            string? s = String(obj, where, key);
            if (s is null)
                return null;
            return DateTimeOffset.TryParse(
                s,
                CultureInfo.InvariantCulture,
                DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal,
                out DateTimeOffset t
            )
                ? t
                : throw Error($"{where}.{key} '{s}' is not an RFC 3339 date and time");
        }

        private static string Kind(JsonElement v) =>
            v.ValueKind switch
            {
                JsonValueKind.String => "a string",
                JsonValueKind.Number => "a number",
                JsonValueKind.Object => "an object",
                JsonValueKind.Array => "an array",
                JsonValueKind.True or JsonValueKind.False => "a boolean",
                _ => "null",
            };
    }
}
