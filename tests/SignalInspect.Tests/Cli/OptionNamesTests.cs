using System.Text.RegularExpressions;
using SignalInspect.Cli;

namespace SignalInspect.Tests.Cli;

/// <summary>
/// The core names settings by their property; the command line alone spells options. Every setting
/// the core can refuse maps to an option that a command really has.
/// </summary>
public class OptionNamesTests
{
    private static IEnumerable<string> SettingsTheCoreNames()
    {
        var first = new Regex(@"new SettingException\(\s*(?:nameof\((?:\w+\.)*(?<n>\w+)\)|""(?<s>\w+)"")");
        foreach (
            string file in Directory.EnumerateFiles(
                TestData.Repo("src", "SignalInspect"),
                "*.cs",
                SearchOption.AllDirectories
            )
        )
            foreach (Match m in first.Matches(File.ReadAllText(file)))
                yield return m.Groups["n"].Success ? m.Groups["n"].Value : m.Groups["s"].Value;
    }

    [Fact]
    public void Every_setting_the_core_refuses_has_an_option()
    {
        string[] named = [.. SettingsTheCoreNames().Distinct()];
        Assert.True(named.Length >= 20, $"found only {named.Length} settings: the pattern no longer matches the code");
        foreach (string setting in named)
            Assert.True(OptionNames.BySetting.ContainsKey(setting), $"{setting} has no option in OptionNames");
    }

    [Fact]
    public void Every_mapped_option_is_offered_by_a_command()
    {
        string help = string.Concat(
            new[] { "info", "spectrum", "analyze", "survey", "synth", "batch" }.Select(c =>
                CliRunner.Run(c, "--help").Out
            )
        );
        foreach (string option in OptionNames.BySetting.Values.Distinct())
            Assert.Contains(option, help);
    }

    [Fact]
    public void The_core_holds_no_option_spelling_in_its_errors()
    {
        var spelled = new Regex(@"throw[^;]*""[^""]*--[a-z]");
        foreach (
            string file in Directory.EnumerateFiles(
                TestData.Repo("src", "SignalInspect"),
                "*.cs",
                SearchOption.AllDirectories
            )
        )
            Assert.False(spelled.IsMatch(File.ReadAllText(file)), $"{file} throws with an option spelling");
    }
}
