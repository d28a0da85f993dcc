using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using SignalInspect.Batch;
using SignalInspect.Compliance;
using SignalInspect.Inspection;
using SignalInspect.Reporting;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect batch</c>: triage of many recordings into one summary; <c>batch merge</c> joins shard
/// outputs.</summary>
internal static class BatchCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var inputs = new Argument<string[]>("inputs")
        {
            Description =
                "Folders (searched recursively), files or patterns (*.wav) of captures. Raw files need "
                + "--datatype/--sample-rate, or a sidecar FILE.si.json.",
            Arity = ArgumentArity.OneOrMore,
        };
        var outDir = new Option<string>("--out")
        {
            Description = "Output folder: summary.csv, summary.jsonl, summary.pdf, thumbs/, reports/.",
            Required = true,
            HelpName = "DIR",
        };
        var decisionRule = DecisionRuleOption.Create();
        var limits = new Option<string?>("--limits")
        {
            Description = "Limit profile (see profiles/README.md): a verdict per capture.",
            HelpName = "PROFILE",
        };
        // No default value in the option: help would print this machine's core count as if it were everyone's.
        var jobs = new Option<int?>("--jobs")
        {
            Description = "Captures analysed at once (default: one per core).",
            HelpName = "N",
        };
        var reports = new Option<bool>("--reports")
        {
            Description = "Also write a PDF report (and its JSON) per capture into DIR/reports/.",
        };
        var resume = new Option<bool>("--resume")
        {
            Description =
                "Keep the records already in DIR/summary.jsonl and skip those captures (matched by path and "
                + "content); captures that ended in an error are tried again.",
        };
        var force = new Option<bool>("--force")
        {
            Description = "Replace a summary already in DIR (without this or --resume, such a folder is refused).",
        };
        var shard = new Option<string?>("--shard")
        {
            Description =
                "Analyse only shard I of N (1-based; inputs split by a hash of their path), for running shards under "
                + "a scheduler; join them with 'batch merge'.",
            HelpName = "I/N",
        };
        var surveyFlag = new Option<bool>("--survey")
        {
            Description =
                "Survey each capture: one row per emission found (its measurements and time on air) instead of one "
                + "per capture; the survey options (--channels ...) apply. Rows are measured, not judged.",
        };
        var survey = new SurveyOptionSet();
        var reader = new ReaderOptionSet();
        var measure = new MeasurementOptionSet();
        var cmd = new Command(
            "batch",
            "Triage many captures: analyse each (in parallel, bounded memory), one bad file becomes an error row, and "
                + "write one summary (CSV, JSON Lines, PDF with spectrum thumbnails). Exit code 2 when a capture could "
                + "not be read, else 1 when one failed a limit, else 0."
        )
        {
            inputs,
            outDir,
            limits,
            decisionRule,
            jobs,
            reports,
            resume,
            force,
            shard,
            surveyFlag,
        };
        survey.AddTo(cmd);
        measure.AddTo(cmd);
        reader.AddTo(cmd);
        cmd.Add(MergeCommand(stdout, stderr));
        cmd.SetAction(r =>
        {
            var (index, count) = ParseShard(r.GetValue(shard));
            string? profilePath = r.GetValue(limits);
            bool surveying = r.GetValue(surveyFlag);
            if (!surveying && survey.FirstGiven(r) is { } alone)
                throw new UsageException($"{alone}: a survey option; add --survey");
            if (surveying && profilePath is not null)
                throw new UsageException(
                    "--limits: a profile judges one emission on its assigned channel, a survey lists every emission; "
                        + "judge one with 'analyze --signal FREQ --limits'"
                );
            LimitProfile? profile = profilePath is null ? null : LimitProfile.Load(profilePath);
            profile = DecisionRuleOption.Apply(profile, r.GetValue(decisionRule));
            int j = r.GetValue(jobs) ?? Math.Max(1, Environment.ProcessorCount);
            if (j < 1 || j > 256)
                throw new UsageException($"--jobs: {j} must be from 1 to 256");
            string outPath = r.GetValue(outDir)!;
            if (File.Exists(Path.Combine(outPath, "summary.jsonl")) && !r.GetValue(resume) && !r.GetValue(force))
                throw OutputException.ForFile(
                    outPath,
                    "already holds a batch summary: --resume continues it, --force replaces it"
                );
            IReadOnlyList<BatchInput> found = BatchRunner.Discover(r.GetValue(inputs)!, reader.Read(r));
            if (found.Count == 0)
                throw new UsageException(
                    "no captures found in "
                        + string.Join(", ", r.GetValue(inputs)!)
                        + " (WAV/RF64/BW64, SigMF, or raw files with a datatype ending or a sidecar): nothing written"
                );
            var options = new BatchOptions
            {
                OutDir = r.GetValue(outDir)!,
                Reader = reader.Read(r),
                Inspection = new InspectionSettings
                {
                    Analysis = measure.Read(r, null),
                    Profile = profile,
                    ProfilePath = profilePath,
                    Header = new ReportHeader { CommandLine = "signalinspect batch" },
                },
                Jobs = j,
                Reports = r.GetValue(reports),
                Survey = surveying ? survey.Read(r, new()) : null,
                Resume = r.GetValue(resume),
                ShardIndex = index,
                ShardCount = count,
                DescribeError = e => Cli.UserMessage(e) ?? e.Message,
            };
            int mine = found.Count(f => BatchRunner.ShardOf(f.Key, count) == index - 1);
            long bytes = found.Where(f => BatchRunner.ShardOf(f.Key, count) == index - 1).Sum(f => f.Bytes);
            stderr.WriteLine(
                string.Create(
                    CultureInfo.InvariantCulture,
                    $"batch: {found.Count} capture(s) found, {mine} in shard {index}/{count} ({bytes / 1e6:0.#} MB), "
                        + $"{j} job(s)"
                )
            );
            using var cts = new CancellationTokenSource();
            ConsoleCancelEventHandler onCancel = (_, e) =>
            {
                e.Cancel = true;
                cts.Cancel();
                stderr.WriteLine(
                    "batch: stopping after the captures in progress; the summary keeps what is done (use --resume to "
                        + "go on)"
                );
            };
            Console.CancelKeyPress += onCancel;
            var clock = Stopwatch.StartNew();
            int doneFiles = 0;
            long doneBytes = 0;
            BatchOutcome outcome;
            try
            {
                outcome = BatchRunner.Run(
                    found,
                    options,
                    (recs, input) =>
                    {
                        BatchRecord rec = recs[0];
                        doneFiles++;
                        doneBytes += input.Bytes;
                        double mbs = doneBytes / 1e6 / Math.Max(clock.Elapsed.TotalSeconds, 1e-3);
                        double left = mbs > 0 ? (bytes - doneBytes) / 1e6 / mbs : 0;
                        string what =
                            rec.Status == "error" ? "error: " + rec.Error
                            : rec.Emission is null && options.Survey is not null ? "no emission"
                            : options.Survey is not null
                                ? $"{recs.Count} emission(s): "
                                    + string.Join(", ", recs.Select(x => x.Modulation ?? "?"))
                            : $"{rec.Modulation}{(rec.Verdict is { } v ? " " + v : string.Empty)}";
                        stderr.WriteLine(
                            string.Create(
                                CultureInfo.InvariantCulture,
                                $"batch: [{doneFiles}/{mine}] {Path.GetFileName(rec.File)}: {what} ({mbs:0.#} MB/s, "
                                    + $"about {left:0} s left)"
                            )
                        );
                    },
                    cts.Token
                );
            }
            finally
            {
                Console.CancelKeyPress -= onCancel;
            }
            WriteCounts(stdout, outcome.Records);
            stdout.WriteLine(
                $"analysed {outcome.Analysed}, skipped {outcome.Skipped} (already in the summary)"
                    + (outcome.Cancelled ? ", stopped before the end" : string.Empty)
                    + $"; wrote {Path.Combine(options.OutDir, "summary.csv")}, summary.jsonl, summary.pdf"
            );
            return ExitCode(outcome.Records, outcome.Cancelled);
        });
        return cmd;
    }

    private static Command MergeCommand(TextWriter stdout, TextWriter stderr)
    {
        var dirs = new Argument<string[]>("dirs")
        {
            Description = "Output folders of batch shards.",
            Arity = ArgumentArity.OneOrMore,
        };
        var outDir = new Option<string>("--out")
        {
            Description = "Folder for the joined summary.",
            Required = true,
            HelpName = "DIR",
        };
        var cmd = new Command("merge", "Join the summaries of several batch output folders (e.g. shards) into one.")
        {
            dirs,
            outDir,
        };
        cmd.SetAction(r =>
        {
            IReadOnlyList<BatchRecord> all = BatchRunner.Merge(r.GetValue(dirs)!, r.GetValue(outDir)!);
            WriteCounts(stdout, all);
            stdout.WriteLine($"merged {all.Count} record(s) into {r.GetValue(outDir)}");
            return ExitCode(all);
        });
        return cmd;
    }

    internal static (int Index, int Count) ParseShard(string? text)
    {
        if (text is null)
            return (1, 1);
        string[] p = text.Split('/');
        if (
            p.Length == 2
            && int.TryParse(p[0], NumberStyles.None, CultureInfo.InvariantCulture, out int i)
            && int.TryParse(p[1], NumberStyles.None, CultureInfo.InvariantCulture, out int n)
            && n >= 1
            && i >= 1
            && i <= n
        )
            return (i, n);
        throw new UsageException($"--shard: '{text}' is not I/N with 1 <= I <= N (e.g. 2/8)");
    }

    /// <summary>A batch's exit code: <see cref="ExitCodes.Interrupted"/> when stopped before the end, else the worst
    /// of its records (an unreadable capture, a failed limit, a limit not shown).</summary>
    internal static int ExitCode(IReadOnlyList<BatchRecord> records, bool cancelled = false) =>
        cancelled ? ExitCodes.Interrupted
        : records.Any(r => r.Status == "error") ? ExitCodes.BadInput
        : records.Any(r => r.Verdict == "FAIL") ? ExitCodes.LimitFailed
        : records.Any(r => r.Verdict is "INCONCLUSIVE" or "NOT TESTED") ? ExitCodes.NotShown
        : ExitCodes.Success;

    private static void WriteCounts(TextWriter o, IReadOnlyList<BatchRecord> records)
    {
        bool survey = records.Any(r => r.Emission is not null);
        if (survey)
            o.WriteLine(
                $"emissions             {records.Count(r => r.Emission is not null)} in "
                    + $"{records.Select(r => (r.File, r.ContentSha256)).Distinct().Count()} capture(s)"
            );
        o.WriteLine(
            (survey ? "rows                  " : "captures              ")
                + $"{records.Count} ({records.Count(r => r.Status == "ok")} ok, "
                + (records.Count(r => r.Status == "warn") is > 0 and var warned ? $"{warned} with warnings, " : "")
                + $"{records.Count(r => r.Status == "error")} could not be read)"
        );
        o.WriteLine(
            "by modulation         "
                + string.Join(
                    ", ",
                    records
                        .Where(r => r.Status != "error")
                        .GroupBy(r => r.Modulation)
                        .OrderBy(g => g.Key, StringComparer.Ordinal)
                        .Select(g => $"{g.Key} {g.Count()}")
                )
        );
        if (records.Any(r => r.Verdict is not null))
            o.WriteLine(
                "by verdict            "
                    + string.Join(
                        ", ",
                        records
                            .Where(r => r.Verdict is not null)
                            .GroupBy(r => r.Verdict)
                            .OrderBy(g => g.Key, StringComparer.Ordinal)
                            .Select(g => $"{g.Key} {g.Count()}")
                    )
            );
        foreach (BatchRecord r in records.Where(r => r.Status == "error"))
            o.WriteLine($"error                 {r.File}: {r.Error}");
        foreach (BatchRecord r in records.Where(r => r.Verdict == "FAIL"))
            o.WriteLine($"FAIL                  {r.File}");
    }
}
