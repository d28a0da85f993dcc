using SignalInspect.Capture;
using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

internal static class Measuring
{
    /// <summary>Synthesises a capture into a temporary folder and analyses it.</summary>
    public static AnalysisResult Analyze(
        TempDir tmp,
        SignalSpec spec,
        AnalysisOptions? options = null,
        string datatype = "cf32_le"
    )
    {
        string path = tmp.File($"m{Guid.NewGuid():N}" + (spec.IsComplex ? ".sigmf" : ".wav"));
        Synthesizer.Write(spec, path, SampleFormat.Parse(spec.IsComplex ? datatype : "rf32_le"));
        return Analyzer.Analyze(CaptureSource.Open(path), options);
    }
}
