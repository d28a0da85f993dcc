using System.CommandLine;
using SignalInspect.Compliance;

namespace SignalInspect.Cli;

/// <summary><c>--decision-rule</c>: the rule a profile's limits are judged by, over the profile's own (analyze and
/// batch share it).</summary>
internal static class DecisionRuleOption
{
    public static Option<string?> Create()
    {
        var o = new Option<string?>("--decision-rule")
        {
            Description =
                "How a reading within its expanded uncertainty U of a limit is judged (ILAC-G8:09/2019): guarded "
                + "(guard band w = U: INCONCLUSIVE) or simple (w = 0: the reading alone decides, U stated but not "
                + "used). Default: the profile's \"decisionRule\", else guarded. Needs --limits.",
            HelpName = "guarded|simple",
        };
        o.AcceptOnlyFromAmong("guarded", "simple");
        return o;
    }

    /// <summary>The profile with the rule asked for on the command line (the profile's own when none was).</summary>
    /// <exception cref="UsageException">A rule was asked for without a profile.</exception>
    public static LimitProfile? Apply(LimitProfile? profile, string? rule) =>
        rule switch
        {
            null => profile,
            _ when profile is null => throw new UsageException(
                "--decision-rule: a decision rule judges the limits of a profile; give --limits too"
            ),
            "simple" => profile with { Rule = DecisionRuleKind.Simple },
            _ => profile with { Rule = DecisionRuleKind.Guarded },
        };
}
