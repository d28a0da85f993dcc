using SignalInspect.Capture;

namespace SignalInspect.Tests.Capture;

/// <summary>
/// Raw and SigMF captures written by testdata/make_python_captures.py (numpy and the Python
/// standard library, independent of SignalInspect's writers); true values in testdata/MANIFEST.md.
/// </summary>
public class RawAndSigMfTests
{
    [Fact]
    public void Raw_cu8_is_read_with_its_rate_given_and_its_datatype_taken_from_the_ending()
    {
        string path = TestData.Path("raw", "tone-100k-2048k.cu8");
        var e = Assert.Throws<SettingException>(() => CaptureSource.Open(path));
        Assert.Equal(nameof(ReaderOptions.SampleRateHz), e.Setting);
        Assert.Contains("a raw file has no header", e.Message);
        CaptureSource source = CaptureSource.Open(
            path,
            new ReaderOptions { SampleRateHz = 2.048e6, CenterFrequencyHz = 433.92e6 }
        );
        Assert.Equal("cu8", source.Info.Datatype);
        Assert.Equal(8192, source.Info.SampleCount);
        Assert.Equal(433.92e6, source.Info.CenterFrequencyHz);
        Assert.Contains(source.Info.Notes, n => n.Contains("file ending"));
        double[] iq = TestData.ReadAll(source);
        byte[] codes = File.ReadAllBytes(path);
        for (int i = 0; i < codes.Length; i++)
            Assert.Equal((codes[i] - 127.5) / 127.5, iq[i]);
        // The file holds round(127.5 + 127.5 * 0.7 e^{j 2 pi 100 kHz t}): within one code of the tone.
        for (int n = 0; n < 8192; n++)
            Assert.True(Math.Abs(iq[2 * n] - 0.7 * Math.Cos(2 * Math.PI * 100e3 * n / 2.048e6)) <= 1 / 127.5);
    }

