using System.Text;
using SignalInspect.Capture;
using SignalInspect.Compliance;

namespace SignalInspect.Tests.Reliability;

/// <summary>Hostile and degenerate inputs: clean errors only, and inputs never modified.</summary>
public class ReliabilityTests
{
    [Theory]
    [InlineData("zeros", "holds only zero samples")]
    [InlineData("nan", "holds only NaN, infinite or zero samples")]
    [InlineData("short", "fewer than one FFT segment")]
    public void Degenerate_captures_fail_cleanly(string kind, string message)
    {
        using var tmp = new TempDir();
        string path = tmp.File(kind + ".cf32");
        int n = kind == "short" ? 20 : 20000;
        float fill = kind == "nan" ? float.NaN : 0;
        var bytes = new byte[n * 8];
        for (int i = 0; i < 2 * n; i++)
            BitConverter.TryWriteBytes(bytes.AsSpan(4 * i), fill);
        File.WriteAllBytes(path, bytes);
        var (code, _, stderr) = CliRunner.Run("analyze", path, "--sample-rate", "48k");
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
    }

    [Fact]
    public void No_command_writes_to_its_inputs()
    {
        using var tmp = new TempDir();
        string root = TestData.Path();
        var files = Directory
            .GetFiles(root, "*", SearchOption.AllDirectories)
            .Where(f => !f.EndsWith(".py") && !f.EndsWith(".sh") && !f.EndsWith(".md"))
            .ToList();
        var before = files.ToDictionary(f => f, TestData.Sha256);
        var times = files.ToDictionary(f => f, File.GetLastWriteTimeUtc);
        foreach (
            string f in new[]
            {
                TestData.Path("measure", "nbfm-151625.sigmf-meta"),
                TestData.Path("wav", "sox-stereo-f32.wav"),
                TestData.Path("sigmf", "wbfm-archive.sigmf"),
            }
        )
        {
            CliRunner.Run("info", f);
            CliRunner.Run("spectrum", f, "--fft", "256", "--csv", tmp.File(Guid.NewGuid() + ".csv"));
            CliRunner.Run("analyze", f, "--json", tmp.File(Guid.NewGuid() + ".json"));
        }
        foreach (string f in Directory.GetFiles(TestData.Path("bad")))
            CliRunner.Run("info", f);
        CliRunner.Run(
            "batch",
            TestData.Path("measure"),
            TestData.Path("bad"),
            "--out",
            tmp.File("batch"),
            "--sample-rate",
            "1.024M"
        );
        foreach (string f in files)
        {
            Assert.Equal(before[f], TestData.Sha256(f));
            Assert.Equal(times[f], File.GetLastWriteTimeUtc(f));
        }
        Assert.Empty(Directory.GetFiles(root, "*.tmp", SearchOption.AllDirectories));
    }

    [Fact]
    public void A_forged_huge_channel_count_is_refused_without_allocating_from_it()
    {
        using var tmp = new TempDir();
        byte[] wav = File.ReadAllBytes(TestData.Path("wav", "sox-mono-s16.wav"));
        BitConverter.TryWriteBytes(wav.AsSpan(22), (ushort)65535);
        string path = tmp.File("many.wav");
        File.WriteAllBytes(path, wav);
        var (code, _, stderr) = CliRunner.Run("info", path);
        Assert.Equal(2, code);
        Assert.StartsWith("signalinspect: error: many.wav:", stderr);
    }

