namespace SignalInspect;

/// <summary>An output that cannot be written as asked (it exists, its folder is missing, it is a folder).</summary>
public sealed class OutputException : UserInputException
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public OutputException(string message)
        : base(message) { }

    /// <summary>True when the output exists and replacing it was not asked for.</summary>
    public bool AlreadyExists { get; init; }

    /// <summary>The output exists and replacing it was not asked for.</summary>
    public static OutputException Exists(string path) =>
        new($"{Path.GetFileName(path)}: already exists") { AlreadyExists = true };

    /// <summary>A message of the form "FILE: problem".</summary>
    public static OutputException ForFile(string path, string problem) => new($"{Path.GetFileName(path)}: {problem}");
}
