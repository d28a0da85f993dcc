using SignalInspect.Capture;

namespace SignalInspect.Tests.Capture;

public class SampleFormatTests
{
    // SigMF v1.2 specification, core:datatype grammar [R]:
    // (r|c)(f32|f64|i32|i16|u32|u16)_(le|be) or (r|c)(i8|u8).
    [Theory]
    [InlineData("cf32_le", true, 4, false)]
    [InlineData("cf32_be", true, 4, true)]
    [InlineData("cf64_le", true, 8, false)]
    [InlineData("ci32_le", true, 4, false)]
    [InlineData("ci16_be", true, 2, true)]
    [InlineData("cu32_le", true, 4, false)]
    [InlineData("cu16_be", true, 2, true)]
    [InlineData("ci8", true, 1, false)]
    [InlineData("cu8", true, 1, false)]
    [InlineData("rf32_le", false, 4, false)]
    [InlineData("ri16_le", false, 2, false)]
    [InlineData("ru8", false, 1, false)]
    [InlineData("ri8", false, 1, false)]
    [InlineData("rf64_be", false, 8, true)]
    public void Parses_the_SigMF_datatype_words(string word, bool complex, int bytes, bool big)
    {
        SampleFormat f = SampleFormat.Parse(word);
        Assert.Equal(complex, f.IsComplex);
        Assert.Equal(bytes, f.BytesPerComponent);
        Assert.Equal(big, f.BigEndian);
        Assert.Equal(word, f.Name);
        Assert.Equal(bytes * (complex ? 2 : 1), f.BytesPerSample);
    }

    // Words outside the same grammar: no byte order on a multi-byte type, a byte order on an
    // 8-bit type, an unknown width, wrong case, unknown letters.
    [Theory]
    [InlineData("cf32")]
    [InlineData("ci8_le")]
    [InlineData("cu8_be")]
    [InlineData("cf16_le")]
    [InlineData("ci24_le")]
    [InlineData("CF32_LE")]
    [InlineData("xf32_le")]
    [InlineData("cf32_me")]
    [InlineData("")]
    [InlineData("c")]
    public void Refuses_words_outside_the_grammar(string word)
    {
        Assert.False(SampleFormat.TryParse(word, out _, out string error));
        Assert.Contains("unknown datatype", error);
        Assert.Throws<CaptureException>(() => SampleFormat.Parse(word));
    }

    [Fact]
    public void Cu8_is_offset_binary_around_127_5()
    {
        // Issue 2: "cu8 is offset binary around 127.5" (the usual receiver dongle convention, common practice).
        SampleFormat f = SampleFormat.Parse("cu8");
        Assert.Equal(127.5, f.UnsignedOffset);
        Assert.Equal(127.5, f.CodeFullScale);
    }

    [Theory]
    [InlineData("x.cu8", "cu8")]
    [InlineData("x.cs8", "ci8")]
    [InlineData("x.cs16", "ci16_le")]
    [InlineData("x.cf32", "cf32_le")]
    [InlineData("x.cfile", "cf32_le")]
    [InlineData("x.ci16_be", "ci16_be")]
    public void File_endings_suggest_a_datatype(string file, string word)
    {
        Assert.Equal(word, CaptureFormats.DatatypeOfEnding(file));
    }

    [Fact]
    public void Unknown_endings_suggest_nothing()
    {
        Assert.Null(CaptureFormats.DatatypeOfEnding("capture.bin"));
        Assert.Null(CaptureFormats.DatatypeOfEnding("capture"));
    }
}
