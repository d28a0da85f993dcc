namespace SignalInspect.Tests.Cli;

/// <summary>
/// Each malformed input of testdata/bad/ (made by make_python_captures.py; listed in
/// testdata/bad/README.md) fails with exit code 2 and one line on stderr naming the file and the
/// problem, prints nothing on stdout, and leaves the input unchanged.
/// </summary>
public class BadInputTests
{
    [Theory]
    [InlineData("empty.wav", "file is empty")]
    [InlineData("truncated-header.wav", "truncated")]
    [InlineData("text-named.wav", "not a WAV file")]
    [InlineData("zero-channels.wav", "zero channels")]
    [InlineData("fmt-size-lies.wav", "more than the file holds")]
    [InlineData("noise.cu8", "noise.cu8: --sample-rate: needed (a raw file has no header)")]
    [InlineData("odd-length.cs16", "--sample-rate: needed")]
    [InlineData("unknown-ending.bin", "unknown-ending.bin: --datatype: needed")]
    [InlineData("syntax-error.sigmf-meta", "not valid JSON at line 4, column 31")]
    [InlineData("rate-is-string.sigmf-meta", "global.core:sample_rate must be a number, not a string")]
    [InlineData("unknown-datatype.sigmf-meta", "unknown datatype 'cf16_xx'")]
    [InlineData("rate-missing.sigmf-meta", "--sample-rate: needed (no global.core:sample_rate in the metadata)")]
    [InlineData("rate-zero.sigmf-meta", "must lie from 1 Hz to 1e11 Hz")]
    [InlineData(
        "rate-negative.sigmf-meta",
        "sample rate -48000 Hz from global.core:sample_rate must lie from 1 Hz to 1e11 Hz"
    )]
    [InlineData("captures-not-array.sigmf-meta", "'captures' must be a JSON array")]
    [InlineData("data-missing.sigmf-meta", "data file data-missing.sigmf-data not found")]
    [InlineData("header-bytes-too-large.sigmf-meta", "beyond the 4000-byte data file")]
    [InlineData("sha512-mismatch.sigmf-meta", "core:sha512 does not match")]
    [InlineData("zero-channels.sigmf-meta", "core:num_channels must be 1 or more")]
    [InlineData("deeply-nested.sigmf-meta", "maximum configured depth")]
    [InlineData("climbing-member.sigmf", "unsafe path")]
    [InlineData("link-member.sigmf", "is a link")]
    [InlineData("not-a-tar.sigmf", "not a tar archive")]
    public void Malformed_input_fails_cleanly_with_exit_code_2(string file, string problem)
    {
        string path = TestData.Path("bad", file);
        string before = TestData.Sha256(path);
        var (code, stdout, stderr) = CliRunner.Run("info", path);
        Assert.Equal(2, code);
        Assert.Equal(string.Empty, stdout);
        string line = Assert.Single(stderr.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.StartsWith($"signalinspect: error: {file}: ", line);
        Assert.Contains(problem, line);
        Assert.DoesNotContain("   at ", stderr);
        Assert.Equal(before, TestData.Sha256(path));
    }

    [Theory]
    [InlineData("--datatype", "cf99_le", "unknown datatype 'cf99_le'")]
    [InlineData("--sample-rate", "0", "must be a number of Hz from 1 to 1e11")]
    [InlineData("--sample-rate", "-2.4M", "must be a number of Hz from 1 to 1e11")]
    public void Bad_reader_options_fail_with_exit_code_2(string option, string value, string problem)
    {
        var (code, _, stderr) = CliRunner.Run(
            "info",
            TestData.Path("raw", "tone-100k-2048k.cu8"),
            option,
            value,
            option == "--datatype" ? "--sample-rate" : "--datatype",
            option == "--datatype" ? "1M" : "cu8"
        );
        Assert.Equal(2, code);
        Assert.Contains(problem, stderr);
    }

    [Theory]
    [InlineData("info", "--no-such-option")]
    [InlineData("info", "x.wav", "--sample-rate", "fast")]
    [InlineData("frobnicate")]
    [InlineData("synth", "out.cf32", "--kind", "qpsk")]
    public void Usage_errors_exit_with_2(params string[] args)
    {
        var (code, stdout, stderr) = CliRunner.Run(args);
        Assert.Equal(2, code);
        Assert.Equal(string.Empty, stdout);
        Assert.StartsWith("signalinspect: error: ", stderr);
    }

    [Fact]
    public void Missing_file_and_folder_are_named()
    {
        var (code, _, stderr) = CliRunner.Run("info", "/nonexistent/capture.wav");
        Assert.Equal(2, code);
        Assert.Contains("capture.wav: file not found", stderr);
        (code, _, stderr) = CliRunner.Run("info", TestData.Path("bad"));
        Assert.Equal(2, code);
        Assert.Contains("is a folder", stderr);
    }

    [Fact]
    public void A_truncated_recording_is_read_with_a_warning_on_stderr()
    {
        using var tmp = new TempDir();
        string path = tmp.File("cut.wav");
        byte[] whole = File.ReadAllBytes(TestData.Path("wav", "sox-mono-s16.wav"));
        File.WriteAllBytes(path, whole[..500]);
        var (code, stdout, stderr) = CliRunner.Run("info", path);
        Assert.Equal(0, code);
        Assert.Contains("samples            228", stdout);
        Assert.Contains("signalinspect: warning: cut.wav: data chunk declares 800 bytes", stderr);
    }
}

/// <summary>
/// The whole malformed-input corpus (testdata/bad/README.md) through <c>analyze</c>: a clean one-line
/// error with exit code 2, or, for the documented recoverable cases, a result with its warning.
/// </summary>
public class CorpusTests
{
    // Recoverable by design (README "Damaged files"): read what is there, and say so.
    private static readonly Dictionary<string, string> Warned = new()
    {
        ["data-size-lies.wav"] = "looks truncated",
        ["data-size-ffffffff.wav"] = "0xFFFFFFFF",
        ["nan-inf.wav"] = "NaN or infinite",
    };

