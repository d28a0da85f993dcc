using System.Security.Cryptography;
using System.Text;
using System.Text.Json.Nodes;

namespace SignalInspect.Tests.Reliability;

/// <summary>
/// The command line fuzzed as a user meets it (issue 27 acceptance): seeded cases over SigMF metadata (every field
/// of global, captures and annotations given a hostile value), WAV headers, raw captures with their reading options
/// and sidecars, and limit profiles, each run through <c>info</c> or <c>analyze</c>. Every case must end within its
/// time limit with exit 0, 1, 2 or 4 (never 3, the internal error), print no stack trace, and leave its input files
/// as they were. SI_FUZZ_SCALE (environment) multiplies the cases for a longer run by hand; CI runs the default
/// (figures of a longer run in tests/Benchmarks/RESULTS.md).
/// </summary>
public class CliFuzzTests
{
    private static readonly int Scale =
        int.TryParse(Environment.GetEnvironmentVariable("SI_FUZZ_SCALE"), out int f) && f > 0 ? f : 1;

    /// <summary>Values a hostile or broken writer puts into a field.</summary>
    private static readonly JsonNode?[] Hostile =
    [
        null,
        JsonValue.Create(-1),
        JsonValue.Create(0),
        JsonValue.Create(1),
        JsonValue.Create(1.5),
        JsonValue.Create(1e308),
        JsonValue.Create(-1e308),
        JsonValue.Create(5e-324),
        JsonValue.Create(2305843009213693952L), // 2^61
        JsonValue.Create(long.MaxValue),
        JsonValue.Create(long.MinValue),
        JsonValue.Create(true),
        JsonValue.Create("x"),
        JsonValue.Create(""),
        JsonValue.Create("NaN"),
        JsonValue.Create("cf32_le"),
        JsonValue.Create("ri16_be"),
        JsonValue.Create("cu8"),
        JsonValue.Create("\u001b[2J\u001b[31mforged\r\n"),
        JsonValue.Create(new string('A', 5000)),
        JsonValue.Create("2026-13-45T99:99:99Z"),
        JsonValue.Create("../../etc/passwd"),
    ];

    private static JsonNode? Pick(Random rng)
    {
        int k = rng.Next(Hostile.Length + 2);
        return k switch
        {
            _ when k < Hostile.Length => Hostile[k]?.DeepClone(),
            _ when k == Hostile.Length => new JsonArray(JsonValue.Create(1), JsonValue.Create("x")),
            _ => new JsonObject { ["a"] = 1 },
        };
    }

    /// <summary>Every (object, key) in a JSON tree, for picking a field to break.</summary>
    private static List<(JsonObject Parent, string Key)> Fields(JsonNode node)
    {
        var found = new List<(JsonObject, string)>();
        void Walk(JsonNode? n)
        {
            if (n is JsonObject o)
                foreach (var (key, value) in o.ToList())
                {
                    found.Add((o, key));
                    Walk(value);
                }
            else if (n is JsonArray a)
                foreach (JsonNode? x in a)
                    Walk(x);
        }
        Walk(node);
        return found;
    }

    /// <summary>The JSON with one to three fields given hostile values, or removed, or added.</summary>
    private static string Break(string json, Random rng)
    {
        JsonNode root = JsonNode.Parse(json)!;
        int ops = 1 + rng.Next(3);
        for (int i = 0; i < ops; i++)
        {
            var fields = Fields(root);
            if (fields.Count == 0)
                break;
            var (parent, key) = fields[rng.Next(fields.Count)];
            switch (rng.Next(6))
            {
                case 0:
                    parent.Remove(key);
                    break;
                case 1:
                    parent["zz:" + rng.Next(100)] = Pick(rng);
                    break;
                default:
                    parent[key] = Pick(rng);
                    break;
            }
        }
        return root.ToJsonString();
    }

    private static string Hash(string dir) =>
        string.Join(
            ",",
            Directory
                .GetFiles(dir)
                .Order(StringComparer.Ordinal)
                .Select(p => Path.GetFileName(p) + ":" + Convert.ToHexString(SHA256.HashData(File.ReadAllBytes(p))))
        );

