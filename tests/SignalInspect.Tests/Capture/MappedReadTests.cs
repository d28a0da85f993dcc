using System.Runtime.InteropServices;
using SignalInspect.Capture;

namespace SignalInspect.Tests.Capture;

/// <summary>
/// Sample data is taken through a memory map a window at a time where the file allows it, and read
/// with copies otherwise (or with SIGNALINSPECT_NO_MAP=1). Both paths must deliver the bytes the
/// file holds: checked against the file's bytes read independently (File.ReadAllBytes), with windows
/// small enough that requests cross their edges, and against the FIPS 180-2 SHA-256 examples.
/// </summary>
public class MappedReadTests
{
    /// <summary>Runs <paramref name="body"/> with mapping on or off and a small window (restored after).</summary>
    private static T With<T>(bool map, int window, Func<T> body)
    {
        MappedExtent.EnabledForTests.Value = map;
        MappedExtent.WindowBytesForTests.Value = window;
        try
        {
            return body();
        }
        finally
        {
            MappedExtent.EnabledForTests.Value = null;
            MappedExtent.WindowBytesForTests.Value = null;
        }
    }

    private static float[] Floats(byte[] bytes, int offset, int count) =>
        MemoryMarshal.Cast<byte, float>(bytes.AsSpan(offset, count * 4)).ToArray();

