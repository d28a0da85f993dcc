using System.Diagnostics;
using System.Globalization;
using Spectre.Console;

namespace SignalInspect.Cli;

/// <summary>
/// Progress of a long pass: a bar on an interactive terminal (stderr not redirected), plain lines
/// every few seconds when output is piped or captured (so logs stay readable).
/// </summary>
internal static class CliProgress
{
    private static readonly TimeSpan PlainInterval = TimeSpan.FromSeconds(5);

    public static T Run<T>(TextWriter stderr, string label, long total, Func<Action<long>, T> work)
    {
        bool terminal =
            ReferenceEquals(stderr, Console.Error)
            && !Console.IsErrorRedirected
            && AnsiConsole.Profile.Capabilities.Interactive;
        if (terminal)
        {
            T result = default!;
            var console = AnsiConsole.Create(new AnsiConsoleSettings { Out = new AnsiConsoleOutput(Console.Error) });
            console
                .Progress()
                .AutoClear(true)
                .Columns(
                    new TaskDescriptionColumn(),
                    new ProgressBarColumn(),
                    new PercentageColumn(),
                    new RemainingTimeColumn()
                )
                .Start(ctx =>
                {
                    ProgressTask task = ctx.AddTask(label, maxValue: Math.Max(total, 1));
                    result = work(done => task.Value = done);
                    task.Value = task.MaxValue;
                });
            return result;
        }
        var clock = Stopwatch.StartNew();
        TimeSpan next = PlainInterval;
        object gate = new();
        return work(done =>
        {
            if (clock.Elapsed < next)
                return;
            lock (gate)
            {
                if (clock.Elapsed < next)
                    return;
                next = clock.Elapsed + PlainInterval;
                double pct = total > 0 ? 100.0 * done / total : 0;
                stderr.WriteLine(
                    string.Create(CultureInfo.InvariantCulture, $"{label}: {pct:0}% ({clock.Elapsed.TotalSeconds:0} s)")
                );
            }
        });
    }
}
