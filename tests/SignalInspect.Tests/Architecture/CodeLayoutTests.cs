using System.Text.RegularExpressions;

namespace SignalInspect.Tests.Architecture;

/// <summary>
/// The limits of the house (docs/ARCHITECTURE.md): short files and lines, stages that only know the
/// stages before them, no console in the core, no code written twice outside the justified vector
/// twins.
/// </summary>
public class CodeLayoutTests
{
    private const int MaxFileLines = 600,
        MaxLineLength = 120;

    private static IEnumerable<string> Sources(params string[] roots) =>
        roots.SelectMany(r =>
            Directory
                .EnumerateFiles(TestData.Repo(r), "*.cs", SearchOption.AllDirectories)
                .Where(f => !f.Contains($"{Path.DirectorySeparatorChar}obj{Path.DirectorySeparatorChar}"))
                .Where(f => !f.Contains($"{Path.DirectorySeparatorChar}bin{Path.DirectorySeparatorChar}"))
        );

    private static string Rel(string f) => Path.GetRelativePath(TestData.Repo(), f).Replace('\\', '/');

    [Fact]
    public void No_source_file_is_longer_than_600_lines_nor_any_line_than_120_characters()
    {
        var problems = new List<string>();
        foreach (string f in Sources("src", "tests"))
        {
            string[] lines = File.ReadAllLines(f);
            if (f.StartsWith(TestData.Repo("src"), StringComparison.Ordinal) && lines.Length > MaxFileLines)
                problems.Add($"{Rel(f)}: {lines.Length} lines");
            for (int i = 0; i < lines.Length; i++)
                if (lines[i].Length > MaxLineLength)
                    problems.Add($"{Rel(f)}:{i + 1}: {lines[i].Length} characters");
        }
        Assert.True(problems.Count == 0, string.Join("\n", problems));
    }

    /// <summary>The stages of the core in the order a capture flows through them (docs/ARCHITECTURE.md).</summary>
    private static readonly string[] Stages =
    [
        "Diagnostics",
        "Dsp",
        "Capture",
        "Synthesis",
        "Spectrum",
        "Demodulation",
        "Measure",
        "Compliance",
        "Reporting",
        "Inspection",
        "Survey",
        "Batch",
    ];

    [Fact]
    public void A_stage_only_knows_the_stages_before_it()
    {
        var use = new Regex(@"^using SignalInspect\.(\w+)", RegexOptions.Multiline);
        var qualified = new Regex(
            @"\b(Capture|Dsp|Synthesis|Spectrum|Demodulation|Measure|Compliance|Reporting|Inspection|Survey|Batch)"
                + @"\.[A-Z]\w*"
        );
        string core = TestData.Repo("src", "SignalInspect");
        var problems = new List<string>();
        foreach (string f in Sources(Path.Combine("src", "SignalInspect")))
        {
            string[] parts = Path.GetRelativePath(core, f).Split(Path.DirectorySeparatorChar);
            if (parts.Length < 2)
                continue; // the shared error types at the root
            int mine = Array.IndexOf(Stages, parts[0]);
            Assert.True(mine >= 0, $"{Rel(f)}: folder {parts[0]} is not a stage");
            string text = File.ReadAllText(f);
            IEnumerable<string> named = use.Matches(text)
                .Select(m => m.Groups[1].Value)
                .Concat(qualified.Matches(text).Select(m => m.Groups[1].Value));
            foreach (string stage in named.Distinct())
                if (Array.IndexOf(Stages, stage) > mine && stage != "Diagnostics")
                    problems.Add($"{Rel(f)} ({parts[0]}) uses {stage}, a later stage");
        }
        Assert.True(problems.Count == 0, string.Join("\n", problems));
    }

    [Fact]
    public void The_core_writes_to_no_console()
    {
        foreach (string f in Sources(Path.Combine("src", "SignalInspect")))
            Assert.DoesNotContain("Console.", File.ReadAllText(f));
    }

    /// <summary>
    /// Files whose repeats are deliberate: each 512-bit kernel beside its 256-bit twin doing the same
    /// operations per value (tested bit for bit against each other; .NET has no type over both widths
    /// that keeps the JIT's code as fast), and the float twin of the double FFT passes.
    /// </summary>
    private static readonly string[] VectorTwins =
    [
        "src/SignalInspect/Dsp/Fft/FftPlan.Kernels.cs",
        "src/SignalInspect/Dsp/Fft/FftPlan.Scrambled.cs",
        "src/SignalInspect/Dsp/Fft/FftPlan.Single.cs",
        "src/SignalInspect/Dsp/Fft/FftPlan.cs",
        "src/SignalInspect/Dsp/Filters/ChannelDecimator.Kernels.cs",
    ];

    /// <summary>
    /// The statements of a source file, whitespace collapsed: comments, usings and the layout removed, split
    /// at semicolons and braces, each with the line it starts on (so that wrapping does not make or hide a
    /// repeat).
    /// </summary>
    private static List<(string Text, int Line)> Statements(string file)
    {
        string text = File.ReadAllText(file);
        text = Regex.Replace(
            text,
            @"//[^\n]*|/\*.*?\*/",
            m => new string('\n', m.Value.Count(ch => ch == '\n')),
            RegexOptions.Singleline
        );
        text = Regex.Replace(text, @"^\s*using [^;]*;", "", RegexOptions.Multiline);
        // An auto-property's accessors are part of its declaration, not statements of their own.
        text = Regex.Replace(
            text,
            @"\{\s*get;\s*((private |internal )?(init|set);\s*)?\}",
            "{ get; set; }".Replace(';', ',')
        );
        var result = new List<(string, int)>();
        int line = 1,
            startLine = 1;
        var current = new System.Text.StringBuilder();
        foreach (char ch in text)
        {
            if (ch == '\n')
                line++;
            if (ch is ';' or '{' or '}')
            {
                string stmt = Regex.Replace(current.ToString(), @"\s+", " ").Trim();
                if (stmt.Length > 0)
                    result.Add((stmt, startLine));
                current.Clear();
                startLine = line;
                continue;
            }
            if (current.Length == 0 && char.IsWhiteSpace(ch))
            {
                startLine = line;
                continue;
            }
            current.Append(ch);
        }
        return result;
    }

    [Fact]
    public void No_run_of_six_statements_is_written_twice_outside_the_vector_twins()
    {
        var runs = new Dictionary<string, List<string>>();
        foreach (string f in Sources("src").Where(f => !VectorTwins.Contains(Rel(f))))
        {
            List<(string Text, int Line)> code = Statements(f);
            for (int i = 0; i + 6 <= code.Count; i++)
            {
                string key = string.Join("\n", code.Skip(i).Take(6).Select(x => x.Text));
                if (!runs.TryGetValue(key, out List<string>? at))
                    runs[key] = at = [];
                at.Add($"{Rel(f)}:{code[i].Line}");
            }
        }
        string[] repeated = [.. runs.Where(r => r.Value.Count > 1).Select(r => string.Join(" ~ ", r.Value))];
        Assert.True(repeated.Length == 0, "written twice:\n" + string.Join("\n", repeated));
    }
}
