using System.CommandLine;
using System.Reflection;
using SignalInspect.Capture;

namespace SignalInspect.Cli;

/// <summary>
/// The command layer: parses the command line, calls one core entry point per command and maps
/// outcomes to <see cref="ExitCodes"/>. User errors are one line on stderr; only an unexpected
/// exception prints diagnostics.
/// </summary>
public static class Cli
{
    /// <summary>Runs the tool with <paramref name="args"/>, writing to the given streams; returns the exit
    /// code.</summary>
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        RootCommand root = Build(stdout, stderr);
        ParseResult parsed = root.Parse(args);
        if (parsed.Errors.Count > 0)
        {
            foreach (var e in parsed.Errors)
                stderr.WriteLine($"signalinspect: error: {OneLine(e.Message)}");
            stderr.WriteLine("signalinspect: try 'signalinspect --help' or 'signalinspect COMMAND --help'");
            return ExitCodes.BadInput;
        }
        try
        {
            // Help is written through a buffer so that its usage line can be put right: a subcommand's line also
            // shows its parent's arguments ("batch <inputs>... merge <dirs>..."), which the subcommand does not take.
            bool help = parsed.Action is System.CommandLine.Help.HelpAction;
            var output = help ? new StringWriter() : stdout;
            int code = parsed.Invoke(
                new InvocationConfiguration
                {
                    EnableDefaultExceptionHandler = false,
                    Output = output,
                    Error = stderr,
                }
            );
            if (help)
                stdout.Write(output.ToString()!.Replace("batch <inputs>... merge", "batch merge"));
            return code;
        }
        catch (Exception e) when (UserMessage(e) is { } message)
        {
            stderr.WriteLine($"signalinspect: error: {SignalInspect.Diagnostics.SafeText.ForTerminal(message)}");
            return ExitCodes.BadInput;
        }
        catch (Exception e)
        {
            stderr.WriteLine($"signalinspect: internal error: {e.GetType().Name}: {OneLine(e.Message)}");
            stderr.WriteLine(
                "This is a bug in SignalInspect. Please report it with the command line and the details below."
            );
            stderr.WriteLine(e.ToString());
            return ExitCodes.InternalError;
        }
    }

    /// <summary>The one-line message of a user error, or null when the exception is a bug.</summary>
    internal static string? UserMessage(Exception e) =>
        e switch
        {
            SettingException s => (s.File is { } f ? Path.GetFileName(f) + ": " : string.Empty)
                + $"{OptionNames.For(s.Setting)}: {OneLine(s.Message)}"
                + (s.Value is { } v ? $" (got {v})" : string.Empty),
            OutputException { AlreadyExists: true } o => OneLine(o.Message) + " (use --force to replace it)",
            CaptureException { OverriddenBy: { } setting } c => OneLine(c.Message)
                + $" ({OptionNames.For(setting)} reads it anyway)",
            UserInputException u => OneLine(u.Message),
            UsageException u => OneLine(u.Message),
            // The machine, not the program: a full device, a closed standard output, a file gone under us.
            IOException io => $"input/output error: {OneLine(io.Message)}",
            _ => null,
        };

    private static RootCommand Build(TextWriter stdout, TextWriter stderr)
    {
        string version = typeof(Cli)
            .Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()
            ?.InformationalVersion.Split('+')[0]
            ?? "0";
        var root = new RootCommand(
            $"SignalInspect {version}: offline measurements of radio signal recordings (WAV/RF64 audio or IQ, raw IQ, "
                + "SigMF).\n"
                + "Exit codes: 0 success (every limit passed, or no limits), 1 a limit failed, 2 bad input or usage, "
                + "3 internal error, 4 nothing failed but a limit was INCONCLUSIVE or NOT TESTED, 130 batch stopped by "
                + "Ctrl-C.\n"
                + "Captures are read through a memory map; SIGNALINSPECT_NO_MAP=1 reads them with copies (for files "
                + "another program may truncate meanwhile)."
        )
        {
            InfoCommand.Create(stdout, stderr),
            SynthCommand.Create(stdout, stderr),
            SpectrumCommand.Create(stdout, stderr),
            AnalyzeCommand.Create(stdout, stderr),
            SurveyCommand.Create(stdout, stderr),
            BatchCommand.Create(stdout, stderr),
            DemoCommand.Create(stdout, stderr),
        };
        return root;
    }

    internal static string OneLine(string s) => s.ReplaceLineEndings(" ").Trim();
}
