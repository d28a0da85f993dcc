using System.Text.Json.Nodes;

namespace SignalInspect.Tests.Capture;

/// <summary>
/// Data stores keep captures behind symbolic links: a linked capture is measured exactly as its target (the
/// length of a link is its own text's, and was read as the capture's), and a dangling link is one line.
/// </summary>
public class LinkTests
{
    private static JsonNode Measure(string path, params string[] options)
    {
        var (code, stdout, stderr) = CliRunner.Run(["analyze", path, "--json", "-", .. options]);
        Assert.True(code == 0, stderr);
        JsonObject o = JsonNode.Parse(stdout)!.AsObject();
        o["capture"]!.AsObject().Remove("file");
        return o;
    }

    [Theory]
    [InlineData("measure", "wbfm-1024k.cu8", "--sample-rate", "1.024M")]
    [InlineData("measure", "am-audio-12k.wav")]
    [InlineData("measure", "nbfm-151625.sigmf-meta")]
    [InlineData("sigmf", "wbfm-archive.sigmf")]
    public void A_linked_capture_is_measured_as_its_target(string folder, string file, params string[] options)
    {
        using var tmp = new TempDir();
        string link = tmp.File("linked-" + file);
        File.CreateSymbolicLink(link, TestData.Path(folder, file));
        if (file.EndsWith(".sigmf-meta", StringComparison.Ordinal))
        {
            string data = file[..^".sigmf-meta".Length] + ".sigmf-data";
            File.CreateSymbolicLink(tmp.File("linked-" + data), TestData.Path(folder, data));
        }
        Assert.Equal(
            Measure(TestData.Path(folder, file), options).ToJsonString(),
            Measure(link, options).ToJsonString()
        );
    }

    [Fact]
    public void A_dangling_link_is_one_line_and_exit_2()
    {
        using var tmp = new TempDir();
        string link = tmp.File("gone.cu8");
        File.CreateSymbolicLink(link, tmp.File("nothing-here.cu8"));
        var (code, _, stderr) = CliRunner.Run("analyze", link, "--sample-rate", "1M");
        Assert.Equal(2, code);
        Assert.Single(stderr.Trim().Split('\n'));
    }
}
