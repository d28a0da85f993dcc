namespace SignalInspect.Tests.Cli;

/// <summary>Help text (issue 25 item 6): each default is shown once, and none depends on the machine.</summary>
public class HelpTests
{
    [Theory]
    [InlineData("info")]
    [InlineData("spectrum")]
    [InlineData("analyze")]
    [InlineData("synth")]
    [InlineData("batch")]
    [InlineData("demo")]
    public void Defaults_are_shown_once_and_never_the_machines(string command)
    {
        var (code, help, _) = CliRunner.Run(command, "--help");
        Assert.Equal(0, code);
        foreach (string line in help.Split('\n'))
        {
            int at = line.IndexOf("[default:", StringComparison.Ordinal);
            if (at < 0)
                continue;
            Assert.DoesNotContain("default", line[..at], StringComparison.OrdinalIgnoreCase);
            // One per core is this machine's count: it must not print as a default.
            if (line.TrimStart().StartsWith("--jobs", StringComparison.Ordinal) || line.Contains("--threads"))
                Assert.Fail($"a machine-dependent default is printed: {line.Trim()}");
        }
    }
}
