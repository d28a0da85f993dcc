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

    /// <summary>The exit code of a judged capture: <see cref="LimitFailed"/> when a limit failed, else
    /// <see cref="Success"/> (no profile, PASS or INCONCLUSIVE).</summary>
    public static int ForVerdict(Compliance.Verdict? overall) =>
        overall == Compliance.Verdict.Fail ? LimitFailed : Success;
}
