namespace SignalInspect.Cli;

/// <summary>A bad command line detected after parsing (conflicting options, a refused overwrite...).</summary>
internal sealed class UsageException(string message) : Exception(message);
