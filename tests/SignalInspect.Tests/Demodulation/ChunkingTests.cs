using System.Text;
using SignalInspect.Capture;
using SignalInspect.Demodulation;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Demodulation;

/// <summary>
/// The demodulation pass cuts long captures into chunks that the threads share. Properties of the
/// implementation, not of the measurement: the results do not depend on the thread count (the
/// chunks' sums are combined in chunk order), and running a capture as several chunks reads what
/// one run reads, to the small differences of the line-spectrum segments that straddle chunk edges.
/// The PM case checks that the unwrapped phase is carried across chunks.
/// </summary>
public class ChunkingTests
{
    private static AnalysisResult Run(string path, int? chunk, int threads, ModulationKind? expect = null)
    {
        ChunkSchedule.ChunkOutputsForTests = chunk;
        try
        {
            CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 2.4e6 });
            return Analyzer.Analyze(src, new AnalysisOptions { Threads = threads, Expect = expect });
        }
        finally
        {
            ChunkSchedule.ChunkOutputsForTests = null;
        }
    }

    private static string Capture(TempDir tmp, SignalSpec spec)
    {
        string path = tmp.File("c.cf32");
        Synthesizer.Write(spec, path, SampleFormat.Parse("cf32_le"));
        return path;
    }

    [Theory]
    [InlineData(4_800_000L, 1200, 1 << 18)] // 10 s at 480 kS/s: a sixteenth is 300 000, the power of two at or below it
    [InlineData(28_800_000L, 1200, 1 << 20)] // 60 s: capped
    [InlineData(100_000L, 1200, 1 << 16)] // short: the floor
    [InlineData(4_800_000L, 60_000, 1 << 19)] // a long high-pass settling: eight warm-ups
    public void Chunk_length_follows_the_stream_not_the_threads(long expected, int warmUp, int want)
    {
        int len = ChunkSchedule.ChunkLength(expected, warmUp);
        Assert.Equal(want, len);
        Assert.True(len >= ChunkSchedule.MinChunk && len <= ChunkSchedule.MaxChunk);
    }

    [Theory]
    // 60 s at 480 kS/s: 25 whole chunks, the last 2.47 lengths in 10 quarters
    [InlineData(28_800_000L, 1 << 20, 1200, 35, 1 << 18)]
    [InlineData(4_800_000L, 1 << 18, 1200, 26, 1 << 16)] // 10 s: 16 whole, 2.31 lengths in 10 quarters
    // A quarter would fall below the floor: whole lengths throughout
    [InlineData(4_800_000L, 1 << 16, 1200, 74, 1 << 16)]
    // Pieces of eight warm-ups (above a quarter): 7 whole, 5 pieces
    [InlineData(4_800_000L, 1 << 19, 30_000, 12, 240_000)]
    [InlineData(150_000L, 1 << 17, 1200, 1, 150_000)] // at most 1.5 lengths: one chunk
    public void Chunks_cover_the_stream_with_quarters_at_its_end(
        long expected,
        int length,
        int warmUp,
        int chunks,
        int tailPiece
    )
    {
        // Internal consistency of the layout: contiguous from 0 to the end, whole lengths first,
        // then pieces no longer than the tail's (a quarter, at least MinChunk and eight warm-ups)
        // over the last two to three lengths, so that two threads end within a piece of each other.
        long[] b = ChunkSchedule.ChunkBounds(expected, length, warmUp);
        Assert.Equal(chunks, b.Length - 1);
        Assert.Equal(0, b[0]);
        Assert.Equal(expected, b[^1]);
        int c = 0;
        for (; c < b.Length - 1 && b[c + 1] - b[c] == length && expected - b[c + 1] >= 2L * length; c++)
        { }
        long tail = expected - b[c];
        if (chunks > 1)
            Assert.InRange(tail, 2L * length, 3L * length - 1);
        for (; c < b.Length - 1; c++)
        {
            Assert.InRange(b[c + 1] - b[c], 1, tailPiece);
            if (c < b.Length - 2)
                Assert.Equal(tailPiece, b[c + 1] - b[c]);
        }
    }

    [Fact]
    public void FM_through_several_chunks_is_the_same_on_one_thread_and_two_and_close_to_one_run()
    {
        using var tmp = new TempDir();
        string path = Capture(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 2.4e6,
                DurationS = 1.5,
                PeakDeviationHz = 75e3,
                ModulatingFrequencyHz = 1e3,
                CarrierOffsetHz = 12.5e3,
                SnrDb = 40,
            }
        );
        AnalysisResult one = Run(path, 1 << 17, 1),
            two = Run(path, 1 << 17, 2),
            whole = Run(path, null, 2);
        Assert.Equal(
            Encoding.UTF8.GetString(AnalysisJson.ToBytes(one)),
            Encoding.UTF8.GetString(AnalysisJson.ToBytes(two))
        );
        Near.Equal(
            whole.Fm!.PeakDeviationHz.Value,
            one.Fm!.PeakDeviationHz.Value,
            5e-4 * whole.Fm.PeakDeviationHz.Value,
            "peak deviation, chunked vs one run"
        );
        Near.Equal(whole.Fm.RmsDeviationHz, one.Fm.RmsDeviationHz, 1e-6 * whole.Fm.RmsDeviationHz, "rms deviation");
        Near.Equal(
            whole.Carrier!.FrequencyHz.Value,
            one.Carrier!.FrequencyHz.Value,
            1e-6,
            "carrier (the phase carried across chunks)"
        );
        Near.Equal(
            whole.ModulatingFrequencyHz!.Value.Value,
            one.ModulatingFrequencyHz!.Value.Value,
            0.05,
            "modulating frequency"
        );
    }

    [Fact]
    public void PM_phase_histogram_is_continuous_across_chunks()
    {
        using var tmp = new TempDir();
        string path = Capture(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Pm,
                SampleRateHz = 2.4e6,
                DurationS = 1.0,
                PeakPhaseRad = 1.0,
                ModulatingFrequencyHz = 1e3,
                CarrierOffsetHz = -20e3,
                SnrDb = 50,
            }
        );
        AnalysisResult chunked = Run(path, 1 << 17, 2, ModulationKind.Pm),
            whole = Run(path, null, 2, ModulationKind.Pm);
        // A phase not carried across a chunk edge would shift that chunk's phase by up to pi and smear the histogram.
        Near.Equal(
            whole.Pm!.PeakDeviationRad.Value,
            chunked.Pm!.PeakDeviationRad.Value,
            2e-3,
            "peak phase deviation, chunked vs one run"
        );
        Near.Equal(1.0, chunked.Pm.PeakDeviationRad.Value, 0.01, "peak phase deviation against the synthesised 1 rad");
    }
}
