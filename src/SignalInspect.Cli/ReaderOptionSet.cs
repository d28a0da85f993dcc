using System.CommandLine;
using SignalInspect.Capture;

namespace SignalInspect.Cli;

/// <summary>The reader options every command that opens a capture shares.</summary>
internal sealed class ReaderOptionSet
{
    public Option<string?> Datatype { get; } =
        new("--datatype")
        {
            Description =
                "Datatype of a headerless raw file, in SigMF words: cu8, ci8, ci16_le, ci16_be, ci32_le, cf32_le, "
                + "cf32_be, cf64_le, or the real r... forms. A file ending such as .cu8, .cs16, .cf32 suggests one.",
            HelpName = "WORD",
        };

    public Option<double?> SampleRate { get; } =
        Units.SiOption(
            "--sample-rate",
            "Sample rate in Hz (required for raw files; overrides the file's metadata otherwise). Accepts 2.4M, 48k ..."
        );

    public Option<double?> CenterFrequency { get; } =
        Units.SiOption(
            "--center-frequency",
            "Centre (tuning) frequency in Hz; fills or overrides the metadata. Accepts 155.1M ..."
        );

    public Option<string?> Channel { get; } =
        new("--channel")
        {
            Description =
                "Which channels make the signal: iq (two channels as I/Q, I on channel 0: the default for two "
                + "channels), qi (swapped), left, right (one channel as real audio), or a channel number.",
            HelpName = "iq|qi|left|right|N",
        };

    public Option<int?> Segment { get; } =
        new("--segment")
        {
            Description = "SigMF capture segment to read (from 0); default: the whole recording.",
            HelpName = "N",
        };

    public Option<bool> NoVerify { get; } =
        new("--no-verify") { Description = "Do not verify the SigMF core:sha512 checksum of the data." };

    public void AddTo(Command command)
    {
        command.Add(Datatype);
        command.Add(SampleRate);
        command.Add(CenterFrequency);
        command.Add(Channel);
        command.Add(Segment);
        command.Add(NoVerify);
    }

    public ReaderOptions Read(ParseResult r)
    {
        var (sel, index) = r.GetValue(Channel) is { } ch ? ReaderOptions.ParseChannel(ch) : (ChannelSelection.Auto, 0);
        return new ReaderOptions
        {
            Datatype = r.GetValue(Datatype),
            SampleRateHz = r.GetValue(SampleRate),
            CenterFrequencyHz = r.GetValue(CenterFrequency),
            Channels = sel,
            ChannelIndex = index,
            Segment = r.GetValue(Segment),
            VerifyChecksum = !r.GetValue(NoVerify),
        };
    }
}