    /// <summary>Runs one case: within the time limit, an allowed exit code, no stack trace, inputs unchanged.</summary>
    private static void Case(string dir, string what, string[] args)
    {
        string before = Hash(dir);
        var run = Task.Run(() => CliRunner.Run(args));
        Assert.True(run.Wait(TimeSpan.FromSeconds(60)), $"{what}: no answer within 60 s ({string.Join(' ', args)})");
        var (code, _, err) = run.Result;
        Assert.True(
            code is 0 or 1 or 2 or 4,
            $"{what}: exit {code} ({string.Join(' ', args)}): {err[..Math.Min(err.Length, 400)]}"
        );
        Assert.DoesNotContain("   at ", err);
        Assert.DoesNotContain("internal error", err);
        // Bad input is said in a line per fault (a command line with two bad options gets both).
        if (code == 2)
            Assert.Contains(err.Split('\n'), l => l.StartsWith("signalinspect: error: "));
        Assert.Equal(before, Hash(dir));
    }

    [Theory]
    [InlineData("multi-ci8", 150)]
    [InlineData("nbfm-ci16", 150)]
    [InlineData("twoch-cf32", 60)]
    public void SigMF_metadata_with_hostile_fields(string seed, int cases)
    {
        using var tmp = new TempDir();
        string meta = File.ReadAllText(TestData.Path("sigmf", seed + ".sigmf-meta"));
        var rng = new Random(seed.Length * 7919 + cases);
        for (int c = 0; c < cases * Scale; c++)
        {
            string dir = Path.Combine(tmp.Path, "c" + c);
            Directory.CreateDirectory(dir);
            File.Copy(TestData.Path("sigmf", seed + ".sigmf-data"), Path.Combine(dir, "x.sigmf-data"));
            string path = Path.Combine(dir, "x.sigmf-meta");
            File.WriteAllText(path, Break(meta, rng));
            string[] args = c % 3 == 0 ? ["info", path] : ["analyze", path, "--no-verify"];
            Case(dir, $"{seed} case {c}", args);
            Directory.Delete(dir, true);
        }
    }

    /// <summary>WAV header fields (format tag, channels, rate, byte rate, block align, bits, chunk sizes) overwritten
    /// with hostile values.</summary>
    [Fact]
    public void WAV_headers_with_hostile_fields()
    {
        using var tmp = new TempDir();
        byte[] seed = File.ReadAllBytes(TestData.Path("wav", "sox-mono-s16.wav"));
        var rng = new Random(4409);
        // Offsets of the canonical header's fields: RIFF size 4, fmt size 16, format 20, channels 22, rate 24,
        // byte rate 28, block align 32, bits 34, data size 40.
        (int At, int Bytes)[] fields = [(4, 4), (16, 4), (20, 2), (22, 2), (24, 4), (28, 4), (32, 2), (34, 2), (40, 4)];
        uint[] values = [0, 1, 2, 3, 0xFFFE, 0xFFFF, 0x7FFFFFFF, 0x80000000, 0xFFFFFFFF, 24, 32, 64, 1000000];
        for (int c = 0; c < 200 * Scale; c++)
        {
            byte[] d = [.. seed];
            for (int k = 0, n = 1 + rng.Next(2); k < n; k++)
            {
                var (at, bytes) = fields[rng.Next(fields.Length)];
                byte[] v = BitConverter.GetBytes(values[rng.Next(values.Length)]);
                Array.Copy(v, 0, d, at, bytes);
            }
            string dir = Path.Combine(tmp.Path, "w" + c);
            Directory.CreateDirectory(dir);
            string path = Path.Combine(dir, "x.wav");
            File.WriteAllBytes(path, d);
            Case(dir, $"wav case {c}", c % 2 == 0 ? ["info", path] : ["analyze", path]);
            Directory.Delete(dir, true);
        }
    }

