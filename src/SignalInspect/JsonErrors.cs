using System.Text.Json;

namespace SignalInspect;

/// <summary>Where a JSON document the user gave (SigMF metadata, a limit profile) stops being valid.</summary>
internal static class JsonErrors
{
    /// <summary>" at line L, column C" (1-based), or nothing when the reader did not say.</summary>
    public static string Where(JsonException e) =>
        e.LineNumber is { } l ? $" at line {l + 1}, column {(e.BytePositionInLine ?? 0) + 1}" : string.Empty;
}
