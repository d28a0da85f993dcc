using System.Buffers.Binary;
using SignalInspect.Capture;

namespace SignalInspect.Tests.Capture;

/// <summary>
/// WAV files made by sox (Debian package, SoX v14.4.2; commands in testdata/make_sox_wavs.sh),
/// each compared with sox's own decoding of it (-t f64): an outside reference for the values.
/// </summary>
public class WavReaderTests
{
    // sox holds samples as 32-bit integers internally, so its decoding of a float file is
    // quantised to 2^-31 of full scale; integer files decode exactly in both.
    private const double SoxFloatQuantum = 1.0 / 2147483648.0;

    [Theory]
    [InlineData("sox-mono-u8.wav", "ru8", 0.0)]
    [InlineData("sox-mono-s16.wav", "ri16_le", 0.0)]
    [InlineData("sox-mono-s24.wav", "ri24_le", 0.0)]
    [InlineData("sox-mono-s32.wav", "ri32_le", 0.0)]
    [InlineData("sox-mono-f32.wav", "rf32_le", SoxFloatQuantum)]
    [InlineData("sox-mono-f64.wav", "rf64_le", SoxFloatQuantum)]
    public void Mono_files_decode_as_sox_decodes_them(string file, string datatype, double tolerance)
    {
        CaptureSource source = CaptureSource.Open(TestData.Path("wav", file));
        CaptureInfo info = source.Info;
        Assert.Equal(8000, info.SampleRateHz);
        Assert.False(info.IsComplex);
        Assert.Equal(400, info.SampleCount);
        Assert.Equal(0.05, info.DurationS, 12);
        Assert.Equal(datatype, info.Datatype);
        Assert.Null(info.CenterFrequencyHz);
        Assert.Equal("WAV", info.Container);
        double[] expected = TestData.ReadF64(TestData.Path("wav", Path.ChangeExtension(file, ".f64")));
        double[] actual = TestData.ReadAll(source);
        Assert.Equal(expected.Length, actual.Length);
        for (int i = 0; i < expected.Length; i++)
            Assert.True(
                Math.Abs(expected[i] - actual[i]) <= tolerance,
                $"sample {i}: sox {expected[i]:R}, read {actual[i]:R}"
            );
        Assert.Empty(info.Warnings);
    }

    [Theory]
    [InlineData("sox-stereo-s16.wav", 8000, 400, "ci16_le", 0.0)]
    [InlineData("sox-stereo-f32.wav", 48000, 960, "cf32_le", SoxFloatQuantum)]
    public void Two_channels_are_I_and_Q_with_I_on_channel_0(
        string file,
        int rate,
        int count,
        string datatype,
        double tolerance
    )
    {
        CaptureSource source = CaptureSource.Open(TestData.Path("wav", file));
        Assert.True(source.Info.IsComplex);
        Assert.Equal(rate, source.Info.SampleRateHz);
        Assert.Equal(count, source.Info.SampleCount);
        Assert.Equal(2, source.Info.Channels);
        Assert.Equal(datatype, source.Info.Datatype);
        double[] sox = TestData.ReadF64(TestData.Path("wav", Path.ChangeExtension(file, ".f64")));
        double[] iq = TestData.ReadAll(source);
        Assert.Equal(sox.Length, iq.Length);
        for (int i = 0; i < sox.Length; i++)
            Assert.True(Math.Abs(sox[i] - iq[i]) <= tolerance);
    }

    [Fact]
    public void Channel_options_swap_I_and_Q_or_pick_one_channel_as_audio()
    {
        string file = TestData.Path("wav", "sox-stereo-s16.wav");
        double[] sox = TestData.ReadF64(TestData.Path("wav", "sox-stereo-s16.f64"));
        double[] qi = TestData.ReadAll(CaptureSource.Open(file, new ReaderOptions { Channels = ChannelSelection.QI }));
        double[] left = TestData.ReadAll(
            CaptureSource.Open(file, new ReaderOptions { Channels = ChannelSelection.Left })
        );
        double[] right = TestData.ReadAll(
            CaptureSource.Open(file, new ReaderOptions { Channels = ChannelSelection.Right })
        );
        Assert.Equal(400, left.Length);
        for (int n = 0; n < 400; n++)
        {
            Assert.Equal(sox[2 * n + 1], qi[2 * n]);
            Assert.Equal(sox[2 * n], qi[2 * n + 1]);
            Assert.Equal(sox[2 * n], left[n]);
            Assert.Equal(sox[2 * n + 1], right[n]);
        }
    }

