using System.Collections.Concurrent;
using System.Security.Cryptography;
using System.Text;
using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Inspection;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Reporting.Plots;
using SignalInspect.Survey;

namespace SignalInspect.Batch;

/// <summary>Settings of a batch run.</summary>
public sealed record BatchOptions
{
    /// <summary>Output folder.</summary>
    public required string OutDir { get; init; }

    /// <summary>Reader options used as defaults (a sidecar overrides them per file).</summary>
    public ReaderOptions Reader { get; init; } = ReaderOptions.Default;

    /// <summary>What to measure, the limits and the report header, as for one capture (batch runs each with one
    /// thread).</summary>
    public InspectionSettings Inspection { get; init; } = new();

    /// <summary>Captures analysed at once (1 or more).</summary>
    public int Jobs { get; init; } = Math.Max(1, Environment.ProcessorCount);

    /// <summary>Write a PDF report per capture.</summary>
    public bool Reports { get; init; }

    /// <summary>Skip captures already in the output folder's summary (matched by content hash).</summary>
    public bool Resume { get; init; }

    /// <summary>How a user error becomes a record's error text (the command line names its options); null for the
    /// message as it is.</summary>
    public Func<UserInputException, string>? DescribeError { get; init; }

    /// <summary>Survey each capture (one record per emission found, each measured and judged as one capture
    /// is) with these settings (their analysis options are replaced by <see cref="Inspection"/>'s); null to measure
    /// the strongest emission of each capture.</summary>
    public SurveySettings? Survey { get; init; }

    /// <summary>This shard (1-based) of <see cref="ShardCount"/>.</summary>
    public int ShardIndex { get; init; } = 1;

    /// <summary>Number of shards.</summary>
    public int ShardCount { get; init; } = 1;
}

/// <summary>What a batch run did.</summary>
/// <param name="Records">All records of the summary (sorted by file).</param>
/// <param name="Analysed">Captures analysed in this run.</param>
/// <param name="Skipped">Captures skipped by --resume.</param>
/// <param name="Cancelled">True when the run was stopped before the end.</param>
public sealed record BatchOutcome(IReadOnlyList<BatchRecord> Records, int Analysed, int Skipped, bool Cancelled);

/// <summary>One capture found by discovery: its path and the reader options for it.</summary>
/// <param name="Path">The file to open.</param>
/// <param name="Key">Its path relative to the input it was found under (used for sharding).</param>
/// <param name="Options">Reader options (defaults plus its sidecar).</param>
/// <param name="Bytes">Size of its files.</param>
public sealed record BatchInput(string Path, string Key, ReaderOptions Options, long Bytes);

/// <summary>
/// Batch triage: finds captures under folders, files and globs, analyses them in parallel with
/// bounded memory, and writes summary.csv, summary.jsonl, summary.pdf (and optionally a report
/// per capture) into the output folder. A bad capture becomes an error record and the run goes on.
/// The summary is appended line by line as captures finish, so a stopped run keeps what it did;
/// the final files are sorted by path, so the result does not depend on the number of jobs.
/// </summary>
public static class BatchRunner
{
    /// <summary>Finds the captures named by folders (searched recursively), files and globs (* and ? in the file
    /// name).</summary>
    /// <exception cref="CaptureException">An input names nothing.</exception>
    public static IReadOnlyList<BatchInput> Discover(IEnumerable<string> inputs, ReaderOptions defaults)
    {
        var found = new SortedDictionary<string, BatchInput>(StringComparer.Ordinal);
        foreach (string input in inputs)
        {
            if (Directory.Exists(input))
            {
                foreach (string f in Walk(input))
                    if (CaptureFormats.IsCaptureName(f))
                        Add(found, f, Path.GetRelativePath(input, f), defaults);
            }
            else if (File.Exists(input))
            {
                Add(found, input, Path.GetFileName(input), defaults);
            }
            else if (input.IndexOfAny(['*', '?']) >= 0)
            {
                // Expanded here when the shell did not (a quoted pattern, or a shell without globbing): * and ? in
                // any part of the path, ** for any depth of folders.
                IReadOnlyList<string> matches = PathPattern.Expand(input);
                if (matches.Count == 0)
                    throw CaptureException.ForFile(input, "the pattern matches no file");
                foreach (string f in matches)
                    if (!f.EndsWith(CaptureFormats.SidecarSuffix, StringComparison.Ordinal))
                        Add(found, f, Path.GetFileName(f), defaults);
            }
            else
            {
                throw CaptureException.ForFile(input, "no such file, folder or pattern");
            }
        }
        return [.. found.Values];
    }

