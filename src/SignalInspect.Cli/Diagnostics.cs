using SignalInspect.Diagnostics;

namespace SignalInspect.Cli;

/// <summary>Stage timings for profiling by hand: SI_PROFILE=1 writes "profile: ..." lines to standard error.</summary>
internal static class Diagnostics
{
    /// <summary>Name of the environment variable that turns the stage timings on.</summary>
    public const string Variable = "SI_PROFILE";

    /// <summary>A timer writing to <paramref name="stderr"/> when profiling is on, else null.</summary>
    public static StageTimer? TimerFor(TextWriter stderr) =>
        Environment.GetEnvironmentVariable(Variable) == "1"
            ? new StageTimer(l => stderr.WriteLine($"profile: {l}"))
            : null;
}
