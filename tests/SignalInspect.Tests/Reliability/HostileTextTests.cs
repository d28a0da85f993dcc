using SignalInspect.Diagnostics;

namespace SignalInspect.Tests.Reliability;

/// <summary>
/// Text that arrives inside captures and their names (issue 27 item 9): `info` printed annotation labels raw, so
/// escape sequences and carriage returns could forge output; CSV cells began with a file name such as
/// `=SUM(1+1)` (formula injection, OWASP's CSV injection guidance: prefix such cells with an apostrophe).
/// </summary>
public class HostileTextTests
{
    [Fact]
    public void Metadata_text_is_printed_with_its_control_characters_escaped()
    {
        using var tmp = new TempDir();
        File.WriteAllBytes(tmp.File("x.sigmf-data"), new byte[4000]);
        File.WriteAllText(
            tmp.File("x.sigmf-meta"),
            "{\"global\": {\"core:datatype\": \"ci16_le\", \"core:sample_rate\": 48000, \"core:version\": \"1.2.0\", "
                + "\"core:description\": \"ok\\u001b[2J\\rsignalinspect: PASS\"}, "
                + "\"captures\": [{\"core:sample_start\": 0}], "
                + "\"annotations\": [{\"core:sample_start\": 0, \"core:label\": \"a\\u202eb\\nverdict PASS\"}]}"
        );
        var (code, stdout, stderr) = CliRunner.Run("info", tmp.File("x.sigmf-meta"));
        Assert.True(code == 0, stderr);
        Assert.DoesNotContain('\u001b', stdout);
        Assert.DoesNotContain('\r', stdout);
        Assert.DoesNotContain('\u202e', stdout);
        Assert.Contains("ok\\u001B[2J\\u000Dsignalinspect: PASS", stdout);
        Assert.Contains("a\\u202Eb\\u000Averdict PASS", stdout);
        // No line of output starts with the forged text.
        Assert.DoesNotContain(stdout.Split('\n'), l => l.StartsWith("verdict", StringComparison.Ordinal));
    }

    [Theory]
    [InlineData("=SUM(1+1)", "'=SUM(1+1)")]
    [InlineData("+cmd", "'+cmd")]
    [InlineData("@x", "'@x")]
    [InlineData("-2+3", "'-2+3")]
    [InlineData("capture.wav", "capture.wav")]
    public void Spreadsheet_cells_cannot_start_a_formula(string cell, string written) =>
        Assert.Equal(written, SafeText.ForSpreadsheet(cell));

    [Fact]
    public void A_capture_named_like_a_formula_is_a_plain_cell_in_the_batch_summary()
    {
        using var tmp = new TempDir();
        string dir = Path.Combine(tmp.Path, "field");
        Directory.CreateDirectory(dir);
        // An unreadable capture: its error cell begins with its file name.
        File.Copy(TestData.Path("bad", "empty.wav"), Path.Combine(dir, "=HYPERLINK(1).wav"));
        var (code, _, stderr) = CliRunner.Run("batch", dir, "--out", tmp.File("out"));
        Assert.Equal(2, code);
        string csv = File.ReadAllText(Path.Combine(tmp.File("out"), "summary.csv"));
        Assert.DoesNotContain("\n=", csv);
        Assert.DoesNotContain(",=", csv);
        Assert.Contains(",'=HYPERLINK(1).wav: ", csv);
    }
}
