using System.Diagnostics;
using System.Globalization;

namespace SignalInspect.Diagnostics;

/// <summary>
/// Stage timings for profiling by hand, written to a sink the caller injects (the command line
/// passes one that writes "profile: ..." lines to standard error when SI_PROFILE=1). Without a
/// sink (<see cref="Off"/>) nothing is measured or written.
/// </summary>
public sealed class StageTimer
{
    private readonly Action<string>? _sink;
    private readonly Stopwatch _clock = Stopwatch.StartNew();
    private readonly Stopwatch _started = Stopwatch.StartNew();

    /// <summary>A timer that writes nothing.</summary>
    public static StageTimer Off { get; } = new(null);

    /// <summary>Creates a timer writing one line per stage or note to <paramref name="sink"/> (null: off).</summary>
    public StageTimer(Action<string>? sink) => _sink = sink;

    /// <summary>True when lines are written.</summary>
    public bool On => _sink is not null;

    /// <summary>Seconds since the timer was made.</summary>
    public double ElapsedS => _started.Elapsed.TotalSeconds;

    /// <summary>Writes a line.</summary>
    public void Note(string text) => _sink?.Invoke(text);

    /// <summary>Writes the time since the last stage with the memory figures, and restarts the stage clock.</summary>
    public void Stage(string name)
    {
        if (_sink is null)
            return;
        _sink(
            string.Create(CultureInfo.InvariantCulture, $"{name,-20} {_clock.Elapsed.TotalSeconds,8:0.000} s   ")
                + Memory()
        );
        _clock.Restart();
    }

    /// <summary>
    /// Bytes allocated so far, the working set and the garbage collections (gen 0/1/2, total pause).
    /// </summary>
    public static string Memory() =>
        string.Create(
            CultureInfo.InvariantCulture,
            $"allocated {GC.GetTotalAllocatedBytes() / 1e6,6:0.0} MB, working set "
                + $"{Environment.WorkingSet / 1e6,6:0.0} MB"
        )
        + string.Create(
            CultureInfo.InvariantCulture,
            $", collections {GC.CollectionCount(0)}/{GC.CollectionCount(1)}/{GC.CollectionCount(2)}, paused "
                + $"{GC.GetTotalPauseDuration().TotalMilliseconds:0.0} ms"
        );
}
