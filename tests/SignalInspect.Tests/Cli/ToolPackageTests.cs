using System.Diagnostics;
using System.Reflection;
using System.Text.Json;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// SignalInspect installs as a .NET tool (issue 25, item 1): the command-line project is packed, the package
/// installed into a temporary tool path from the local package folder alone, and the installed command answers
/// <c>--version</c> (with the commit) and measures a test capture as the in-process command line does.
/// </summary>
public class ToolPackageTests
{
    private static (int Code, string Out, string Err) Run(string file, params string[] args)
    {
        var psi = new ProcessStartInfo(file)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (string a in args)
            psi.ArgumentList.Add(a);
        psi.Environment["DOTNET_CLI_TELEMETRY_OPTOUT"] = "1";
        psi.Environment["DOTNET_NOLOGO"] = "1";
        using Process p = Process.Start(psi)!;
        Task<string> err = p.StandardError.ReadToEndAsync();
        string output = p.StandardOutput.ReadToEnd();
        Assert.True(p.WaitForExit(300_000), $"{file} {string.Join(' ', args)}: no end within 5 minutes");
        return (p.ExitCode, output, err.Result);
    }

    [Fact]
    public void Packs_installs_and_runs_as_a_dotnet_tool()
    {
        using var tmp = new TempDir();
        string packages = tmp.File("packages"),
            tools = tmp.File("tools");
        string version = typeof(SignalInspect.Cli.Cli)
            .Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()!
            .InformationalVersion.Split('+')[0];
        var (code, output, err) = Run(
            "dotnet",
            "pack",
            TestData.Repo("src", "SignalInspect.Cli"),
            "-c",
            "Release",
            "-o",
            packages,
            "-v",
            "q"
        );
        Assert.True(code == 0, output + err);
        Assert.Single(Directory.GetFiles(packages, $"SignalInspect.Cli.{version}.nupkg"));
        (code, output, err) = Run(
            "dotnet",
            "tool",
            "install",
            "SignalInspect.Cli",
            "--tool-path",
            tools,
            "--add-source",
            packages,
            "--version",
            version
        );
        Assert.True(code == 0, output + err);
        string command = Path.Combine(tools, OperatingSystem.IsWindows() ? "signalinspect.exe" : "signalinspect");
        (code, output, err) = Run(command, "--version");
        Assert.True(code == 0, err);
        Assert.StartsWith(version, output.Trim());
        if (Directory.Exists(TestData.Repo(".git")))
            Assert.Matches(@"^\d+\.\d+\.\d+\+[0-9a-f]{40}$", output.Trim());
        string capture = TestData.Path("measure", "nbfm-151625.sigmf-meta");
        (code, output, err) = Run(command, "analyze", capture, "--json", "-");
        Assert.True(code == 0, err);
        var (inCode, inProcess, _) = CliRunner.Run("analyze", capture, "--json", "-");
        Assert.Equal(0, inCode);
        double Dev(string json) =>
            JsonDocument.Parse(json).RootElement.GetProperty("fm").GetProperty("peakDeviationHz").GetDouble();
        Assert.Equal(Dev(inProcess), Dev(output), 6);
    }
}
