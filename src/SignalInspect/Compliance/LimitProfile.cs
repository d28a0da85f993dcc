using System.Globalization;
using System.Text.Json;

namespace SignalInspect.Compliance;

/// <summary>An emission mask: required attenuation (dB below the reference power) against |offset from the
/// carrier|.</summary>
public sealed record EmissionMask
{
    /// <summary>What the mask is, e.g. "47 CFR 90.210(d) mask D".</summary>
    public required string Name { get; init; }

    /// <summary>Points (offset Hz, attenuation dB), ascending in offset; attenuation is interpolated linearly between
    /// them and held beyond the last.</summary>
    public IReadOnlyList<(double OffsetHz, double AttenuationDb)> Points { get; init; } = [];

    /// <summary>A named rule with a formula instead of points: "47cfr90.210d" (mask D).</summary>
    public string? Rule { get; init; }

    /// <summary>Bandwidth in which the emission power is measured against the mask (Hz).</summary>
    public double ReferenceBandwidthHz { get; init; } = 100;

    /// <summary>Transmitter power in watts, for rules whose floor depends on it (mask D: 50 + 10 log10 P dB); null for
    /// the 70 dB cap.</summary>
    public double? TransmitterPowerW { get; init; }

    /// <summary>Required attenuation at an offset (Hz, either side) from the carrier.</summary>
    public double RequiredAttenuationDb(double offsetHz)
    {
        double fd = Math.Abs(offsetHz);
        if (Rule == "47cfr90.210d")
        {
            // 47 CFR 90.210(d), fd in kHz: 0 dB to 5.625; 7.27 (fd - 2.88) to 12.5; beyond, the lesser of 50 + 10 log10
            // P and 70 dB.
            double k = fd / 1000;
            if (k <= 5.625)
                return 0;
            if (k <= 12.5)
                return 7.27 * (k - 2.88);
            double floor = TransmitterPowerW is { } p && p > 0 ? 50 + 10 * Math.Log10(p) : 70;
            return Math.Min(floor, 70);
        }
        if (Points.Count == 0)
            return 0;
        if (fd <= Points[0].OffsetHz)
            return Points[0].AttenuationDb;
        for (int i = 1; i < Points.Count; i++)
        {
            if (fd <= Points[i].OffsetHz)
            {
                var (f0, a0) = Points[i - 1];
                var (f1, a1) = Points[i];
                return a0 + (a1 - a0) * (fd - f0) / (f1 - f0);
            }
        }
        return Points[^1].AttenuationDb;
    }
}

/// <summary>How a reading within its expanded uncertainty of a limit is judged (ILAC-G8:09/2019).</summary>
public enum DecisionRuleKind
{
    /// <summary>Guarded acceptance and rejection, w = U: such a reading is INCONCLUSIVE (the default).</summary>
    Guarded,

    /// <summary>Simple acceptance, w = 0: the reading alone decides.</summary>
    Simple,
}

/// <summary>
/// Transient frequency behaviour at key-up and key-down (the shape of 47 CFR 90.214): the frequency difference from
/// the assigned frequency must stay within <see cref="T1MaxHz"/> during <see cref="T1S"/> after key-up, within
/// <see cref="T2MaxHz"/> during the <see cref="T2S"/> after that, and within <see cref="T3MaxHz"/> during the
/// <see cref="T3S"/> before the carrier is gone.
/// </summary>
public sealed record TransientLimits
{
    /// <summary>First interval after key-up, s.</summary>
    public required double T1S { get; init; }

    /// <summary>Second interval (after the first), s.</summary>
    public required double T2S { get; init; }

    /// <summary>Interval before key-down, s.</summary>
    public required double T3S { get; init; }

    /// <summary>Largest frequency difference during the first interval, Hz.</summary>
    public required double T1MaxHz { get; init; }

    /// <summary>Largest frequency difference during the second interval, Hz.</summary>
    public required double T2MaxHz { get; init; }

    /// <summary>Largest frequency difference during the interval before key-down, Hz.</summary>
    public required double T3MaxHz { get; init; }

    /// <summary>Where the numbers come from.</summary>
    public string? Rule { get; init; }
}

/// <summary>
/// The limits a transmitter must meet, read from a JSON file of our own format (README, "Limit
/// profiles"). Every limit is optional; a verdict is given for each one present.
/// </summary>
public sealed record LimitProfile
{
    /// <summary>Profile name.</summary>
    public required string Name { get; init; }

    /// <summary>Where its numbers come from (rule sections).</summary>
    public string? Source { get; init; }

