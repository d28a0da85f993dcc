using System.Text;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

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
        DemodulationPass.ChunkOutputsForTests = chunk;
        try
        {
            CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 2.4e6 });
            return Analyzer.Analyze(src, new AnalysisOptions { Threads = threads, Expect = expect });
        }
        finally { DemodulationPass.ChunkOutputsForTests = null; }
    }

    private static string Capture(TempDir tmp, SignalSpec spec)
    {
        string path = tmp.File("c.cf32");
        Synthesizer.Write(spec, path, SampleFormat.Parse("cf32_le"));
        return path;
    }

    [Theory]
    [InlineData(4_800_000L, 1200, 1 << 18)]    // 10 s at 480 kS/s: a sixteenth is 300 000, the power of two at or below it
    [InlineData(28_800_000L, 1200, 1 << 20)]   // 60 s: capped
    [InlineData(100_000L, 1200, 1 << 16)]      // short: the floor
    [InlineData(4_800_000L, 60_000, 1 << 19)]  // a long high-pass settling: eight warm-ups
    public void Chunk_length_follows_the_stream_not_the_threads(long expected, int warmUp, int want)
    {
        int len = DemodulationPass.ChunkLength(expected, warmUp);
        Assert.Equal(want, len);
        Assert.True(len >= DemodulationPass.MinChunk && len <= DemodulationPass.MaxChunk);
    }

    [Fact]
    public void FM_through_five_chunks_is_the_same_on_one_thread_and_two_and_close_to_one_run()
    {
        using var tmp = new TempDir();
        string path = Capture(tmp, new SignalSpec { Kind = SignalKind.Fm, SampleRateHz = 2.4e6, DurationS = 1.5, PeakDeviationHz = 75e3, ModulatingFrequencyHz = 1e3, CarrierOffsetHz = 12.5e3, SnrDb = 40 });
        AnalysisResult one = Run(path, 1 << 17, 1), two = Run(path, 1 << 17, 2), whole = Run(path, null, 2);
        Assert.Equal(Encoding.UTF8.GetString(AnalysisJson.ToBytes(one)), Encoding.UTF8.GetString(AnalysisJson.ToBytes(two)));
        Near.Equal(whole.Fm!.PeakDeviationHz.Value, one.Fm!.PeakDeviationHz.Value, 5e-4 * whole.Fm.PeakDeviationHz.Value, "peak deviation, chunked vs one run");
        Near.Equal(whole.Fm.RmsDeviationHz, one.Fm.RmsDeviationHz, 1e-6 * whole.Fm.RmsDeviationHz, "rms deviation");
        Near.Equal(whole.Carrier!.FrequencyHz.Value, one.Carrier!.FrequencyHz.Value, 1e-6, "carrier (the phase carried across chunks)");
        Near.Equal(whole.ModulatingFrequencyHz!.Value.Value, one.ModulatingFrequencyHz!.Value.Value, 0.05, "modulating frequency");
    }

    [Fact]
    public void PM_phase_histogram_is_continuous_across_chunks()
    {
        using var tmp = new TempDir();
        string path = Capture(tmp, new SignalSpec { Kind = SignalKind.Pm, SampleRateHz = 2.4e6, DurationS = 1.0, PeakPhaseRad = 1.0, ModulatingFrequencyHz = 1e3, CarrierOffsetHz = -20e3, SnrDb = 50 });
        AnalysisResult chunked = Run(path, 1 << 17, 2, ModulationKind.Pm), whole = Run(path, null, 2, ModulationKind.Pm);
        // A phase not carried across a chunk edge would shift that chunk's phase by up to pi and smear the histogram.
        Near.Equal(whole.Pm!.PeakDeviationRad.Value, chunked.Pm!.PeakDeviationRad.Value, 2e-3, "peak phase deviation, chunked vs one run");
        Near.Equal(1.0, chunked.Pm.PeakDeviationRad.Value, 0.01, "peak phase deviation against the synthesised 1 rad");
    }
}
