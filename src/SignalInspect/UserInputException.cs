namespace SignalInspect;

/// <summary>
/// A problem with something the user gave (a file, a setting, a profile, an output path), never a
/// bug in SignalInspect: its message is one line, fit to show as it is. The command line maps every
/// kind to exit code 2; any other exception type is a bug.
/// </summary>
public abstract class UserInputException : Exception
{
    /// <summary>Creates the exception with a one-line message.</summary>
    protected UserInputException(string message)
        : base(message) { }

    /// <summary>Creates the exception with a one-line message and the low-level cause.</summary>
    protected UserInputException(string message, Exception inner)
        : base(message, inner) { }
}

/// <summary>
/// A setting out of its range. <see cref="Setting"/> is the name of the settings property (e.g.
/// <c>ObwPercent</c> of <c>AnalysisOptions</c>), not a command-line spelling: the command line
/// names its own option for it. The message is the problem alone ("must lie between 0 and 100").
/// </summary>
public sealed class SettingException : UserInputException
{
    /// <summary>Creates the exception.</summary>
    /// <param name="setting">Name of the settings property.</param>
    /// <param name="value">The value given.</param>
    /// <param name="problem">What is wrong with it, one line.</param>
    /// <param name="file">The file the setting was applied to, when it matters.</param>
    public SettingException(string setting, object? value, string problem, string? file = null)
        : base(problem)
    {
        Setting = setting;
        Value = value;
        File = file;
    }

    /// <summary>Name of the settings property.</summary>
    public string Setting { get; }

    /// <summary>The value given.</summary>
    public object? Value { get; }

    /// <summary>The file the setting was applied to, or null.</summary>
    public string? File { get; }
}