    /// <summary>A raw capture read with hostile options, or with a broken sidecar.</summary>
    [Fact]
    public void Raw_captures_with_hostile_options_and_sidecars()
    {
        using var tmp = new TempDir();
        var rng = new Random(1201);
        string[] datatypes = ["ci16_le", "cu8", "cf64_be", "ri8", "cf32", "x", "ci16_le_le", ""];
        string[] rates = ["1M", "0", "-1", "1e-308", "1e308", "NaN", "1e13", "48k", "2.4M", "abc"];
        string[] centres = ["433.92M", "-1", "1e308", "NaN", "0"];
        const string sidecar =
            "{\"datatype\": \"ci16_le\", \"sampleRateHz\": 1000000, \"centerFrequencyHz\": 433920000}";
        for (int c = 0; c < 200 * Scale; c++)
        {
            string dir = Path.Combine(tmp.Path, "r" + c);
            Directory.CreateDirectory(dir);
            string path = Path.Combine(dir, "x.iq");
            File.Copy(TestData.Path("raw", "tone-m50k-1M.iq"), path);
            var args = new List<string> { c % 2 == 0 ? "info" : "analyze", path };
            if (c % 4 < 2)
            {
                args.AddRange(["--datatype", datatypes[rng.Next(datatypes.Length)]]);
                args.AddRange(["--sample-rate", rates[rng.Next(rates.Length)]]);
                if (rng.Next(2) == 0)
                    args.AddRange(["--center-frequency", centres[rng.Next(centres.Length)]]);
            }
            else
                File.WriteAllText(path + ".si.json", Break(sidecar, rng));
            Case(dir, $"raw case {c}", [.. args]);
            Directory.Delete(dir, true);
        }
    }

    /// <summary>Cases a longer run (SI_FUZZ_SCALE=20) found, kept: 16-bit integers read as 32-bit floats (a
    /// spectrum whose middle blocks lie below its shelf broke the passband search, exit 3), and a mask's reference
    /// bandwidth of 1e308 Hz (an index out of range in the mask margin, exit 3).</summary>
    [Fact]
    public void Cases_found_by_longer_runs()
    {
        using var tmp = new TempDir();
        string path = tmp.File("x.iq");
        File.Copy(TestData.Path("raw", "tone-m50k-1M.iq"), path);
        Case(tmp.Path, "ci16 read as cf32", ["analyze", path, "--datatype", "cf32_le", "--sample-rate", "1M"]);
        string dir = Path.Combine(tmp.Path, "p");
        Directory.CreateDirectory(dir);
        string profile = Path.Combine(dir, "p.json");
        File.WriteAllText(
            profile,
            "{\"name\": \"x\", \"mask\": {\"rule\": \"47cfr90.210d\", \"referenceBandwidthHz\": 1e308}}"
        );
        Case(
            dir,
            "huge reference bandwidth",
            ["analyze", TestData.Path("sigmf", "nbfm-ci16.sigmf-meta"), "--limits", profile]
        );
    }

    /// <summary>Limit profiles with hostile fields, judged on a good capture.</summary>
    [Theory]
    [InlineData("land-mobile-12k5-vhf.json", 150)]
    [InlineData("am-broadcast.json", 60)]
    public void Profiles_with_hostile_fields(string profile, int cases)
    {
        using var tmp = new TempDir();
        string json = File.ReadAllText(TestData.Repo("profiles", profile));
        string capture = TestData.Path("sigmf", "nbfm-ci16.sigmf-meta");
        var rng = new Random(profile.Length * 31 + cases);
        for (int c = 0; c < cases * Scale; c++)
        {
            string dir = Path.Combine(tmp.Path, "p" + c);
            Directory.CreateDirectory(dir);
            string path = Path.Combine(dir, "p.json");
            File.WriteAllText(path, Break(json, rng), Encoding.UTF8);
            Case(dir, $"{profile} case {c}", ["analyze", capture, "--limits", path]);
            Directory.Delete(dir, true);
        }
    }
}
