namespace SignalInspect.Cli;

/// <summary>The process exit codes, the one place they are defined (README "Exit codes").</summary>
public static class ExitCodes
{
    /// <summary>The command did what was asked.</summary>
    public const int Success = 0;

    /// <summary>A measurement failed a limit of the profile.</summary>
    public const int LimitFailed = 1;

    /// <summary>Bad input or usage: a malformed file, a missing option, an unknown word.</summary>
    public const int BadInput = 2;

    /// <summary>An internal error (a bug in SignalInspect): please report it.</summary>
    public const int InternalError = 3;

    /// <summary>Nothing failed, but compliance was not shown: a limit was INCONCLUSIVE or NOT TESTED.</summary>
    public const int NotShown = 4;

    /// <summary>Stopped by Ctrl-C (SIGINT) before the end, the summary of what finished written: 128 + 2, as
    /// shells report a process ended by SIGINT (common practice).</summary>
    public const int Interrupted = 130;

    /// <summary>The exit code of a judged capture: <see cref="LimitFailed"/> when a limit failed, <see
    /// cref="NotShown"/>
    /// when none failed but one was INCONCLUSIVE or NOT TESTED, else <see cref="Success"/> (PASS, or no
    /// profile).</summary>
    public static int ForVerdict(Compliance.Verdict? overall) =>
        overall switch
        {
            Compliance.Verdict.Fail => LimitFailed,
            Compliance.Verdict.Inconclusive or Compliance.Verdict.NotTested => NotShown,
            _ => Success,
        };
}
