using System.Diagnostics;

namespace SignalInspect.Measure;

/// <summary>
/// Stage timings for profiling by hand: with the environment variable SI_PROFILE=1 each stage's
/// wall time goes to standard error. Off by default; costs nothing then.
/// </summary>
internal static class Profile
{
    private static readonly bool On = Environment.GetEnvironmentVariable("SI_PROFILE") == "1";

    /// <summary>Writes a line (built only when profiling is on, if the caller passes a lambda-free
    /// interpolation).</summary>
    public static void Note(string text)
    {
        if (On)
            Console.Error.WriteLine($"profile: {text}");
    }

    /// <summary>Bytes allocated so far, the working set and the garbage collections (gen 0/1/2, total pause), for the
    /// profile lines.</summary>
    public static string Memory() =>
        $"allocated {GC.GetTotalAllocatedBytes() / 1e6,6:0.0} MB, working set {Environment.WorkingSet / 1e6,6:0.0} MB, collections {GC.CollectionCount(0)}/{GC.CollectionCount(1)}/{GC.CollectionCount(2)}, paused {GC.GetTotalPauseDuration().TotalMilliseconds:0.0} ms";

    /// <summary>Writes the time since the last stage and restarts the clock.</summary>
    public static void Stage(string name, Stopwatch clock)
    {
        if (!On)
            return;
        Console.Error.WriteLine($"profile: {name,-20} {clock.Elapsed.TotalSeconds,8:0.000} s   {Memory()}");
        clock.Restart();
    }
}
