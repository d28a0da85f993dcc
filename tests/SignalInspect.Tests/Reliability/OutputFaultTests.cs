using SignalInspect.Reporting;

namespace SignalInspect.Tests.Reliability;

/// <summary>
/// Writing outputs when the machine says no (issue 27, item 4): every write failure was an internal error with a
/// stack trace, a failed PDF left its JSON behind (and the rerun then refused), and --force replaced /dev/null
/// with a regular file. Now: one line naming the file and the reason, exit 2, no partial set, devices written
/// into and links refused.
/// </summary>
public class OutputFaultTests
{
    private static string Capture => TestData.Path("measure", "nbfm-151625.sigmf-meta");

    [DeviceFact("/dev/full")]
    public void A_full_device_is_one_line_and_exit_2()
    {
        // /dev/full answers every write with ENOSPC (Linux).
        var (code, _, stderr) = CliRunner.Run("analyze", Capture, "--json", "/dev/full", "--force");
        Assert.Equal(2, code);
        Assert.Contains("full: cannot be written", stderr);
        Assert.Single(stderr.Trim().Split('\n'));
    }

    [DeviceFact("/dev/null")]
    public void Dev_null_is_written_into_and_stays_a_device()
    {
        var (code, _, stderr) = CliRunner.Run("analyze", Capture, "--json", "/dev/null", "--force");
        Assert.True(code is 0 or 4, stderr);
        // A regular file put in its place would now hold the JSON.
        Assert.Equal(0, new FileInfo("/dev/null").Length);
        Assert.Equal(0, CliRunner.Run("analyze", Capture, "--json", "/dev/null").Code); // no "already exists"
    }

    [Fact]
    public void A_link_is_not_replaced()
    {
        using var tmp = new TempDir();
        string target = tmp.File("kept.json");
        File.WriteAllText(target, "keep me");
        string link = tmp.File("out.json");
        File.CreateSymbolicLink(link, target);
        var (code, _, stderr) = CliRunner.Run("analyze", Capture, "--json", link, "--force");
        Assert.Equal(2, code);
        Assert.Contains("is a symbolic link", stderr);
        Assert.Equal("keep me", File.ReadAllText(target));
        Assert.NotNull(new FileInfo(link).LinkTarget);
    }

    [Fact]
    public void Json_and_report_model_on_one_path_are_refused_before_anything_is_written()
    {
        using var tmp = new TempDir();
        var (code, _, stderr) = CliRunner.Run(
            "analyze",
            Capture,
            "--json",
            tmp.File("x.json"),
            "--report",
            tmp.File("x.pdf")
        );
        Assert.Equal(2, code);
        Assert.Contains("writes its JSON model there", stderr);
        Assert.Empty(Directory.GetFiles(tmp.Path));
    }

    [Fact]
    public void A_set_whose_second_file_fails_leaves_neither()
    {
        using var tmp = new TempDir();
        string a = tmp.File("r.json"),
            b = tmp.File("r.pdf");
        var e = Assert.Throws<OutputException>(() =>
            AtomicFile.WriteSet(
                [(a, s => s.WriteByte(1)), (b, _ => throw new IOException("No space left on device"))],
                overwrite: false
            )
        );
        Assert.Contains("r.pdf: cannot be written: No space left on device", e.Message);
        Assert.Empty(Directory.GetFiles(tmp.Path, "*", new EnumerationOptions { AttributesToSkip = 0 }));
        // A rerun is not refused for a file the failed run left.
        AtomicFile.WriteSet([(a, s => s.WriteByte(1)), (b, s => s.WriteByte(2))], overwrite: false);
        Assert.Equal(2, Directory.GetFiles(tmp.Path).Length);
    }
}
