namespace SignalInspect.Compliance;

/// <summary>A limit profile that is missing or malformed; the message names the file and the key.</summary>
public sealed class ProfileException : UserInputException
{
    /// <summary>Creates the exception with a one-line message.</summary>
    public ProfileException(string message)
        : base(message) { }

    /// <summary>A message of the form "FILE: problem".</summary>
    public static ProfileException ForFile(string path, string problem) => new($"{Path.GetFileName(path)}: {problem}");
}