    /// <summary>The modulation classes the profile is for (e.g. fm); empty for any. A capture of another class is
    /// not judged as if it were one of these: its verdict cannot be PASS.</summary>
    public IReadOnlyList<Measure.ModulationKind> Modulation { get; init; } = [];

    /// <summary>Nominal carrier frequency, Hz (absolute RF); null to take the capture's centre.</summary>
    public double? NominalFrequencyHz { get; init; }

    /// <summary>Frequency tolerance in ppm of the nominal frequency.</summary>
    public double? FrequencyTolerancePpm { get; init; }

    /// <summary>Frequency tolerance in Hz.</summary>
    public double? FrequencyToleranceHz { get; init; }

    /// <summary>Maximum FM peak deviation, Hz.</summary>
    public double? MaxPeakDeviationHz { get; init; }

    /// <summary>Maximum occupied bandwidth, Hz.</summary>
    public double? MaxOccupiedBandwidthHz { get; init; }

    /// <summary>Maximum AM positive-peak modulation, percent.</summary>
    public double? MaxAmPositivePeakPercent { get; init; }

    /// <summary>Maximum AM negative-peak modulation, percent.</summary>
    public double? MaxAmNegativePeakPercent { get; init; }

    /// <summary>Maximum audio distortion of the test tone (THD), percent; null for none.</summary>
    public double? MaxAudioDistortionPercent { get; init; }

    /// <summary>Minimum hum-and-noise ratio of the unmodulated carrier, dB (its reference deviation given at
    /// analysis); null for none.</summary>
    public double? MinHumNoiseDb { get; init; }

    /// <summary>The audio response's tolerance about its curve (a tone series given at analysis): at most this many dB
    /// above it; null for no response limit (with <see cref="ResponseBelowDb"/>).</summary>
    public double? ResponseAboveDb { get; init; }

    /// <summary>The audio response's tolerance: at most this many dB below its curve.</summary>
    public double? ResponseBelowDb { get; init; }

    /// <summary>The curve the response is held to: true for flat, false for the 6 dB/octave pre-emphasis
    /// curve.</summary>
    public bool ResponseFlat { get; init; }

    /// <summary>Largest difference of the sub-audible tone from the listed tone it matches, percent; null for
    /// none.</summary>
    public double? SubAudibleTolerancePercent { get; init; }

    /// <summary>Emission mask, null for none.</summary>
    public EmissionMask? Mask { get; init; }

    /// <summary>The decision rule (guarded unless the profile says "decisionRule": "simple").</summary>
    public DecisionRuleKind Rule { get; init; } = DecisionRuleKind.Guarded;

    /// <summary>Transient frequency behaviour at key-up and key-down; null for none.</summary>
    public TransientLimits? Transient { get; init; }

    /// <summary>Coverage factor k for expanded uncertainties (default 2, about 95 %).</summary>
    public double CoverageFactor { get; init; } = 2;

    /// <summary>The RF range the profile's limits are for, Hz (lowest, highest); null for any.</summary>
    public (double LowHz, double HighHz)? FrequencyRangeHz { get; init; }

    /// <summary>Where each limit comes from (the paragraph of the rule), by its profile field name
    /// (<c>frequencyTolerance</c>, <c>maxPeakDeviationHz</c>, ...); a limit without one cites
    /// <see cref="Source"/>.</summary>
    public IReadOnlyDictionary<string, string> Sources { get; init; } = new Dictionary<string, string>();

    /// <summary>The profile fields that hold a limit (the keys <see cref="Sources"/> may name).</summary>
    public static readonly IReadOnlyList<string> LimitFields =
    [
        "frequencyTolerance",
        "maxPeakDeviationHz",
        "maxOccupiedBandwidthHz",
        "am",
        "audio",
        "mask",
        "transient",
        "modulation",
        "frequencyRangeHz",
    ];

    /// <summary>The source a check of the limit in <paramref name="field"/> cites: its own, else the profile's
    /// source, else its name.</summary>
    public string SourceOf(string field) => Sources.TryGetValue(field, out string? own) ? own : Source ?? Name;

    /// <summary>Widest reference bandwidth a mask may name, Hz (masks use 100 Hz to 1 MHz: common practice).</summary>
    public const double MaxReferenceBandwidthHz = 1e9;

    /// <summary>Reads a profile file.</summary>
    /// <exception cref="ProfileException">The file is missing or malformed; the message names the
    /// field.</exception>
    public static LimitProfile Load(string path)
    {
        if (!File.Exists(path))
            throw ProfileException.ForFile(path, "limit profile not found");
        if (new FileInfo(path).Length > 1 << 20)
            throw ProfileException.ForFile(path, "limit profile larger than 1 MiB");
        try
        {
            return Parse(File.ReadAllText(path), path);
        }
        catch (JsonException e)
        {
            string where = JsonErrors.Where(e);
            throw ProfileException.ForFile(path, $"limit profile is not valid JSON{where}");
        }
    }

