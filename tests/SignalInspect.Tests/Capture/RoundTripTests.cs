using SignalInspect.Capture;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Capture;

/// <summary>synth -> read round trips: integer formats give back the exact codes, floats the exact bits.</summary>
public class RoundTripTests
{
    public static TheoryData<string, string> Cases()
    {
        var data = new TheoryData<string, string>();
        string[] words =
        [
            "cu8",
            "ci8",
            "ci16_le",
            "ci16_be",
            "ci32_le",
            "ci32_be",
            "cu16_le",
            "cu16_be",
            "cu32_le",
            "cu32_be",
            "cf32_le",
            "cf32_be",
            "cf64_le",
            "cf64_be",
            "ru8",
            "ri8",
            "ri16_le",
            "ri16_be",
            "ri32_le",
            "rf32_le",
            "rf32_be",
            "rf64_le",
        ];
        foreach (string w in words)
        {
            data.Add(w, "raw");
            data.Add(w, ".sigmf-meta");
            data.Add(w, ".sigmf");
        }
        foreach (
            string w in new[]
            {
                "cu8",
                "ci16_le",
                "ci32_le",
                "cf32_le",
                "cf64_le",
                "ru8",
                "ri16_le",
                "ri32_le",
                "rf32_le",
                "rf64_le",
            }
        )
            data.Add(w, ".wav");
        return data;
    }

    [Theory]
    [MemberData(nameof(Cases))]
    public void Written_values_are_read_back_exactly(string datatype, string ending)
    {
        using var tmp = new TempDir();
        SampleFormat format = SampleFormat.Parse(datatype);
        string path = tmp.File("rt" + (ending == "raw" ? "." + datatype : ending));
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 32000,
            DurationS = 0.05,
            IsComplex = format.IsComplex,
            CarrierOffsetHz = format.IsComplex ? -1500 : 4000,
            Amplitude = 0.6,
            ModulatingFrequencyHz = 700,
            PeakDeviationHz = 900,
            SnrDb = 25,
            Seed = 5,
            CenterFrequencyHz = 50e6,
        };
        SynthesisResult result = Synthesizer.Write(spec, path, format);
        Assert.Equal(0, result.ClippedValues);

        ReaderOptions options = ending == "raw" ? new ReaderOptions { SampleRateHz = 32000 } : ReaderOptions.Default;
        CaptureSource source = CaptureSource.Open(result.Paths[0], options);
        Assert.Equal(spec.SampleCount, source.Info.SampleCount);
        Assert.Equal(format.IsComplex, source.Info.IsComplex);
        Assert.Equal(32000, source.Info.SampleRateHz);
        if (ending != "raw" && ending != ".wav")
            Assert.Equal(50e6, source.Info.CenterFrequencyHz);
        double[] read = TestData.ReadAll(source, blockSamples: 97);

        var expected = new double[spec.SampleCount * format.ComponentsPerSample];
        new SignalGenerator(spec).Generate(expected);
        // For WAV, 8-bit PCM is offset binary around 128 (the WAV convention), not 127.5.
        double offset = ending == ".wav" && format.Encoding == ComponentEncoding.UInt8 ? 128 : format.UnsignedOffset;
        double scale = ending == ".wav" && format.Encoding == ComponentEncoding.UInt8 ? 128 : format.CodeFullScale;
        for (int i = 0; i < expected.Length; i++)
        {
            double want = format.Encoding switch
            {
                ComponentEncoding.Float32 => (float)expected[i],
                ComponentEncoding.Float64 => expected[i],
                _ => (Math.Round(expected[i] * scale + offset, MidpointRounding.AwayFromZero) - offset) / scale,
            };
            Assert.True(want.Equals(read[i]), $"{datatype}{ending} value {i}: wrote {want:R}, read {read[i]:R}");
        }
    }

    [Fact]
    public void Integer_codes_clip_at_the_ends_of_their_range_and_are_counted()
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Cw,
            SampleRateHz = 1000,
            DurationS = 0.1,
            Amplitude = 1.0,
            CarrierOffsetHz = 0,
        };
        SynthesisResult r = Synthesizer.Write(spec, tmp.File("full.cs16"), SampleFormat.Parse("ci16_le"));
        // I = 1.0 (code 32768) does not fit a 16-bit code: clamped to 32767, once per sample.
        Assert.Equal(spec.SampleCount, r.ClippedValues);
        double[] iq = TestData.ReadAll(CaptureSource.Open(r.Paths[0], new ReaderOptions { SampleRateHz = 1000 }));
        Assert.Equal(32767 / 32768.0, iq[0]);
    }

    [Fact]
    public void An_existing_file_is_kept_unless_overwrite_is_asked_and_no_temporary_file_is_left()
    {
        using var tmp = new TempDir();
        string path = tmp.File("keep.cf32");
        File.WriteAllText(path, "precious");
        var spec = new SignalSpec { SampleRateHz = 1000, DurationS = 0.01 };
        var e = Assert.Throws<OutputException>(() => Synthesizer.Write(spec, path, SampleFormat.Parse("cf32_le")));
        Assert.Contains("already exists", e.Message);
        Assert.Equal("precious", File.ReadAllText(path));
        Synthesizer.Write(spec, path, SampleFormat.Parse("cf32_le"), overwrite: true);
        Assert.Equal(80, new FileInfo(path).Length);
        // The data and its sidecar; no temporary file left behind.
        Assert.Equal(
            ["keep.cf32", "keep.cf32" + CaptureFormats.SidecarSuffix],
            Directory.GetFiles(tmp.Path).Select(Path.GetFileName).Order(StringComparer.Ordinal)
        );
    }

    [Fact]
    public void Large_WAV_output_switches_to_RF64_when_asked()
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec { SampleRateHz = 8000, DurationS = 0.01 };
        SynthesisResult r = Synthesizer.Write(spec, tmp.File("x.wav"), SampleFormat.Parse("ci16_le"), forceRf64: true);
        CaptureSource source = CaptureSource.Open(r.Paths[0]);
        Assert.Equal("RF64", source.Info.Container);
        Assert.Equal(80, source.Info.SampleCount);
    }
}
