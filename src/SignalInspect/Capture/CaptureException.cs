namespace SignalInspect.Capture;

/// <summary>
/// A problem with a capture the user gave: a malformed or unsupported file, missing or
/// contradictory metadata. Its message is one line, fit to show as it is;
/// it is never a bug in SignalInspect (those are any other exception type).
/// </summary>
public sealed class CaptureException : UserInputException
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public CaptureException(string message)
        : base(message) { }

    /// <summary>Creates the exception with a one-line message and the low-level cause.</summary>
    public CaptureException(string message, Exception inner)
        : base(message, inner) { }

    /// <summary>The reader setting that reads the file anyway (e.g. <c>VerifyChecksum</c>), or null.</summary>
    public string? OverriddenBy { get; init; }

    /// <summary>A message of the form "FILE: problem".</summary>
    public static CaptureException ForFile(string path, string problem) => new($"{Path.GetFileName(path)}: {problem}");
}