    /// <summary>Parses profile JSON.</summary>
    public static LimitProfile Parse(string json, string path = "profile")
    {
        using JsonDocument doc = JsonDocument.Parse(
            json,
            new JsonDocumentOptions
            {
                MaxDepth = 16,
                CommentHandling = JsonCommentHandling.Skip,
                AllowTrailingCommas = true,
            }
        );
        JsonElement root = doc.RootElement;
        Exception Bad(string field, string problem) => ProfileException.ForFile(path, $"{field} {problem}");
        if (root.ValueKind != JsonValueKind.Object)
            throw Bad("the profile", "must be a JSON object");
        var known = new HashSet<string>
        {
            "name",
            "source",
            "nominalFrequencyHz",
            "frequencyTolerance",
            "maxPeakDeviationHz",
            "maxOccupiedBandwidthHz",
            "am",
            "audio",
            "mask",
            "coverageFactor",
            "notes",
            "modulation",
            "transient",
            "decisionRule",
            "frequencyRangeHz",
            "sources",
        };
        foreach (JsonProperty p in root.EnumerateObject())
            if (!known.Contains(p.Name))
                throw Bad(p.Name, $"is not a profile field (known: {string.Join(", ", known)})");
        double? Num(JsonElement obj, string key, string field, bool positive = true)
        {
            if (!obj.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            if (v.ValueKind != JsonValueKind.Number)
                throw Bad(field, "must be a number");
            double d = v.GetDouble();
            if (!double.IsFinite(d) || (positive && d <= 0))
                throw Bad(field, "must be a positive number");
            return d;
        }
        // Nested objects are as strict as the top: a misspelt key would otherwise drop its limit silently.
        void Only(JsonElement obj, string field, params string[] keys)
        {
            foreach (JsonProperty p in obj.EnumerateObject())
                if (!keys.Contains(p.Name))
                    throw Bad($"{field}.{p.Name}", $"is not a field of {field} (known: {string.Join(", ", keys)})");
        }
        string? Str(JsonElement obj, string key, string field)
        {
            if (!obj.TryGetProperty(key, out JsonElement v) || v.ValueKind == JsonValueKind.Null)
                return null;
            return v.ValueKind == JsonValueKind.String ? v.GetString() : throw Bad(field, "must be a string");
        }
        string name = Str(root, "name", "name") ?? throw Bad("name", "is missing");
        var modulation = new List<Measure.ModulationKind>();
        if (root.TryGetProperty("modulation", out JsonElement mod))
        {
            IEnumerable<JsonElement> words = mod.ValueKind switch
            {
                JsonValueKind.String => [mod],
                JsonValueKind.Array => mod.EnumerateArray(),
                _ => throw Bad("modulation", "must be a class (\"fm\") or a list of classes"),
            };
            foreach (JsonElement w in words)
            {
                string? word = w.ValueKind == JsonValueKind.String ? w.GetString() : null;
                if (
                    word is null
                    || !Enum.TryParse(word, ignoreCase: true, out Measure.ModulationKind k)
                    || !Enum.IsDefined(k)
                    || int.TryParse(word, out _)
                )
                    throw Bad("modulation", $"'{w}' is not one of am, fm, pm, fsk, cw, ook, unknown, noise");
                modulation.Add(k);
            }
        }
        double? tolPpm = null,
            tolHz = null;
        if (root.TryGetProperty("frequencyTolerance", out JsonElement tol))
        {
            if (tol.ValueKind != JsonValueKind.Object)
                throw Bad("frequencyTolerance", "must be an object with \"ppm\" or \"hz\"");
            Only(tol, "frequencyTolerance", "ppm", "hz");
            tolPpm = Num(tol, "ppm", "frequencyTolerance.ppm");
            tolHz = Num(tol, "hz", "frequencyTolerance.hz");
            if (tolPpm is null && tolHz is null)
                throw Bad("frequencyTolerance", "needs \"ppm\" or \"hz\"");
            if (tolPpm is not null && tolHz is not null)
                throw Bad("frequencyTolerance", "takes \"ppm\" or \"hz\", not both (which would decide?)");
        }
        // An object of two numbers (each optional): its fields checked, then read.
        (double?, double?) Two(string field, string a, string b)
        {
            if (!root.TryGetProperty(field, out JsonElement obj))
                return (null, null);
            if (obj.ValueKind != JsonValueKind.Object)
                throw Bad(field, "must be an object");
            Only(obj, field, a, b);
            return (Num(obj, a, $"{field}.{a}"), Num(obj, b, $"{field}.{b}"));
        }
        string[] audioKeys =
        [
            "maxDistortionPercent",
            "minHumNoiseDb",
            "responseAboveDb",
            "responseBelowDb",
            "responseCurve",
            "subAudibleTolerancePercent",
        ];
        double? maxThd = null,
            minHn = null,
            above = null,
            below = null,
            toneTol = null;
        bool flat = false;
        if (root.TryGetProperty("audio", out JsonElement au))
        {
            if (au.ValueKind != JsonValueKind.Object)
                throw Bad("audio", "must be an object");
            Only(au, "audio", audioKeys);
            maxThd = Num(au, "maxDistortionPercent", "audio.maxDistortionPercent");
            minHn = Num(au, "minHumNoiseDb", "audio.minHumNoiseDb");
            above = Num(au, "responseAboveDb", "audio.responseAboveDb");
            below = Num(au, "responseBelowDb", "audio.responseBelowDb");
            toneTol = Num(au, "subAudibleTolerancePercent", "audio.subAudibleTolerancePercent");
            string? curve = Str(au, "responseCurve", "audio.responseCurve");
            if (curve is not (null or "pre-emphasis" or "flat"))
                throw Bad("audio.responseCurve", $"'{curve}' is not \"pre-emphasis\" or \"flat\"");
            flat = curve == "flat";
            if ((above is null) != (below is null))
                throw Bad("audio", "needs both responseAboveDb and responseBelowDb for a response limit");
            if (above < 0 || below < 0)
                throw Bad("audio", "responseAboveDb and responseBelowDb are tolerances: not negative");
        }
        var (pos, neg) = Two("am", "maxPositivePeakPercent", "maxNegativePeakPercent");
        EmissionMask? mask = null;
        if (root.TryGetProperty("mask", out JsonElement m))
        {
            if (m.ValueKind != JsonValueKind.Object)
                throw Bad("mask", "must be an object");
            Only(m, "mask", "rule", "name", "points", "referenceBandwidthHz", "transmitterPowerW");
            string? rule = Str(m, "rule", "mask.rule");
            if (rule is not null && rule != "47cfr90.210d")
                throw Bad("mask.rule", $"'{rule}' is not a known rule (known: 47cfr90.210d)");
            var points = new List<(double, double)>();
            if (m.TryGetProperty("points", out JsonElement pts))
            {
                if (pts.ValueKind != JsonValueKind.Array)
                    throw Bad("mask.points", "must be an array of [offsetHz, attenuationDb] pairs");
                int i = 0;
                foreach (JsonElement pt in pts.EnumerateArray())
                {
                    if (
                        pt.ValueKind != JsonValueKind.Array
                        || pt.GetArrayLength() != 2
                        || pt[0].ValueKind != JsonValueKind.Number
                        || pt[1].ValueKind != JsonValueKind.Number
                    )
                        throw Bad($"mask.points[{i}]", "must be a pair [offsetHz, attenuationDb] of numbers");
                    double f = pt[0].GetDouble(),
                        a = pt[1].GetDouble();
                    if (f < 0 || (points.Count > 0 && f <= points[^1].Item1))
                        throw Bad($"mask.points[{i}]", "offsets must be 0 or more and ascending");
                    if (!(double.IsFinite(a) && a >= 0))
                        throw Bad($"mask.points[{i}]", "the attenuation must be 0 dB or more (below the carrier)");
                    points.Add((f, a));
                    i++;
                }
            }
            if (rule is null && points.Count == 0)
                throw Bad("mask", "needs \"rule\" or \"points\"");
            mask = new EmissionMask
            {
                Name = Str(m, "name", "mask.name") ?? rule ?? "emission mask",
                Rule = rule,
                Points = points,
                ReferenceBandwidthHz = Num(m, "referenceBandwidthHz", "mask.referenceBandwidthHz") is { } rbw
                    ? rbw <= MaxReferenceBandwidthHz
                        ? rbw
                        : throw Bad("mask.referenceBandwidthHz", $"must be at most {MaxReferenceBandwidthHz:0} Hz")
                    : 100,
                TransmitterPowerW = Num(m, "transmitterPowerW", "mask.transmitterPowerW"),
            };
        }
        TransientLimits? transient = null;
        if (root.TryGetProperty("transient", out JsonElement tr))
        {
            if (tr.ValueKind != JsonValueKind.Object)
                throw Bad("transient", "must be an object");
            Only(tr, "transient", "t1Ms", "t2Ms", "t3Ms", "t1MaxHz", "t2MaxHz", "t3MaxHz", "rule");
            double Need(string key) => Num(tr, key, $"transient.{key}") ?? throw Bad($"transient.{key}", "is missing");
            transient = new TransientLimits
            {
                T1S = Need("t1Ms") / 1000,
                T2S = Need("t2Ms") / 1000,
                T3S = Need("t3Ms") / 1000,
                T1MaxHz = Need("t1MaxHz"),
                T2MaxHz = Need("t2MaxHz"),
                T3MaxHz = Need("t3MaxHz"),
                Rule = Str(tr, "rule", "transient.rule"),
            };
        }
        (double, double)? range = null;
        if (root.TryGetProperty("frequencyRangeHz", out JsonElement fr))
        {
            if (
                fr.ValueKind != JsonValueKind.Array
                || fr.GetArrayLength() != 2
                || fr[0].ValueKind != JsonValueKind.Number
                || fr[1].ValueKind != JsonValueKind.Number
                || !(
                    fr[0].GetDouble() > 0 && fr[1].GetDouble() > fr[0].GetDouble() && double.IsFinite(fr[1].GetDouble())
                )
            )
                throw Bad("frequencyRangeHz", "must be [lowest, highest] in Hz, 0 < lowest < highest");
            range = (fr[0].GetDouble(), fr[1].GetDouble());
        }
        var sources = new Dictionary<string, string>(StringComparer.Ordinal);
        if (root.TryGetProperty("sources", out JsonElement src))
        {
            if (src.ValueKind != JsonValueKind.Object)
                throw Bad("sources", "must be an object naming the source of each limit");
            foreach (JsonProperty p in src.EnumerateObject())
            {
                if (!LimitFields.Contains(p.Name))
                    throw Bad($"sources.{p.Name}", $"is not a limit field (known: {string.Join(", ", LimitFields)})");
                if (!root.TryGetProperty(p.Name, out _))
                    throw Bad($"sources.{p.Name}", "names a limit the profile does not set");
                sources[p.Name] =
                    p.Value.ValueKind == JsonValueKind.String
                        ? p.Value.GetString()!
                        : throw Bad($"sources.{p.Name}", "must be a string");
            }
        }
        DecisionRuleKind decision = Str(root, "decisionRule", "decisionRule") switch
        {
            null or "guarded" => DecisionRuleKind.Guarded,
            "simple" => DecisionRuleKind.Simple,
            var other => throw Bad("decisionRule", $"'{other}' is not guarded or simple"),
        };
        return new LimitProfile
        {
            FrequencyRangeHz = range,
            Sources = sources,
            Rule = decision,
            Transient = transient,
            Modulation = modulation,
            Name = name,
            Source = Str(root, "source", "source"),
            NominalFrequencyHz = Num(root, "nominalFrequencyHz", "nominalFrequencyHz"),
            FrequencyTolerancePpm = tolPpm,
            FrequencyToleranceHz = tolHz,
            MaxPeakDeviationHz = Num(root, "maxPeakDeviationHz", "maxPeakDeviationHz"),
            MaxOccupiedBandwidthHz = Num(root, "maxOccupiedBandwidthHz", "maxOccupiedBandwidthHz"),
            MaxAmPositivePeakPercent = pos,
            MaxAmNegativePeakPercent = neg,
            MaxAudioDistortionPercent = maxThd,
            MinHumNoiseDb = minHn,
            ResponseAboveDb = above,
            ResponseBelowDb = below,
            ResponseFlat = flat,
            SubAudibleTolerancePercent = toneTol,
            Mask = mask,
            CoverageFactor = Num(root, "coverageFactor", "coverageFactor") ?? 2,
        };
    }

    /// <summary>The frequency tolerance in Hz about <paramref name="nominalHz"/> (a ppm tolerance needs it), null
    /// without a tolerance or, for ppm, without a nominal.</summary>
    public double? ToleranceHzAt(double? nominalHz) =>
        FrequencyToleranceHz ?? (nominalHz is { } n && FrequencyTolerancePpm is { } ppm ? ppm * n / 1e6 : null);

    /// <summary>A one-line description of the tolerance, e.g. "2.5 ppm".</summary>
    public string? ToleranceText =>
        FrequencyTolerancePpm is { } p ? p.ToString("0.###", CultureInfo.InvariantCulture) + " ppm"
        : FrequencyToleranceHz is { } h ? h.ToString("0.###", CultureInfo.InvariantCulture) + " Hz"
        : null;
}