    [Fact]
    public void Extensible_three_channel_file_needs_a_channel_and_gives_it()
    {
        string file = TestData.Path("wav", "sox-3ch-s16.wav");
        var e = Assert.Throws<SettingException>(() => CaptureSource.Open(file));
        Assert.Equal(nameof(ReaderOptions.Channels), e.Setting);
        Assert.Contains("3 channels: pick one by number", e.Message);
        double[] sox = TestData.ReadF64(TestData.Path("wav", "sox-3ch-s16.f64"));
        for (int ch = 0; ch < 3; ch++)
        {
            double[] x = TestData.ReadAll(
                CaptureSource.Open(file, new ReaderOptions { Channels = ChannelSelection.Index, ChannelIndex = ch })
            );
            Assert.Equal(400, x.Length);
            for (int n = 0; n < 400; n++)
                Assert.Equal(sox[3 * n + ch], x[n]);
        }
        Assert.Throws<SettingException>(() =>
            CaptureSource.Open(file, new ReaderOptions { Channels = ChannelSelection.Index, ChannelIndex = 3 })
        );
    }

    [Theory]
    [InlineData("py-rf64-s16.wav", "RF64")]
    [InlineData("py-bw64-s16.wav", "BW64")]
    public void RF64_and_BW64_made_by_an_independent_writer_are_read(string file, string container)
    {
        // testdata/make_python_captures.py writes these per EBU Tech 3306 (ds64 chunk, 0xFFFFFFFF sizes):
        // 4000 frames of a +12 kHz tone of amplitude 0.5 at 96 kHz, 16-bit I/Q.
        CaptureSource source = CaptureSource.Open(TestData.Path("wav", file));
        Assert.Equal(container, source.Info.Container);
        Assert.Equal(96000, source.Info.SampleRateHz);
        Assert.Equal(4000, source.Info.SampleCount);
        Assert.True(source.Info.IsComplex);
        double[] iq = TestData.ReadAll(source);
        for (int n = 0; n < 4000; n++)
        {
            double phase = 2 * Math.PI * 12000.0 * n / 96000.0;
            Assert.True(Math.Abs(0.5 * Math.Cos(phase) - iq[2 * n]) <= 0.5 / 32768, $"I[{n}]");
            Assert.True(Math.Abs(0.5 * Math.Sin(phase) - iq[2 * n + 1]) <= 0.5 / 32768, $"Q[{n}]");
        }
    }

    [Fact]
    public void RF64_data_above_4_GiB_is_read_from_a_sparse_file_without_writing_it()
    {
        using var tmp = new TempDir();
        string path = tmp.File("big.wav");
        const long dataBytes = (5L << 30) + 4 * 7; // above 4 GiB, whole 4-byte frames
        byte[] header = Rf64Header(dataBytes, channels: 2, rate: 2_400_000, bits: 16);
        using (var fs = new FileStream(path, FileMode.CreateNew, FileAccess.Write))
        {
            fs.Write(header);
            fs.SetLength(header.Length + dataBytes); // sparse: nothing between is written
            fs.Position = header.Length + dataBytes - 8;
            byte[] tail = new byte[8];
            BinaryPrimitives.WriteInt16LittleEndian(tail, 1000);
            BinaryPrimitives.WriteInt16LittleEndian(tail.AsSpan(2), -2000);
            BinaryPrimitives.WriteInt16LittleEndian(tail.AsSpan(4), 16384);
            BinaryPrimitives.WriteInt16LittleEndian(tail.AsSpan(6), -32768);
            fs.Write(tail);
        }
        CaptureSource source = CaptureSource.Open(path);
        Assert.Equal(dataBytes / 4, source.Info.SampleCount);
        Assert.Equal("RF64", source.Info.Container);
        Assert.Empty(source.Info.Warnings);
        using CaptureReader reader = source.OpenReader(source.Info.SampleCount - 2, 10);
        var buf = new double[20];
        Assert.Equal(2, reader.Read(buf));
        Assert.Equal([1000 / 32768.0, -2000 / 32768.0, 0.5, -1.0], buf[..4]);
    }

    [Fact]
    public void A_data_chunk_longer_than_the_file_is_read_as_far_as_it_goes_with_a_warning()
    {
        using var tmp = new TempDir();
        string path = tmp.File("cut.wav");
        byte[] whole = File.ReadAllBytes(TestData.Path("wav", "sox-mono-s16.wav"));
        File.WriteAllBytes(path, whole[..(whole.Length - 101)]);
        CaptureSource source = CaptureSource.Open(path);
        Assert.Equal(349, source.Info.SampleCount); // 800 data bytes less 101 = 699: 349 whole 2-byte samples
        Assert.Contains(source.Info.Warnings, w => w.Contains("truncated"));
        Assert.Contains(source.Info.Warnings, w => w.Contains("1 byte(s) after the last whole sample frame"));
    }