    /// <summary>
    /// A seeded mutation fuzzer run from xunit (bounded: a few hundred cases per format, seconds):
    /// byte flips, truncations, insertions and size-field overwrites of valid files. Every case must
    /// open and read cleanly or fail with a CaptureException; anything else is a bug.
    /// </summary>
    [Theory]
    [InlineData("wav/sox-mono-s16.wav", 300)]
    [InlineData("wav/sox-mono-s24.wav", 200)]
    [InlineData("wav/py-rf64-s16.wav", 200)]
    [InlineData("sigmf/multi-ci8.sigmf-meta", 300)]
    [InlineData("sigmf/wbfm-archive.sigmf", 200)]
    [InlineData("raw/tone-m50k-1M.iq", 100)]
    public void Mutated_captures_fail_only_with_capture_errors(string seedFile, int cases)
    {
        using var tmp = new TempDir();
        string src = TestData.Path(seedFile.Split('/'));
        byte[] original = File.ReadAllBytes(src);
        string name = Path.GetFileName(src);
        bool pair = name.EndsWith(".sigmf-meta");
        // SI_FUZZ_SCALE (environment) multiplies the cases for a longer run by hand; CI runs the bounded default.
        int scale = int.TryParse(Environment.GetEnvironmentVariable("SI_FUZZ_SCALE"), out int f) && f > 0 ? f : 1;
        int seed = scale == 1 ? seedFile.Length * 7919 + cases : Environment.TickCount;
        var rng = new Random(seed);
        for (int c = 0; c < cases * scale; c++)
        {
            byte[] mutated = Mutate(original, rng, pair);
            string dir = Path.Combine(tmp.Path, "c" + c);
            Directory.CreateDirectory(dir);
            string path = Path.Combine(dir, name);
            File.WriteAllBytes(path, mutated);
            if (pair)
                File.Copy(Path.ChangeExtension(src, ".sigmf-data"), Path.ChangeExtension(path, ".sigmf-data"));
            try
            {
                CaptureSource s = CaptureSource.Open(
                    path,
                    new ReaderOptions
                    {
                        Datatype = name.EndsWith(".iq") ? "ci16_le" : null,
                        SampleRateHz = name.EndsWith(".iq") ? 1e6 : null,
                        VerifyChecksum = c % 2 == 0,
                    }
                );
                using CaptureReader r = s.OpenReader();
                var buf = new double[4096];
                long total = 0;
                int got;
                while ((got = r.Read(buf)) > 0)
                    total += got;
                Assert.True(total <= s.Info.SampleCount);
                Assert.True(
                    s.Info.SampleCount * 1L
                        <= Math.Max(
                            mutated.Length,
                            new FileInfo(path).Length
                                + (pair ? new FileInfo(Path.ChangeExtension(path, ".sigmf-data")).Length : 0)
                        )
                );
            }
            catch (UserInputException e)
            {
                Assert.DoesNotContain('\n', e.Message);
            }
            Directory.Delete(dir, true);
        }
    }

    private static byte[] Mutate(byte[] data, Random rng, bool json)
    {
        var d = new List<byte>(data);
        int ops = 1 + rng.Next(4);
        for (int k = 0; k < ops && d.Count > 0; k++)
        {
            switch (rng.Next(json ? 6 : 5))
            {
                case 0:
                    d[rng.Next(d.Count)] = (byte)rng.Next(256);
                    break;
                case 1:
                    d = d.Take(rng.Next(d.Count + 1)).ToList();
                    break;
                case 2:
                    d.InsertRange(
                        rng.Next(d.Count),
                        Enumerable.Range(0, 1 + rng.Next(16)).Select(_ => (byte)rng.Next(256))
                    );
                    break;
                case 3:
                    // Overwrite a 4-byte field near the start (sizes live there) with a large or odd value.
                    int at = rng.Next(Math.Min(d.Count, 96));
                    uint[] nasty = [0xFFFFFFFF, 0x7FFFFFFF, 0, 1, 0x80000000, (uint)rng.Next()];
                    byte[] v = BitConverter.GetBytes(nasty[rng.Next(nasty.Length)]);
                    for (int i = 0; i < 4 && at + i < d.Count; i++)
                        d[at + i] = v[i];
                    break;
                case 4:
                    d[rng.Next(d.Count)] ^= (byte)(1 << rng.Next(8));
                    break;
                default:
                    // JSON: swap in a value of the wrong type or a huge number.
                    string[] words = ["null", "\"x\"", "[]", "{}", "1e308", "-1", "99999999999999999999", "true"];
                    byte[] w = Encoding.ASCII.GetBytes(words[rng.Next(words.Length)]);
                    int pos = d.IndexOf((byte)':', rng.Next(d.Count));
                    if (pos > 0)
                    {
                        int end = pos + 1;
                        while (end < d.Count && d[end] != (byte)',' && d[end] != (byte)'}')
                            end++;
                        d.RemoveRange(pos + 1, end - pos - 1);
                        d.InsertRange(pos + 1, w);
                    }
                    break;
            }
        }
        return [.. d];
    }

