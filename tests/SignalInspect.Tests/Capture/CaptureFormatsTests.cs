using SignalInspect.Batch;
using SignalInspect.Capture;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Capture;

/// <summary>
/// The one registry of capture names: every ending a reader takes is found by batch's folder
/// search, and every file batch finds opens the way analyze opens it. Datatype words are the SigMF
/// specification's (core:datatype grammar: c|r, f32|f64|i8|i16|i32|u8|u16|u32, _le|_be).
/// </summary>
public class CaptureFormatsTests
{
    /// <summary>Every full SigMF datatype word (SigMF v1.2, core:datatype).</summary>
    public static TheoryData<string> DatatypeWords() => [.. Words()];

    private static IEnumerable<string> Words()
    {
        var words = new List<string>();
        foreach (string kind in new[] { "c", "r" })
        {
            foreach (string one in new[] { "i8", "u8" })
                words.Add(kind + one);
            foreach (string wide in new[] { "f32", "f64", "i16", "i32", "u16", "u32" })
                foreach (string endian in new[] { "_le", "_be" })
                    words.Add(kind + wide + endian);
        }
        return words;
    }

    /// <summary>Every ending of the registry: the short raw ones, each full datatype word, WAV and SigMF.</summary>
    public static TheoryData<string> Endings()
    {
        var endings = new SortedSet<string>(StringComparer.Ordinal);
        endings.UnionWith(CaptureFormats.RawEndings.Keys);
        endings.UnionWith(Words().Select(w => "." + w));
        endings.UnionWith(CaptureFormats.WavEndings);
        endings.Add(CaptureFormats.SigMfMetaEnding);
        endings.Add(CaptureFormats.SigMfArchiveEnding);
        return [.. endings];
    }

    [Theory]
    [MemberData(nameof(Endings))]
    public void Batch_finds_and_reads_every_ending_that_analyze_reads(string ending)
    {
        using var tmp = new TempDir();
        string dir = Path.Combine(tmp.Path, "in");
        Directory.CreateDirectory(dir);
        string file = Path.Combine(dir, "capture" + ending);
        string datatype =
            CaptureFormats.KindOf(file) == CaptureFileKind.Raw ? CaptureFormats.DatatypeOfEnding(file)! : "ci16_le";
        bool complex = datatype.StartsWith('c');
        var spec = new SignalSpec
        {
            Kind = SignalKind.Cw,
            SampleRateHz = 8000,
            DurationS = 0.05,
            CarrierOffsetHz = 1000,
            Amplitude = 0.5,
            IsComplex = complex,
            CenterFrequencyHz = 100e6,
        };
        var container = ending == ".bw64" ? CaptureContainer.Wav : (CaptureContainer?)null;
        Synthesizer.Write(spec, file, SampleFormat.Parse(datatype), container: container);
        var defaults = new ReaderOptions { SampleRateHz = 8000 };

        IReadOnlyList<BatchInput> found = BatchRunner.Discover([dir], defaults);

        BatchInput input = Assert.Single(found);
        Assert.Equal(Path.GetFullPath(file), Path.GetFullPath(input.Path));
        // analyze's own way in: the same file, the same options, read to the end.
        CaptureSource source = CaptureSource.Open(input.Path, input.Options);
        Assert.Equal(400, source.Info.SampleCount);
        Assert.Equal(complex, source.Info.IsComplex);
    }

    [Theory]
    [MemberData(nameof(DatatypeWords))]
    public void A_full_datatype_word_as_the_ending_is_that_datatype(string word) =>
        Assert.Equal(word, CaptureFormats.DatatypeOfEnding("rec." + word));

    [Theory]
    [InlineData("notes.txt")]
    [InlineData("capture.bin")]
    [InlineData("capture.cu8.si.json")]
    [InlineData("README")]
    public void Names_that_are_not_captures_are_left_alone(string name) =>
        Assert.False(CaptureFormats.IsCaptureName(Path.Combine(Path.GetTempPath(), "si-none", name)));

    [Fact]
    public void A_raw_file_with_a_sidecar_is_a_capture_and_the_sidecar_is_not()
    {
        using var tmp = new TempDir();
        string file = tmp.File("rec.bin");
        File.WriteAllBytes(file, new byte[64]);
        File.WriteAllText(file + CaptureFormats.SidecarSuffix, "{\"datatype\": \"cu8\", \"sampleRateHz\": 1000}");
        Assert.True(CaptureFormats.IsCaptureName(file));
        Assert.False(CaptureFormats.IsCaptureName(file + CaptureFormats.SidecarSuffix));
        ReaderOptions o = CaptureFormats.WithSidecar(file, ReaderOptions.Default);
        Assert.Equal("cu8", o.Datatype);
        Assert.Equal(1000, o.SampleRateHz);
    }
}