    [Fact]
    public void Raw_file_with_an_unhelpful_ending_takes_datatype_and_rate_from_options()
    {
        string path = TestData.Path("raw", "tone-m50k-1M.iq");
        Assert.Equal(
            nameof(ReaderOptions.Datatype),
            Assert
                .Throws<SettingException>(() => CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 1e6 }))
                .Setting
        );
        CaptureSource source = CaptureSource.Open(path, new ReaderOptions { Datatype = "ci16_le", SampleRateHz = 1e6 });
        Assert.Equal(4000, source.Info.SampleCount);
        double[] iq = TestData.ReadAll(source);
        Assert.Equal(0.5, iq[0], 4);
        Assert.True(Math.Abs(iq[3] - 0.5 * Math.Sin(-2 * Math.PI * 50e3 / 1e6)) < 1 / 32768.0);
    }

    [Fact]
    public void SigMF_pair_gives_rate_centre_time_annotations_and_a_verified_checksum()
    {
        CaptureInfo info = CaptureSource.Open(TestData.Path("sigmf", "nbfm-ci16.sigmf-meta")).Info;
        Assert.Equal(48000, info.SampleRateHz);
        Assert.Equal(462562500, info.CenterFrequencyHz);
        Assert.Equal(9600, info.SampleCount);
        Assert.Equal("ci16_le", info.Datatype);
        Assert.True(info.IsComplex);
        Assert.Equal("verified", info.ChecksumStatus);
        Assert.Equal(new DateTimeOffset(2026, 3, 14, 8, 15, 0, 250, TimeSpan.Zero), info.StartTime);
        Assert.Equal("reference generator (numpy)", info.Hardware);
        CaptureAnnotation a = Assert.Single(info.Annotations);
        Assert.Equal(
            (0L, 9600L, 462556000.0, 462569000.0, "FM voice"),
            (a.SampleStart, a.SampleCount!.Value, a.LowerEdgeHz!.Value, a.UpperEdgeHz!.Value, a.Label)
        );
        // Naming the data file opens the same recording.
        Assert.Equal(9600, CaptureSource.Open(TestData.Path("sigmf", "nbfm-ci16.sigmf-data")).Info.SampleCount);
    }

    [Fact]
    public void SigMF_big_endian_floats_are_swapped()
    {
        CaptureSource source = CaptureSource.Open(TestData.Path("sigmf", "tone-cf32be.sigmf-meta"));
        double[] iq = TestData.ReadAll(source);
        for (int n = 0; n < 1000; n++)
        {
            Assert.Equal((float)(0.5 * Math.Cos(2 * Math.PI * 500.0 * n / 10000)), iq[2 * n], 6);
            Assert.Equal((float)(0.5 * Math.Sin(2 * Math.PI * 500.0 * n / 10000)), iq[2 * n + 1], 6);
        }
    }

    [Fact]
    public void SigMF_multi_capture_lists_segments_skips_header_bytes_and_reads_one_segment()
    {
        string path = TestData.Path("sigmf", "multi-ci8.sigmf-meta");
        CaptureSource whole = CaptureSource.Open(path);
        CaptureInfo info = whole.Info;
        Assert.Null(info.CenterFrequencyHz); // three different frequencies
        Assert.Contains(info.Notes, n => n.Contains("--segment"));
        // Absolute indices (core:offset 1000).
        Assert.Equal([1000L, 3000L, 6000L], info.Segments.Select(s => s.SampleStart));
        Assert.Equal([2000L, 3000L, 1500L], info.Segments.Select(s => s.SampleCount));
        Assert.Equal([433.92e6, 434.00e6, 434.10e6], info.Segments.Select(s => s.FrequencyHz!.Value));
        Assert.Equal([0L, 64L, 0L], info.Segments.Select(s => s.HeaderBytes));
        Assert.Equal(6500, info.SampleCount);
        Assert.Equal(2, info.Annotations.Count);
        Assert.Null(info.Annotations[1].SampleCount);

        // Segment k holds a tone at (k+1) kHz of amplitude 0.5 stored as round(127 x value) in ci8;
        // its first sample is (64, 0) / 128: the 64 header bytes (0, 1, 2 ...) must not show.
        double[] all = TestData.ReadAll(whole);
        Assert.Equal(64 / 128.0, all[2 * 2000]);
        Assert.Equal(0.0, all[2 * 2000 + 1]);
        CaptureSource seg1 = whole.ForSegment(1);
        Assert.Equal(434.00e6, seg1.Info.CenterFrequencyHz);
        Assert.Equal(3000, seg1.Info.SampleCount);
        Assert.Equal(new DateTimeOffset(2026, 3, 14, 10, 0, 1, TimeSpan.Zero), seg1.Info.StartTime);
        double[] s1 = TestData.ReadAll(seg1);
        Assert.Equal(all[4000..10000], s1);
        CaptureSource viaOption = CaptureSource.Open(path, new ReaderOptions { Segment = 2 });
        Assert.Equal(1500, viaOption.Info.SampleCount);
        Assert.Equal(all[10000..], TestData.ReadAll(viaOption));
        Assert.Equal(nameof(ReaderOptions.Segment), Assert.Throws<SettingException>(() => whole.ForSegment(3)).Setting);
    }

    [Fact]
    public void SigMF_two_channels_interleave_sample_by_sample()
    {
        string path = TestData.Path("sigmf", "twoch-cf32.sigmf-meta");
        Assert.Equal(
            nameof(ReaderOptions.Channels),
            Assert.Throws<SettingException>(() => CaptureSource.Open(path)).Setting
        );
        double[] ch1 = TestData.ReadAll(
            CaptureSource.Open(path, new ReaderOptions { Channels = ChannelSelection.Index, ChannelIndex = 1 })
        );
        Assert.Equal(1000, ch1.Length);
        for (int n = 0; n < 500; n++)
            Assert.Equal((float)(0.25 * Math.Cos(-2 * Math.PI * 2000.0 * n / 8000)), ch1[2 * n], 6);
    }

    [Fact]
    public void SigMF_archive_made_by_python_tarfile_is_read_in_place()
    {
        CaptureSource source = CaptureSource.Open(TestData.Path("sigmf", "wbfm-archive.sigmf"));
        Assert.Equal("SigMF archive", source.Info.Container);
        Assert.Equal(48000, source.Info.SampleRateHz);
        Assert.Equal(151820000, source.Info.CenterFrequencyHz);
        Assert.Equal(4800, source.Info.SampleCount);
        Assert.Equal("verified", source.Info.ChecksumStatus);
        double[] iq = TestData.ReadAll(source);
        Assert.Equal(0.5f, iq[0], 6);
    }

    [Fact]
    public void Options_override_metadata_and_the_notes_say_so()
    {
        CaptureInfo info = CaptureSource
            .Open(
                TestData.Path("sigmf", "cw-cf32.sigmf-meta"),
                new ReaderOptions { SampleRateHz = 200000, CenterFrequencyHz = 144.8e6 }
            )
            .Info;
        Assert.Equal(200000, info.SampleRateHz);
        Assert.Equal(144.8e6, info.CenterFrequencyHz);
        Assert.Contains(info.Notes, n => n.Contains("overrides core:sample_rate 250000"));
        Assert.Contains(info.Notes, n => n.Contains("overrides core:frequency 144390000"));
    }

    [Fact]
    public void A_checksum_mismatch_is_an_error_unless_verification_is_skipped()
    {
        string path = TestData.Path("bad", "sha512-mismatch.sigmf-meta");
        var e = Assert.Throws<CaptureException>(() => CaptureSource.Open(path));
        Assert.Contains("core:sha512 does not match", e.Message);
        CaptureInfo info = CaptureSource.Open(path, new ReaderOptions { VerifyChecksum = false }).Info;
        Assert.StartsWith("not checked", info.ChecksumStatus);
    }

    /// <summary>
    /// Issue 27 item 10: SigMF states complex data by its datatype (c...); ri16_le with core:num_channels 2 is two
    /// real channels and was read as I/Q. Made to that layout here: channel 0 a 1 kHz tone, channel 1 a 3 kHz tone
    /// (48 kS/s, interleaved per sample as the spec lays out channels).
    /// </summary>
    [Fact]
    public void SigMF_two_real_channels_are_two_real_channels()
    {
        using var tmp = new TempDir();
        const int n = 48000;
        var data = new byte[n * 4];
        for (int k = 0; k < n; k++)
        {
            BitConverter.TryWriteBytes(
                data.AsSpan(4 * k),
                (short)Math.Round(8000 * Math.Cos(2 * Math.PI * 1000 * k / 48000.0))
            );
            BitConverter.TryWriteBytes(
                data.AsSpan(4 * k + 2),
                (short)Math.Round(8000 * Math.Cos(2 * Math.PI * 3000 * k / 48000.0))
            );
        }
        File.WriteAllBytes(tmp.File("two.sigmf-data"), data);
        File.WriteAllText(
            tmp.File("two.sigmf-meta"),
            "{\"global\": {\"core:datatype\": \"ri16_le\", \"core:sample_rate\": 48000, \"core:num_channels\": 2, "
                + "\"core:version\": \"1.2.0\"}, \"captures\": [{\"core:sample_start\": 0}], \"annotations\": []}"
        );
        CaptureSource zero = CaptureSource.Open(tmp.File("two.sigmf-meta"));
        Assert.False(zero.Info.IsComplex);
        Assert.Contains(zero.Info.Notes, x => x.Contains("2 real channels"));
        double[] v = TestData.ReadAll(zero);
        Assert.Equal(n, v.Length);
        Assert.Equal(8000 / 32768.0, v[0], 9); // cos(0) of channel 0
        Assert.Equal(Math.Round(8000 * Math.Cos(2 * Math.PI * 1000 / 48000.0)) / 32768.0, v[1], 9);
        CaptureSource one = CaptureSource.Open(
            tmp.File("two.sigmf-meta"),
            new ReaderOptions { Channels = ChannelSelection.Index, ChannelIndex = 1 }
        );
        Assert.Equal(Math.Round(8000 * Math.Cos(2 * Math.PI * 3000 / 48000.0)) / 32768.0, TestData.ReadAll(one)[1], 9);
    }
}
