using System.CommandLine;
using SignalInspect.Measure;

namespace SignalInspect.Cli;

/// <summary>The receiver's frequency reference: a declared error, or a carrier of known frequency in the capture
/// (analyze and batch share them).</summary>
internal sealed class ReferenceOptionSet
{
    public Option<double?> Error { get; } =
        new("--receiver-error")
        {
            Description =
                "The receiver reads RF frequencies PPM high (negative: low), as measured against a frequency "
                + "standard: every frequency is corrected by it. Needs --receiver-error-uncertainty.",
            HelpName = "PPM",
        };

    public Option<double?> ErrorUncertainty { get; } =
        new("--receiver-error-uncertainty")
        {
            Description =
                "Standard uncertainty (k = 1) of --receiver-error, ppm (from the calibration of the receiver; 0 "
                + "takes the error as exact). It enters every frequency's uncertainty budget.",
            HelpName = "PPM",
        };

    public Option<double?> Carrier { get; } =
        Units.SiOption(
            "--reference-carrier",
            "An unmodulated carrier in the capture known to be at this RF frequency (e.g. a frequency standard fed "
                + "in with the signal): its apparent error corrects every frequency and its fit uncertainty enters "
                + "the budget. Sought within 50 ppm; never taken as the emission measured."
        );

    public void AddTo(Command cmd)
    {
        cmd.Options.Add(Error);
        cmd.Options.Add(ErrorUncertainty);
        cmd.Options.Add(Carrier);
    }

    /// <summary>The options with the reference settings of the command line.</summary>
    public AnalysisOptions Apply(ParseResult r, AnalysisOptions options) =>
        options with
        {
            ReceiverErrorPpm = r.GetValue(Error),
            ReceiverErrorUncertaintyPpm = r.GetValue(ErrorUncertainty),
            ReferenceCarrierHz = r.GetValue(Carrier),
        };
}