    [Theory]
    [InlineData(true, 5000)] // windows smaller than many requests and not a whole number of pages or frames
    [InlineData(true, 1 << 16)]
    [InlineData(false, 5000)]
    public void Float32_views_hold_the_stored_samples(bool map, int window)
    {
        using var tmp = new TempDir();
        string path = tmp.File("v.cf32");
        var rng = new Random(7);
        var values = new float[2 * 40000];
        for (int i = 0; i < values.Length; i++)
            values[i] = (float)(rng.NextDouble() * 2 - 1);
        File.WriteAllBytes(path, MemoryMarshal.AsBytes(values.AsSpan()).ToArray());
        With(map, window, () =>
        {
            CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 48000 });
            // A window of the capture (from sample 1234), as the passes open them.
            using CaptureReader reader = src.OpenReader(1234, 30000);
            Assert.True(reader.DeliversFloat32);
            Assert.Equal(map, reader.Mapped);
            // Overlapping steps as a Welch row takes them, jumps back and forth, requests longer than a window, the
            // end.
            var requests = new List<(long, int)>
            {
                (0, 4096),
                (2048, 4096),
                (4096, 4096),
                (100, 3000),
                (29000, 5000),
                (29999, 10),
                (30000, 10),
                (0, 0),
            };
            for (int i = 0; i < 200; i++)
                requests.Add((rng.Next(0, 30000), rng.Next(0, 9000)));
            foreach (var (at, count) in requests)
            {
                int expect = (int)Math.Min(count, 30000 - at);
                float[] got = reader.Float32View(at, count).ToArray();
                Assert.Equal(values.AsSpan((int)(1234 + at) * 2, expect * 2).ToArray(), got);
                Assert.Equal(at + expect, reader.Position);
            }
            // Sequential reads after views go on from the last view's end.
            reader.Float32View(500, 10);
            var buf = new float[2 * 7];
            Assert.Equal(7, reader.Read(buf));
            Assert.Equal(values.AsSpan((1234 + 510) * 2, 14).ToArray(), buf);
            Assert.Throws<ArgumentOutOfRangeException>(() => reader.Float32View(30001, 1));
            return 0;
        });
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void A_SigMF_archive_member_is_viewed_at_its_offset_in_the_tar(bool map)
    {
        // wbfm-archive.sigmf: made by Python's tarfile (testdata/make_python_captures.py); its data
        // member starts after two 512-byte headers and the padded metadata member.
        string path = TestData.Path("sigmf", "wbfm-archive.sigmf");
        byte[] tar = File.ReadAllBytes(path);
        TarMember data = TarArchive.List(path).Single(m => m.Name.EndsWith(".sigmf-data"));
        float[] expect = Floats(tar, (int)data.DataOffset, 4800 * 2);
        float[] got = With(map, 4000, () =>
        {
            using CaptureReader reader = CaptureSource.Open(path).OpenReader();
            Assert.Equal(map, reader.Mapped);
            var all = new List<float>();
            for (long at = 0; at < reader.SampleCount; at += 333)
                all.AddRange(reader.Float32View(at, 333).ToArray());
            return all.ToArray();
        });
        Assert.Equal(expect, got);
    }

    [Theory]
    [InlineData("multi-ci8.sigmf-meta")] // 8-bit, core:offset and three segments
    [InlineData("nbfm-ci16.sigmf-meta")]
    [InlineData("tone-cf32be.sigmf-meta")] // float32 but byte-swapped: decoded, not viewed
    public void Decoded_formats_read_the_same_mapped_or_copied(string meta)
    {
        string path = TestData.Path("sigmf", meta);
        double[] copied = With(false, 5000, () => TestData.ReadAll(CaptureSource.Open(path)));
        double[] mapped = With(true, 5000, () => TestData.ReadAll(CaptureSource.Open(path)));
        double[] wide = With(true, 1 << 20, () => TestData.ReadAll(CaptureSource.Open(path), 4096));
        Assert.NotEmpty(copied);
        Assert.Equal(copied, mapped);
        Assert.Equal(copied, wide);
    }

    [Theory]
    [InlineData("sox-stereo-f32.wav", true)] // float32 I/Q: viewed in place
    [InlineData("sox-stereo-f32.wav", false)]
    [InlineData("sox-mono-s24.wav", true)] // WAVE_FORMAT_EXTENSIBLE, 24-bit: decoded from the map
    [InlineData("sox-stereo-s16.wav", true)]
    [InlineData("py-rf64-s16.wav", true)] // RF64 (Python-written), its data chunk after a ds64 chunk
    [InlineData("py-bw64-s16.wav", true)]
    public void A_WAV_data_chunk_is_mapped_at_its_place_in_the_file(string file, bool map)
    {
        // WavReaderTests compares the default (mapped) path with sox's own decoding; here the
        // mapped data chunk must deliver what NAudio's reads deliver, so it starts where NAudio's does.
        string path = TestData.Path("wav", file);
        double[] copied = With(false, 5000, () => TestData.ReadAll(CaptureSource.Open(path)));
        (double[] values, bool mapped, float[] view) = With(map, 5000, () =>
        {
            CaptureSource src = CaptureSource.Open(path);
            using CaptureReader reader = src.OpenReader();
            float[] v = reader.DeliversFloat32 ? reader.Float32View(0, (int)reader.SampleCount).ToArray() : [];
            return (TestData.ReadAll(src), reader.Mapped, v);
        });
        Assert.Equal(map, mapped);
        Assert.Equal(copied, values);
        if (view.Length > 0)
            Assert.Equal(values, view.Select(x => (double)x).ToArray());
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void File_hash_gives_the_FIPS_180_2_digests(bool map)
    {
        // FIPS 180-2, Appendix B.1 ("abc") and B.3 (one million 'a'); the empty message's digest as
        // printed by coreutils sha256sum.
        using var tmp = new TempDir();
        string abc = tmp.File("abc"),
            million = tmp.File("a"),
            empty = tmp.File("empty");
        File.WriteAllText(abc, "abc");
        File.WriteAllBytes(million, Enumerable.Repeat((byte)'a', 1_000_000).ToArray());
        File.WriteAllBytes(empty, []);
        With(map, 65536 + 5, () =>
        {
            Assert.Equal("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad", FileHash.Sha256(abc));
            Assert.Equal("cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0", FileHash.Sha256(million));
            Assert.Equal("e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855", FileHash.Sha256(empty));
            // Files one after another hash as their concatenation ("abc" then the empty file).
            Assert.Equal(
                "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
                FileHash.Sha256(abc, empty)
            );
            return 0;
        });
    }

    /// <summary>
    /// Issue 27 item 5: a file cut by another program while it is read killed the process (SIGBUS under the map) or,
    /// read with copies, gave results claiming samples never read. Cut after the first window here: the next read is
    /// a capture error in both modes (the map looks at the file's length before each window).
    /// </summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void A_file_cut_while_it_is_read_is_an_error_not_a_crash(bool map)
    {
        using var tmp = new TempDir();
        string path = tmp.File("cut.cf32");
        File.WriteAllBytes(path, new byte[8 * 100_000]);
        const int window = 1 << 16;
        With(map, window, () =>
        {
            CaptureSource source = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 48000 });
            using CaptureReader reader = source.OpenReader();
            var buf = new double[2 * (window / 8)];
            Assert.Equal(window / 8, reader.Read(buf)); // the first window, whole
            using (var f = new FileStream(path, FileMode.Open, FileAccess.Write, FileShare.ReadWrite))
                f.SetLength(window); // cut at its end
            var e = Assert.Throws<CaptureException>(() =>
            {
                while (reader.Read(buf) > 0)
                { }
            });
            Assert.Contains("became shorter while it was read", e.Message);
            return 0;
        });
    }
}
