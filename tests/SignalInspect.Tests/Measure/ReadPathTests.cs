using System.Runtime.InteropServices;
using System.Text.Json.Nodes;
using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Reporting;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// float32 captures are read as stored: the Welch transforms run in float (the samples' own
/// precision), the channel filter widens them; other formats are decoded to double first. A
/// property of the implementation, not of the measurement: the same samples stored as cf32 and
/// as cf64 (each float widened, which is exact) must give the same results to the rounding of
/// float arithmetic (every number within 1e-6 of its value; seen: 1e-13 to 1e-10), and a cf32
/// capture the same results bit for bit whether it was taken through a memory map or read with
/// copies.
/// </summary>
public class ReadPathTests
{
    [Theory]
    [InlineData(SignalKind.Fm)]
    [InlineData(SignalKind.Am)]
    public void A_cf32_capture_reads_as_its_exact_cf64_copy(SignalKind kind)
    {
        using var tmp = new TempDir();
        string f32 = tmp.File("c.cf32"),
            f64 = tmp.File("c.cf64");
        Synthesizer.Write(
            new SignalSpec
            {
                Kind = kind,
                SampleRateHz = 2.4e6,
                DurationS = 0.3,
                PeakDeviationHz = 50e3,
                AmDepth = 0.6,
                ModulatingFrequencyHz = 1e3,
                CarrierOffsetHz = 12.5e3,
                SnrDb = 35,
            },
            f32,
            SampleFormat.Parse("cf32_le")
        );
        float[] values = MemoryMarshal.Cast<byte, float>(File.ReadAllBytes(f32)).ToArray();
        values[1001] = 1.0f; // one full-scale component, counted on both paths
        File.WriteAllBytes(f32, MemoryMarshal.AsBytes(values.AsSpan()).ToArray());
        File.WriteAllBytes(f64, MemoryMarshal.AsBytes(values.Select(v => (double)v).ToArray().AsSpan()).ToArray());

        AnalysisResult Run(string path, string type)
        {
            CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 2.4e6, Datatype = type });
            return Analyzer.Analyze(src, new AnalysisOptions());
        }
        // Everything but the description of the file itself.
        string Measurements(AnalysisResult r)
        {
            JsonObject o = JsonNode.Parse(AnalysisJson.ToBytes(r))!.AsObject();
            o.Remove("capture");
            o.Remove("notes"); // how the file was read (a sidecar beside one of them), not what was measured
            return o.ToJsonString();
        }
        AnalysisResult a = Run(f32, "cf32_le"),
            b = Run(f64, "cf64_le");
        Assert.Equal(kind == SignalKind.Fm ? ModulationKind.Fm : ModulationKind.Am, a.Classification.Kind);
        double worst = JsonAlike.Compare(JsonNode.Parse(Measurements(b)), JsonNode.Parse(Measurements(a)), "$");
        // With AVX2 the Welch step runs in float, whose rounding shows in the last digits; without it
        // both captures take the double transform and must agree bit for bit.
        if (Hardware.HasAvx2)
            Assert.True(worst > 0, "the float transform rounds: some number should differ in its last digits");
        else
            Assert.Equal(0, worst);
        // Read with copies instead of through the memory map, and mapped in windows that the
        // passes' blocks and segments cross: the same results, and the same file hash.
        AnalysisResult With(bool map, int? window)
        {
            MappedExtent.EnabledForTests.Value = map;
            MappedExtent.WindowBytesForTests.Value = window;
            try
            {
                return Run(f32, "cf32_le");
            }
            finally
            {
                MappedExtent.EnabledForTests.Value = null;
                MappedExtent.WindowBytesForTests.Value = null;
            }
        }
        static string Json(AnalysisResult r) => System.Text.Encoding.UTF8.GetString(AnalysisJson.ToBytes(r));
        Assert.Equal(Json(a), Json(With(false, null)));
        Assert.Equal(Json(a), Json(With(true, (1 << 20) + 12)));
    }

    /// <summary>
    /// Asserts two JSON trees alike: the same shape and strings, every number within 1e-6 of its
    /// value (1e-12 absolute near zero). Returns the largest relative difference seen.
    /// </summary>
}