    [Fact]
    public void Mutated_profiles_fail_only_with_one_line_errors()
    {
        using var tmp = new TempDir();
        string text = File.ReadAllText(
            Path.Combine(Path.GetDirectoryName(TestData.Path("x"))!, "..", "profiles", "land-mobile-12k5-vhf.json")
        );
        var rng = new Random(5);
        for (int c = 0; c < 300; c++)
        {
            char[] chars = text.ToCharArray();
            for (int k = 0; k < 1 + rng.Next(3); k++)
                chars[rng.Next(chars.Length)] = "{}[]:,\"0-9ae \n"[rng.Next(14)];
            string path = tmp.File($"p{c}.json");
            File.WriteAllText(path, new string(chars));
            try
            {
                LimitProfile.Load(path);
            }
            catch (ProfileException e)
            {
                Assert.DoesNotContain('\n', e.Message);
            }
        }
    }
}

/// <summary>Warnings that protect the reader from a wrong number.</summary>
public class WarningTests
{
    [Fact]
    public void A_DC_spike_and_clipping_are_warned_about()
    {
        using var tmp = new TempDir();
        // FM at +5 kHz plus a constant offset of 0.05 (a DC spike), then a clipped copy.
        var spec = new SignalInspect.Synthesis.SignalSpec
        {
            Kind = SignalInspect.Synthesis.SignalKind.Fm,
            SampleRateHz = 48000,
            DurationS = 1,
            CarrierOffsetHz = 5000,
            PeakDeviationHz = 2000,
            SnrDb = 40,
        };
        var x = new double[spec.SampleCount * 2];
        new SignalInspect.Synthesis.SignalGenerator(spec).Generate(x);
        for (int i = 0; i < x.Length; i += 2)
            x[i] += 0.05;
        string dc = tmp.File("dc.cf64"),
            clip = tmp.File("clip.cf64");
        File.WriteAllBytes(dc, x.SelectMany(BitConverter.GetBytes).ToArray());
        File.WriteAllBytes(clip, x.Select(v => Math.Clamp(v * 2.5, -1, 1)).SelectMany(BitConverter.GetBytes).ToArray());
        var (_, _, e1) = CliRunner.Run("analyze", dc, "--sample-rate", "48k", "--datatype", "cf64_le");
        Assert.Contains("spike sits at 0 Hz", e1);
        var (_, _, e2) = CliRunner.Run("analyze", dc, "--sample-rate", "48k", "--datatype", "cf64_le", "--suppress-dc");
        Assert.DoesNotContain("spike sits at 0 Hz", e2);
        var (_, _, e3) = CliRunner.Run("analyze", clip, "--sample-rate", "48k", "--datatype", "cf64_le");
        Assert.Contains("clipped", e3);
    }

    [Fact]
    public void A_signal_too_wide_for_the_sample_rate_is_warned_about()
    {
        using var tmp = new TempDir();
        string path = tmp.File("wide.sigmf");
        CliRunner.Run(
            "synth",
            path,
            "--kind",
            "fm",
            "--sample-rate",
            "24k",
            "--deviation",
            "9k",
            "--tone",
            "2k",
            "--duration",
            "1",
            "--snr",
            "40"
        );
        var (_, _, stderr) = CliRunner.Run("analyze", path);
        Assert.Contains("sample rate", stderr);
    }
}
