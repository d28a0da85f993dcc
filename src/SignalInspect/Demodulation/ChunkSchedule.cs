namespace SignalInspect.Demodulation;

/// <summary>
/// How the demodulation pass cuts the decimated stream into chunks that the worker threads take in
/// turn. Chunk lengths and bounds depend on the stream only, never on the thread count, so that the
/// results do not either.
/// </summary>
internal static class ChunkSchedule
{
    /// <summary>Decimated samples per chunk, at most and at least (see <see cref="ChunkLength"/>).</summary>
    internal const int MaxChunk = 1 << 20,
        MinChunk = 1 << 16;

    /// <summary>
    /// Decimated samples per chunk for a stream of <paramref name="expected"/> samples whose chunks
    /// each run <paramref name="warmUp"/> samples before their own: the power of two at or below a
    /// sixteenth of the stream (so that two threads finish together: with five chunks one thread
    /// would do three), from <see cref="MinChunk"/> to <see cref="MaxChunk"/>, and at least eight warm-ups long.
    /// It depends on the stream only, never on the thread count.
    /// </summary>
    internal static int ChunkLength(long expected, int warmUp)
    {
        int len = MinChunk;
        while (len < MaxChunk && (2L * len <= expected / 16 || len < 8L * warmUp))
            len *= 2;
        return len;
    }

    /// <summary>
    /// Where the chunks start, and the stream's end: <paramref name="length"/> samples per chunk
    /// (<see cref="ChunkLength"/>), except over the last two to three chunk lengths, which are cut
    /// into quarters (at least <see cref="MinChunk"/> and eight warm-ups long) so that the threads
    /// finish close together: at the end one thread waits for at most a quarter chunk, not a whole
    /// one (a 60 s capture's chunks take about 80 ms each on one thread). A stream of at most 1.5
    /// lengths is one chunk. Like the length, it depends on the stream only, never on the thread count.
    /// </summary>
    internal static long[] ChunkBounds(long expected, int length, int warmUp)
    {
        if (expected <= length * 3L / 2)
            return [0, expected];
        int quarter = Math.Max(Math.Max(length / 4, MinChunk), 8 * warmUp);
        if (quarter >= length)
            quarter = length;
        long tailStart = Math.Max(0, (expected - 2L * length) / length * length);
        var bounds = new List<long>();
        for (long at = 0; at < tailStart; at += length)
            bounds.Add(at);
        for (long at = tailStart; at < expected; at += quarter)
            bounds.Add(at);
        bounds.Add(expected);
        return [.. bounds];
    }

    /// <summary>Tests only: a smaller chunk, so that short captures run through several chunks (for the calling flow
    /// only, not for tests running beside it).</summary>
    internal static int? ChunkOutputsForTests
    {
        get => ChunkOverride.Value;
        set => ChunkOverride.Value = value;
    }

    private static readonly AsyncLocal<int?> ChunkOverride = new();
}