    [Fact]
    public void Start_time_and_duration_select_a_window()
    {
        CaptureSource source = CaptureSource.Open(TestData.Path("wav", "sox-mono-s16.wav"));
        double[] all = TestData.ReadAll(source);
        using CaptureReader reader = source.OpenReader(startS: 0.01, durationS: 0.005);
        Assert.Equal(80, reader.FirstSample);
        Assert.Equal(40, reader.SampleCount);
        var buf = new double[100];
        Assert.Equal(40, reader.Read(buf));
        Assert.Equal(all[80..120], buf[..40]);
        Assert.Equal(0, reader.Read(buf));
        Assert.Equal(
            "StartS",
            Assert.Throws<SettingException>(() => source.OpenReader(startS: 1.0, durationS: null)).Setting
        );
        Assert.Equal(
            "DurationS",
            Assert.Throws<SettingException>(() => source.OpenReader(startS: 0, durationS: -1)).Setting
        );
    }

    internal static byte[] Rf64Header(long dataBytes, int channels, int rate, int bits)
    {
        var ms = new MemoryStream();
        var w = new BinaryWriter(ms);
        w.Write("RF64"u8);
        w.Write(uint.MaxValue);
        w.Write("WAVE"u8);
        w.Write("ds64"u8);
        w.Write(28u);
        w.Write(dataBytes + 72);
        w.Write(dataBytes);
        w.Write(dataBytes / (channels * bits / 8));
        w.Write(0u);
        w.Write("fmt "u8);
        w.Write(16u);
        w.Write((ushort)1);
        w.Write((ushort)channels);
        w.Write(rate);
        w.Write(rate * channels * bits / 8);
        w.Write((ushort)(channels * bits / 8));
        w.Write((ushort)bits);
        w.Write("data"u8);
        w.Write(uint.MaxValue);
        return ms.ToArray();
    }

    /// <summary>
    /// Issue 27 item 10: some web receivers write IQ WAV files with the samples spread over hundreds of data chunks,
    /// small vendor chunks between them; only the first chunk was read (512 of 350 000 samples) without a word.
    /// A file made to that layout here (RIFF rules: chunks padded to even length) reads every sample, in order.
    /// </summary>
    [Fact]
    public void Samples_spread_over_many_data_chunks_are_all_read()
    {
        using var tmp = new TempDir();
        string path = tmp.File("chunks.wav");
        const int chunks = 60,
            frames = 512;
        var expected = new List<double>();
        using (var w = new BinaryWriter(File.Create(path)))
        {
            w.Write("RIFF"u8);
            w.Write(0); // patched below
            w.Write("WAVE"u8);
            w.Write("fmt "u8);
            w.Write(16);
            w.Write((short)1); // PCM
            w.Write((short)2); // I, Q
            w.Write(48000);
            w.Write(48000 * 4);
            w.Write((short)4);
            w.Write((short)16);
            int n = 0;
            for (int c = 0; c < chunks; c++)
            {
                w.Write("data"u8);
                w.Write(frames * 4);
                for (int k = 0; k < frames; k++, n++)
                {
                    short i = (short)Math.Round(8000 * Math.Cos(2 * Math.PI * 3000 * n / 48000.0)),
                        q = (short)Math.Round(8000 * Math.Sin(2 * Math.PI * 3000 * n / 48000.0));
                    w.Write(i);
                    w.Write(q);
                    expected.Add(i / 32768.0);
                    expected.Add(q / 32768.0);
                }
                // A vendor chunk of odd length between data chunks: its pad byte must be skipped too.
                w.Write("vndr"u8);
                w.Write(5);
                w.Write("abcde"u8);
                w.Write((byte)0);
            }
            w.Flush();
            w.Seek(4, SeekOrigin.Begin);
            w.Write((int)(w.BaseStream.Length - 8));
        }
        CaptureSource source = CaptureSource.Open(path);
        Assert.Equal(chunks * frames, source.Info.SampleCount);
        Assert.Contains(source.Info.Notes, note => note.Contains("spread over 60 data chunks"));
        Assert.Equal(expected, TestData.ReadAll(source));
    }
}