    /// <summary>The files under <paramref name="root"/>, every folder once: a linked folder is followed to its
    /// target, which is walked only if it was not walked already (a link to a parent, `up -> ..`, or to itself,
    /// `self -> .`, used to hang the walk or list every file dozens of times). Hidden entries are skipped.</summary>
    private static IEnumerable<string> Walk(string root)
    {
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var pending = new Stack<string>();
        pending.Push(root);
        var options = new EnumerationOptions
        {
            IgnoreInaccessible = true,
            AttributesToSkip = FileAttributes.Hidden,
            RecurseSubdirectories = false,
        };
        while (pending.Count > 0)
        {
            string dir = pending.Pop();
            string real;
            try
            {
                real = Directory.ResolveLinkTarget(dir, returnFinalTarget: true)?.FullName ?? Path.GetFullPath(dir);
                real = RealPath(real);
            }
            catch (IOException)
            {
                continue; // a link that leads nowhere
            }
            if (!seen.Add(real))
                continue;
            foreach (string f in Directory.EnumerateFiles(dir, "*", options))
                yield return f;
            foreach (
                string d in Directory.EnumerateDirectories(dir, "*", options).OrderDescending(StringComparer.Ordinal)
            )
                pending.Push(d);
        }
    }

    /// <summary>The path with every linked folder along it resolved (two spellings of one folder compare equal).
    /// </summary>
    private static string RealPath(string full)
    {
        string? parent = Path.GetDirectoryName(full);
        if (parent is null)
            return full;
        string resolvedParent = RealPath(parent);
        string here = Path.Combine(resolvedParent, Path.GetFileName(full));
        var info = new DirectoryInfo(here);
        return info.LinkTarget is not null && info.ResolveLinkTarget(returnFinalTarget: true) is { } t
            ? RealPath(t.FullName)
            : here;
    }

    private static void Add(SortedDictionary<string, BatchInput> found, string path, string key, ReaderOptions defaults)
    {
        string full = Path.GetFullPath(path);
        if (IsPairHalf(full, CaptureFormats.SigMfDataEnding) && File.Exists(CaptureFormats.MetaOf(full)))
            full = CaptureFormats.MetaOf(full);
        if (found.ContainsKey(full))
            return;
        string data = IsPairHalf(full, CaptureFormats.SigMfMetaEnding) ? CaptureFormats.DataOf(full) : "";
        long bytes = ByteSource.LengthOf(full) + (data.Length > 0 && File.Exists(data) ? ByteSource.LengthOf(data) : 0);
        found[full] = new BatchInput(path, key.Replace('\\', '/'), defaults, bytes);
    }

    private static bool IsPairHalf(string path, string ending) =>
        path.EndsWith(ending, StringComparison.OrdinalIgnoreCase);

    /// <summary>The shard (0-based) of a capture: FNV-1a 64 of its key, modulo the shard count. Stable across machines
    /// and runs.</summary>
    public static int ShardOf(string key, int shards)
    {
        ulong h = 14695981039346656037UL;
        foreach (byte b in Encoding.UTF8.GetBytes(key))
        {
            h ^= b;
            h *= 1099511628211UL;
        }
        return (int)(h % (ulong)shards);
    }

    /// <summary>SHA-256 of a capture's content: the file, and for a SigMF pair its data file too.</summary>
    public static string ContentHash(string path)
    {
        string data = IsPairHalf(path, CaptureFormats.SigMfMetaEnding) ? CaptureFormats.DataOf(path) : "";
        return data.Length > 0 && File.Exists(data) ? FileHash.Sha256(path, data) : FileHash.Sha256(path);
    }