    public static TheoryData<string> Files()
    {
        var d = new TheoryData<string>();
        foreach (
            string f in Directory
                .GetFiles(TestData.Path("bad"))
                .Select(p => Path.GetFileName(p))
                .Order(StringComparer.Ordinal)
        )
            if (!f.EndsWith(".sigmf-data") && f != "README.md")
                d.Add(f);
        return d;
    }

    [Theory]
    [MemberData(nameof(Files))]
    public void Every_corpus_file_fails_cleanly_or_warns(string file)
    {
        string path = TestData.Path("bad", file);
        string before = TestData.Sha256(path);
        var (code, _, stderr) = CliRunner.Run("analyze", path);
        Assert.DoesNotContain("internal error", stderr);
        Assert.DoesNotContain("   at ", stderr);
        if (Warned.TryGetValue(file, out string? warning))
        {
            Assert.Equal(0, code);
            Assert.Contains(warning, stderr);
        }
        else
        {
            Assert.Equal(2, code);
            Assert.Single(stderr.Split('\n', StringSplitOptions.RemoveEmptyEntries), l =>
                l.StartsWith("signalinspect: error: ")
            );
        }
        Assert.Equal(before, TestData.Sha256(path));
    }

    [Theory]
    [InlineData("200k", "--signal: lies outside the sampled band")]
    [InlineData("151.645M", "--signal: no emission stands out of the noise there")]
    [InlineData("151.625M:100k", "--signal: the channel width must be positive and fit inside the sampled band")]
    [InlineData("abc", "--signal: 'abc' is not FREQ or FREQ:WIDTH")]
    public void A_signal_that_is_not_there_is_one_line_and_exit_2(string value, string message)
    {
        // nbfm-151625: FM at +350 Hz from 151.625 MHz, 48 kS/s, so 151.601 to 151.649 MHz (MANIFEST.md).
        var (code, _, stderr) = CliRunner.Run(
            "analyze",
            TestData.Path("measure", "nbfm-151625.sigmf-meta"),
            "--signal",
            value
        );
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
        Assert.Single(stderr.Trim().Split('\n'));
    }

    [Theory]
    [InlineData("60", "--track-interval: must not be longer than the analysed window (1.5 s) (got 60)")]
    [InlineData("0.001", "--track-interval: must be from 0.002 to 3600 seconds")]
    public void A_track_interval_that_cannot_be_used_is_one_line_and_exit_2(string value, string message)
    {
        var (code, _, stderr) = CliRunner.Run(
            "analyze",
            TestData.Path("measure", "nbfm-151625.sigmf-meta"),
            "--track-interval",
            value
        );
        Assert.Equal(2, code);
        Assert.Contains(message, stderr);
        Assert.Single(stderr.Trim().Split('\n'));
    }

    /// <summary>Issue 27 item 2: a SigMF sample_start of 2^61 wrapped to byte 0 (read with exit 0) or, as a second
    /// capture, ran the reader for ever. Refused at once, naming the field, the data file unchanged.</summary>
    [Theory]
    [InlineData("[{\"core:sample_start\": 2305843009213693952}]", "captures[0].core:sample_start")]
    [InlineData(
        "[{\"core:sample_start\": 0}, {\"core:sample_start\": 2305843009213693952}]",
        "captures[0] runs beyond the end" // the first capture would run up to the second
    )]
    [InlineData("[{\"core:sample_start\": 0, \"core:header_bytes\": 4611686018427387904}]", "header_bytes")]
    public void A_SigMF_capture_beyond_its_data_file_is_refused_at_once(string captures, string field)
    {
        using var tmp = new TempDir();
        string data = tmp.File("x.sigmf-data");
        File.WriteAllBytes(data, new byte[4000]);
        File.WriteAllText(
            tmp.File("x.sigmf-meta"),
            "{\"global\": {\"core:datatype\": \"ci16_le\", \"core:sample_rate\": 48000, \"core:version\": "
                + "\"1.2.0\"}, \"captures\": "
                + captures
                + ", \"annotations\": []}"
        );
        foreach (string command in new[] { "info", "analyze", "spectrum" })
        {
            var (code, _, stderr) = CliRunner.Run(command, tmp.File("x.sigmf-meta"));
            Assert.Equal(2, code);
            Assert.Contains(field, stderr);
            Assert.Contains("beyond", stderr);
            Assert.Single(stderr.Trim().Split('\n'));
        }
        Assert.Equal(new byte[4000], File.ReadAllBytes(data));
    }

    /// <summary>Issue 27 item 3: absurd rates gave an infinite duration and NaN results (exit 0) or an internal
    /// error.</summary>
    [Theory]
    [InlineData("1e-308")]
    [InlineData("0.5")]
    [InlineData("1e13")]
    [InlineData("1e308")]
    public void An_absurd_sample_rate_is_refused(string rate)
    {
        var (code, _, stderr) = CliRunner.Run(
            "analyze",
            TestData.Path("measure", "nbfm-151625.sigmf-meta"),
            "--sample-rate",
            rate
        );
        Assert.Equal(2, code);
        Assert.Contains("--sample-rate: must be a number of Hz from 1 to 1e11", stderr);
    }
}
