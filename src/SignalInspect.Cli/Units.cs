using System.CommandLine;
using System.CommandLine.Parsing;
using System.Globalization;

namespace SignalInspect.Cli;

/// <summary>Parses numbers with an optional SI suffix: <c>2.4M</c>, <c>12.5k</c>, <c>155.1e6</c>.</summary>
internal static class Units
{
    public static bool TryParseSi(string text, out double value)
    {
        string t = text.Trim();
        double mult = 1;
        if (t.Length > 1)
        {
            char last = t[^1];
            double? m = last switch
            {
                'k' or 'K' => 1e3,
                'M' => 1e6,
                'G' => 1e9,
                _ => null,
            };
            if (m is { } mm)
            {
                mult = mm;
                t = t[..^1];
            }
        }
        if (double.TryParse(t, NumberStyles.Float, CultureInfo.InvariantCulture, out double v) && double.IsFinite(v))
        {
            value = v * mult;
            return true;
        }
        value = double.NaN;
        return false;
    }

    /// <summary>An option taking a number in SI units (Hz, s ...), e.g. "2.4M".</summary>
    public static Option<double?> SiOption(string name, string description, string helpName = "HZ") =>
        new(name)
        {
            Description = description,
            HelpName = helpName,
            CustomParser = r => Parse(r, name),
        };

    /// <summary>An option taking a number in SI units with a default.</summary>
    public static Option<double> SiOption(string name, string description, double defaultValue, string helpName) =>
        new(name)
        {
            Description = description,
            HelpName = helpName,
            DefaultValueFactory = _ => defaultValue,
            CustomParser = r => Parse(r, name) ?? defaultValue,
        };

    private static double? Parse(ArgumentResult r, string name)
    {
        if (r.Tokens.Count == 0)
            return null;
        string s = r.Tokens[0].Value;
        if (TryParseSi(s, out double v))
            return v;
        r.AddError($"{name}: '{s}' is not a number (examples: 48000, 2.4M, 12.5k, 1e-3)");
        return null;
    }

    public static string Hz(double? hz) =>
        hz is { } v ? v.ToString("0.###", CultureInfo.InvariantCulture) + " Hz" : "unknown";
}