    /// <summary>Runs the batch.</summary>
    /// <param name="inputs">Discovered captures.</param>
    /// <param name="options">Settings.</param>
    /// <param name="onRecord">Called after each capture (from worker threads, serialised).</param>
    /// <param name="cancel">Stops scheduling new captures; those running finish, and the summary is written.</param>
    public static BatchOutcome Run(
        IReadOnlyList<BatchInput> inputs,
        BatchOptions options,
        Action<IReadOnlyList<BatchRecord>, BatchInput>? onRecord = null,
        CancellationToken cancel = default
    )
    {
        Directory.CreateDirectory(options.OutDir);
        string jsonl = Path.Combine(options.OutDir, "summary.jsonl");
        using FileStream outLock = LockOutput(options.OutDir);
        // Resume: a capture is done when its path and its content are (the same bytes at two paths are two
        // captures); one that ended in an error is tried again (the error may have been the machine's).
        var done = new Dictionary<string, List<BatchRecord>>(StringComparer.Ordinal);
        string settings = SettingsHash(options);
        if (options.Resume && File.Exists(jsonl))
            foreach (BatchRecord r in ReadJsonlForResume(jsonl))
            {
                // Records made with other settings would mix two measurements in one summary.
                if (r.Settings != settings)
                    throw OutputException.ForFile(
                        options.OutDir,
                        $"holds a summary made with other settings (measurement options, profile or reading "
                            + $"options: {r.Settings ?? "not recorded"} against {settings}): resuming would mix "
                            + "them; replace the summary or write to another folder"
                    );
                if (r.Status != "error")
                {
                    string key = ResumeKey(r.ContentSha256, r.File);
                    if (!done.TryGetValue(key, out List<BatchRecord>? rows))
                        done[key] = rows = [];
                    rows.Add(r);
                }
            }
        if (File.Exists(jsonl))
        {
            // The kept records are written again below, so a torn or failed line leaves no trace.
            File.Delete(jsonl);
        }
        List<BatchInput> mine = [.. inputs.Where(i => ShardOf(i.Key, options.ShardCount) == options.ShardIndex - 1)];
        var records = new ConcurrentBag<BatchRecord>(done.Values.SelectMany(v => v));
        object gate = new();
        int analysed = 0,
            skipped = 0;
        bool cancelled = false;
        using var append = new StreamWriter(
            new FileStream(jsonl, FileMode.Append, FileAccess.Write, FileShare.Read),
            new UTF8Encoding(false)
        )
        {
            AutoFlush = true,
            NewLine = "\n",
        };
        foreach (BatchRecord kept in done.Values.SelectMany(v => v))
            append.WriteLine(kept.ToJsonLine());
        try
        {
            Parallel.ForEach(
                mine,
                new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, options.Jobs), CancellationToken = cancel },
                input =>
                {
                    string? hash = null;
                    try
                    {
                        hash = ContentHash(input.Path);
                    }
                    catch (IOException) { }
                    catch (UnauthorizedAccessException) { }
                    if (options.Resume && done.ContainsKey(ResumeKey(hash, input.Path)))
                    {
                        Interlocked.Increment(ref skipped);
                        return;
                    }
                    IReadOnlyList<BatchRecord> recs = options.Survey is null
                        ? [AnalyseOne(input, hash, options, settings)]
                        : BatchSurveyRows.Survey(input, hash, options, settings);
                    lock (gate)
                    {
                        foreach (BatchRecord rec in recs)
                        {
                            append.WriteLine(rec.ToJsonLine());
                            records.Add(rec);
                        }
                        analysed++;
                        onRecord?.Invoke(recs, input);
                    }
                }
            );
        }
        catch (OperationCanceledException)
        {
            cancelled = true;
        }
        append.Dispose();
        List<BatchRecord> all =
        [
            .. records
                .OrderBy(r => r.File, StringComparer.Ordinal)
                .ThenBy(r => r.ContentSha256, StringComparer.Ordinal)
                .ThenBy(r => r.Emission ?? 0),
        ];
        WriteOutputs(options.OutDir, all, options.Inspection.Profile?.Name);
        return new BatchOutcome(all, analysed, skipped, cancelled);
    }

    private static BatchRecord AnalyseOne(BatchInput input, string? hash, BatchOptions o, string settingsHash)
    {
        string file = input.Path;
        try
        {
            CaptureSource source = CaptureSource.Open(file, CaptureFormats.WithSidecar(file, input.Options));
            InspectionSettings settings = o.Inspection with
            {
                Analysis = o.Inspection.Analysis with { Threads = 1, KeepSpectrogram = o.Reports },
            };
            MeasurementReport model = CaptureInspection.Inspect(source, settings);
            AnalysisResult r = model.Analysis;
            string stem = (hash ?? r.Sha256)[..16];
            string thumbRel = Path.Combine("thumbs", stem + ".png");
            Directory.CreateDirectory(Path.Combine(o.OutDir, "thumbs"));
            byte[] png = SpectrumPlot.RenderPng(r.Spectrum.Mean, "", 480, 150, 1, absolute: false, compact: true);
            AtomicFile.Write(Path.Combine(o.OutDir, thumbRel), overwrite: true, s => s.Write(png));
            string? reportRel = null;
            if (o.Reports)
            {
                reportRel = Path.Combine(
                    "reports",
                    Path.GetFileNameWithoutExtension(file.Replace(".sigmf-meta", string.Empty))
                        + "-"
                        + stem[..8]
                        + ".pdf"
                );
                Directory.CreateDirectory(Path.Combine(o.OutDir, "reports"));
                string pdf = Path.Combine(o.OutDir, reportRel);
                CaptureInspection.WriteReport(model, pdf, overwrite: true);
            }
            return FromAnalysis(input, hash, source.Info, model, settingsHash) with
            {
                Report = reportRel?.Replace('\\', '/'),
                Thumbnail = thumbRel.Replace('\\', '/'),
            };
        }
        catch (Exception e) when (e is UserInputException or IOException or UnauthorizedAccessException)
        {
            return ErrorRecord(input, hash, o, settingsHash, e);
        }
    }

    /// <summary>The record of a capture that could not be measured.</summary>
    internal static BatchRecord ErrorRecord(
        BatchInput input,
        string? hash,
        BatchOptions o,
        string settings,
        Exception e
    )
    {
        string message = e is UserInputException u && o.DescribeError is { } describe ? describe(u) : e.Message;
        return new BatchRecord
        {
            File = input.Path,
            Status = "error",
            ContentSha256 = hash,
            Bytes = input.Bytes,
            Error = message.ReplaceLineEndings(" ").Trim(),
            Settings = settings,
        };
    }

    /// <summary>The record of one measured (and judged) analysis of a capture.</summary>
    internal static BatchRecord FromAnalysis(
        BatchInput input,
        string? hash,
        CaptureInfo info,
        MeasurementReport model,
        string settings
    )
    {
        AnalysisResult r = model.Analysis;
        return new BatchRecord
        {
            File = input.Path,
            Status = r.Warnings.Count > 0 || info.Warnings.Count > 0 ? "warn" : "ok",
            ContentSha256 = hash,
            Bytes = input.Bytes,
            Modulation = r.Classification.Kind.Name(),
            Confidence = Math.Round(r.Classification.Confidence, 3),
            ChannelSnrDb = Math.Round(r.ChannelSnrDb, 2),
            SampleRateHz = info.SampleRateHz,
            DurationS = info.DurationS,
            CarrierFrequencyHz = r.Carrier?.FrequencyHz.Value,
            OffsetHz = r.Carrier?.OffsetHz,
            OccupiedHz = r.DiscriminatorHzPerFullScale is null ? r.Bandwidth.OccupiedHz : null,
            PeakDeviationHz = r.Fm?.PeakDeviationHz.Value ?? r.Fsk?.DeviationHz,
            DepthPercent = r.Am?.DepthPercent.Value,
            CarrierUncertaintyHz = 2 * r.Carrier?.FrequencyHz.StandardUncertainty,
            OccupiedUncertaintyHz = r.DiscriminatorHzPerFullScale is null ? 2 * r.OccupiedUncertaintyHz : null,
            PeakDeviationUncertaintyHz =
                r.Fm is { } fm ? 2 * fm.PeakDeviationHz.StandardUncertainty
                : r.Fsk is { } fsk ? fsk.ShiftHz.StandardUncertainty
                : null,
            DepthUncertaintyPercent = 2 * r.Am?.DepthPercent.StandardUncertainty,
            EmissionDesignator = r.EmissionDesignator,
            CenterFrequencyHz = info.CenterFrequencyHz,
            StartTime = info.StartTime?.UtcDateTime.ToString(
                "yyyy-MM-dd'T'HH:mm:ss.FFFFFFF'Z'",
                System.Globalization.CultureInfo.InvariantCulture
            ),
            FirstIssue = model
                .Checks.Where(c => c.Verdict != Verdict.Pass)
                .OrderByDescending(c => c.Verdict == Verdict.Fail)
                .Select(c => $"{c.Verdict.Text()}: {c.Measurement}" + (c.Reason is { } why ? $" ({why})" : ""))
                .FirstOrDefault(),
            Verdict = model.Overall?.Text(),
            Settings = settings,
            Warnings = r.Warnings.Count > 0 ? string.Join("; ", r.Warnings) : null,
        };
    }

    private static string ResumeKey(string? hash, string file) => (hash ?? "-") + "|" + file;

    /// <summary>
    /// The first 16 hex digits of the SHA-256 of what decides a record's numbers: the measurement options (threads
    /// and the spectrogram aside: they do not change a number), the reading defaults, the profile file's bytes and the
    /// decision rule. Written in every record; --resume keeps only records with the same.
    /// </summary>
    public static string SettingsHash(BatchOptions o)
    {
        AnalysisOptions a = o.Inspection.Analysis with { Threads = null, KeepSpectrogram = true };
        string profile =
            o.Inspection.ProfilePath is { } path && File.Exists(path)
                ? Convert.ToHexString(SHA256.HashData(File.ReadAllBytes(path)))
                : "none";
        string text = string.Join(
            "\n",
            a.ToString(),
            a.SpectrumBase.ToString(),
            a.Signal?.ToString() ?? "",
            o.Survey is { } survey ? (survey with { Analysis = new() }).ToString() : "",
            o.Reader.ToString(),
            profile,
            o.Inspection.Profile?.Rule.ToString() ?? ""
        );
        return Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(text)))[..16].ToLowerInvariant();
    }

    /// <summary>Holds the output folder for this run: a second batch into the same folder would interleave its
    /// lines with this one's and one would lose its rows.</summary>
    /// <exception cref="OutputException">Another batch holds the folder.</exception>
    private static FileStream LockOutput(string outDir)
    {
        string path = Path.Combine(outDir, ".batch.lock");
        try
        {
            return new FileStream(
                path,
                FileMode.OpenOrCreate,
                FileAccess.ReadWrite,
                FileShare.None,
                1,
                FileOptions.DeleteOnClose
            );
        }
        catch (IOException)
        {
            throw OutputException.ForFile(
                outDir,
                "another batch is writing into this folder (.batch.lock is held); wait for it or write elsewhere"
            );
        }
    }

    /// <summary>The records of a summary.jsonl to resume from: a last line that does not read (a run killed while
    /// writing it) is left out; any other bad line is an error.</summary>
    private static List<BatchRecord> ReadJsonlForResume(string path)
    {
        string[] lines = [.. File.ReadLines(path).Where(l => !string.IsNullOrWhiteSpace(l))];
        var records = new List<BatchRecord>(lines.Length);
        for (int i = 0; i < lines.Length; i++)
        {
            try
            {
                records.Add(BatchRecord.FromJsonLine(lines[i], path));
            }
            catch (CaptureException) when (i == lines.Length - 1) { }
        }
        return records;
    }

    /// <summary>Reads the records of a summary.jsonl.</summary>
    public static IEnumerable<BatchRecord> ReadJsonl(string path)
    {
        foreach (string line in File.ReadLines(path))
            if (!string.IsNullOrWhiteSpace(line))
                yield return BatchRecord.FromJsonLine(line, path);
    }

    /// <summary>Writes summary.csv, summary.jsonl (sorted) and summary.pdf, each atomically.</summary>
    public static void WriteOutputs(string outDir, IReadOnlyList<BatchRecord> records, string? profileName)
    {
        AtomicFile.Write(Path.Combine(outDir, "summary.jsonl"), true, s =>
        {
            using var w = new StreamWriter(s, new UTF8Encoding(false)) { NewLine = "\n" };
            foreach (BatchRecord r in records)
                w.WriteLine(r.ToJsonLine());
        });
        AtomicFile.Write(Path.Combine(outDir, "summary.csv"), true, s =>
        {
            using var w = new StreamWriter(s, new UTF8Encoding(false)) { NewLine = "\n" };
            w.WriteLine(string.Join(',', BatchRecord.Columns));
            foreach (BatchRecord r in records)
                w.WriteLine(r.ToCsvRow());
        });
        AtomicFile.Write(Path.Combine(outDir, "summary.pdf"), true, s =>
            BatchSummaryPdf.Write(records, outDir, profileName, s)
        );
    }

    /// <summary>Whether <paramref name="rel"/> is a relative path that stays inside <paramref name="dir"/>.</summary>
    private static bool Inside(string dir, string rel)
    {
        if (Path.IsPathRooted(rel) || rel.Contains('\0'))
            return false;
        string root = Path.GetFullPath(dir) + Path.DirectorySeparatorChar;
        return Path.GetFullPath(Path.Combine(dir, rel)).StartsWith(root, StringComparison.Ordinal);
    }

    /// <summary>Joins the summaries of several output folders (shards) into one, de-duplicated by content
    /// hash.</summary>
    public static IReadOnlyList<BatchRecord> Merge(IEnumerable<string> dirs, string outDir)
    {
        var byHash = new SortedDictionary<string, BatchRecord>(StringComparer.Ordinal);
        Directory.CreateDirectory(outDir);
        foreach (string dir in dirs)
        {
            string jsonl = Path.Combine(dir, "summary.jsonl");
            if (!File.Exists(jsonl))
                throw CaptureException.ForFile(dir, "holds no summary.jsonl (not a batch output folder)");
            foreach (BatchRecord r in ReadJsonl(jsonl))
            {
                byHash[(r.ContentSha256 ?? "path:" + r.File) + "|" + r.File] = r;
                foreach (
                    string? rel in new[]
                    {
                        r.Thumbnail,
                        r.Report,
                        r.Report is { } rp ? Path.ChangeExtension(rp, ".json") : null,
                    }
                )
                {
                    if (rel is null)
                        continue;
                    // The summary is data, not instructions: a path in it that leaves its folder (.., rooted) is
                    // neither read nor written (it could copy a file from anywhere or overwrite one outside --out).
                    if (!Inside(dir, rel) || !Inside(outDir, rel))
                        throw CaptureException.ForFile(
                            jsonl,
                            $"names the file '{Diagnostics.SafeText.ForTerminal(rel)}' outside its folder: not merged"
                        );
                    string src = Path.Combine(dir, rel),
                        dst = Path.Combine(outDir, rel);
                    if (!File.Exists(src) || Path.GetFullPath(src) == Path.GetFullPath(dst))
                        continue;
                    Directory.CreateDirectory(Path.GetDirectoryName(dst)!);
                    File.Copy(src, dst, overwrite: true);
                }
            }
        }
        List<BatchRecord> all =
        [
            .. byHash
                .Values.OrderBy(r => r.File, StringComparer.Ordinal)
                .ThenBy(r => r.ContentSha256, StringComparer.Ordinal),
        ];
        WriteOutputs(outDir, all, null);
        return all;
    }
}
