using System.Diagnostics;
using System.Text.Json.Nodes;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// The vector kernels have narrower fallbacks; a CPU without AVX-512, without AVX2 (AVX alone, as on
/// older laptops) or without AVX at all must measure the same. The tool is run in a child process
/// with the runtime told not to use the instruction set (the .NET runtime's DOTNET_Enable* switches)
/// and its JSON compared with this process's run to the rounding of the float transform (1e-6).
/// </summary>
public class InstructionSetTests
{
    private static JsonNode Analyze(string[] args, string? disable)
    {
        var psi = new ProcessStartInfo("dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        psi.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "signalinspect.dll"));
        foreach (string a in args)
            psi.ArgumentList.Add(a);
        if (disable is not null)
            psi.Environment[disable] = "0";
        using Process p = Process.Start(psi)!;
        Task<string> err = p.StandardError.ReadToEndAsync();
        string json = p.StandardOutput.ReadToEnd();
        p.WaitForExit();
        Assert.True(p.ExitCode == 0, err.Result);
        JsonObject o = JsonNode.Parse(json)!.AsObject();
        o.Remove("capture"); // the file's description, not a measurement
        return o;
    }

    [Theory]
    [InlineData("DOTNET_EnableAVX512")] // AVX2, no 512-bit vectors
    [InlineData("DOTNET_EnableAVX2")] // AVX without AVX2: four-lane doubles are not accelerated
    [InlineData("DOTNET_EnableAVX")] // no AVX at all
    public void Measurements_do_not_depend_on_the_instruction_set(string disable)
    {
        foreach (
            string[] capture in new[]
            {
                new[] { TestData.Path("measure", "nbfm-151625.sigmf-meta") },
                new[] { TestData.Path("measure", "wbfm-1024k.cu8"), "--sample-rate", "1.024M" },
                new[] { TestData.Path("measure", "pm-iq.wav") },
            }
        )
        {
            string[] args = ["analyze", .. capture, "--json", "-"];
            JsonNode full = Analyze(args, null),
                narrow = Analyze(args, disable);
            JsonAlike.Compare(full, narrow, capture[0]);
        }
    }
}
