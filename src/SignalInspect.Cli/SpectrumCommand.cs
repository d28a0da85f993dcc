using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using System.Text;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Reporting;
using SignalInspect.Reporting.Plots;
using SignalInspect.Spectrum;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect spectrum</c>: the calibrated Welch PSD of a capture, as a summary, a CSV and a
/// PNG.</summary>
internal static class SpectrumCommand
{
    /// <summary>The spectrum options shared by commands that estimate one.</summary>
    internal sealed class SpectrumOptionSet
    {
        public Option<int?> Fft { get; } =
            new("--fft")
            {
                Description =
                    $"FFT (segment) size in points, 16 to 1048576 (default {SpectrumSettings.DefaultFftSize}); powers "
                    + "of two are fastest.",
                HelpName = "N",
            };
        public Option<double?> Rbw { get; } =
            Units.SiOption(
                "--rbw",
                "Resolution bandwidth wanted, in Hz: the FFT size is rounded to the nearest power of two and the RBW "
                    + "obtained is reported. Overrides --fft."
            );
        public Option<string> Window { get; } =
            new("--window")
            {
                Description = "Window: hann, hamming, blackmanharris, flattop, rectangular, kaiser:BETA.",
                DefaultValueFactory = _ => "hann",
                HelpName = "NAME",
            };
        public Option<double> Overlap { get; } =
            new("--overlap")
            {
                Description = "Overlap of segments in percent, 0 to 95.",
                DefaultValueFactory = _ => 50,
                HelpName = "PERCENT",
            };
        public Option<bool> SuppressDc { get; } =
            new("--suppress-dc")
            {
                Description =
                    "Interpolate over the bins around 0 Hz of an IQ capture (a receiver's DC spike); the output says "
                    + "so.",
            };
        public Option<double> Calibration { get; } =
            new("--calibration")
            {
                Description =
                    "Offset in dB added to every level (e.g. to read dBm at a calibrated receiver input; 0 reads "
                    + "dBFS).",
                DefaultValueFactory = _ => 0,
                HelpName = "DB",
            };
        public Option<double?> Start { get; } =
            Units.SiOption("--start", "Start of the analysed window, seconds from the first sample.", "S");
        public Option<double?> Duration { get; } =
            Units.SiOption("--duration", "Length of the analysed window in seconds (default: to the end).", "S");
        public Option<int?> Threads { get; } =
            new("--threads") { Description = "Worker threads (default: one per core).", HelpName = "N" };

        public void AddTo(Command c)
        {
            c.Add(Fft);
            c.Add(Rbw);
            c.Add(Window);
            c.Add(Overlap);
            c.Add(SuppressDc);
            c.Add(Calibration);
            c.Add(Start);
            c.Add(Duration);
            c.Add(Threads);
        }

        public (WindowKind Kind, double Beta) WindowKindOf(ParseResult r) => ParseWindow(r.GetValue(Window)!);

        public SpectrumSettings Read(ParseResult r, CaptureInfo info)
        {
            (WindowKind kind, double beta) = WindowKindOf(r);
            int fft = r.GetValue(Rbw) is { } rbw
                ? SpectrumSettings.FftSizeForRbw(rbw, info.SampleRateHz, kind, beta)
                : r.GetValue(Fft) ?? SpectrumSettings.DefaultFftSize;
            var s = new SpectrumSettings
            {
                FftSize = fft,
                Window = kind,
                KaiserBeta = beta,
                OverlapFraction = r.GetValue(Overlap) / 100.0,
                SuppressDc = r.GetValue(SuppressDc),
                CalibrationDb = r.GetValue(Calibration),
                Threads = r.GetValue(Threads),
            };
            s.Validate();
            return s;
        }

        public (long First, long Count) AnalysedWindow(ParseResult r, CaptureSource source) =>
            source.WindowSamples(r.GetValue(Start) ?? 0, r.GetValue(Duration));

        private static (WindowKind, double) ParseWindow(string name)
        {
            try
            {
                return Dsp.Window.ParseName(name);
            }
            catch (ArgumentException e)
            {
                throw new UsageException("--window: " + e.Message);
            }
        }
    }

    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var capture = new Argument<string>("capture") { Description = "The capture file (see 'info')." };
        var csv = new Option<string?>("--csv")
        {
            Description =
                "Write the PSD as CSV: header frequencyHz,psdDbfsPerHz (psdDbmPerHz with --calibration), one row per "
                + "bin in ascending frequency; frequency is the offset from the centre for IQ input, the audio "
                + "frequency for real input. '-' writes it to standard output (the summary then goes to standard "
                + "error).",
            HelpName = "OUT",
        };
        var png = new Option<string?>("--png")
        {
            Description = "Write a plot of the spectrum as PNG.",
            HelpName = "OUT",
        };
        var average = new Option<string>("--average")
        {
            Description = "How segments are combined: mean (Welch) or max (max-hold).",
            DefaultValueFactory = _ => "mean",
            HelpName = "mean|max",
        };
        average.AcceptOnlyFromAmong("mean", "max");
        var force = new Option<bool>("--force") { Description = "Replace existing output files." };
        var reader = new ReaderOptionSet();
        var spectrum = new SpectrumOptionSet();
        var cmd = new Command(
            "spectrum",
            "Estimate the power spectral density (Welch's method, calibrated in dBFS/Hz) of a capture; print a "
                + "summary and optionally write CSV and PNG."
        )
        {
            capture,
            csv,
            png,
            average,
            force,
        };
        reader.AddTo(cmd);
        spectrum.AddTo(cmd);
        cmd.SetAction(r =>
        {
            CaptureSource source = CaptureSource.Open(r.GetValue(capture)!, reader.Read(r));
            SpectrumSettings settings = spectrum.Read(r, source.Info);
            var (first, count) = spectrum.AnalysedWindow(r, source);
            bool force_ = r.GetValue(force);
            string? csvPath = r.GetValue(csv),
                pngPath = r.GetValue(png);
            bool csvToStdout = csvPath == "-";
            if (csvPath is not null && !csvToStdout)
                AtomicFile.CheckWritable(csvPath, force_);
            if (pngPath is not null)
                AtomicFile.CheckWritable(pngPath, force_);
            long total = count;
            var clock = Stopwatch.StartNew();
            SpectrumResult result = CliProgress.Run(stderr, "spectrum", total, report =>
                WelchEstimator.Estimate(source, settings, first, count, report)
            );
            clock.Stop();
            PowerSpectrum psd = r.GetValue(average) == "max" ? result.MaxHold : result.Mean;
            if (!(result.Mean.TotalPower() > 1e-30))
                throw CaptureException.ForFile(
                    source.Info.Path,
                    "holds only zero (or NaN and infinite) samples: there is no spectrum to estimate"
                );
            TextWriter summary = csvToStdout ? stderr : stdout;
            WriteSummary(summary, source.Info, psd, result, clock.Elapsed);
            foreach (string w in source.Info.Warnings)
                stderr.WriteLine($"signalinspect: warning: {Path.GetFileName(source.Info.Path)}: {w}");
            if (result.NonFiniteSegments > 0)
                stderr.WriteLine(
                    $"signalinspect: warning: {result.NonFiniteSegments} segment(s) held NaN or infinite samples, "
                        + "taken as 0"
                );
            if (csvToStdout)
            {
                var buffer = new MemoryStream();
                WriteCsv(buffer, psd);
                stdout.Write(System.Text.Encoding.UTF8.GetString(buffer.ToArray()));
                stdout.Flush();
            }
            else if (csvPath is not null)
            {
                AtomicFile.Write(csvPath, force_, s => WriteCsv(s, psd));
                stdout.WriteLine($"wrote {csvPath}");
            }
            if (pngPath is not null)
            {
                byte[] image = SpectrumPlot.RenderPng(psd, Path.GetFileName(source.Info.Path), absolute: true);
                AtomicFile.Write(pngPath, force_, s => s.Write(image));
                summary.WriteLine($"wrote {pngPath}");
            }
            return ExitCodes.Success;
        });
        return cmd;
    }

    internal static void WriteCsv(Stream stream, PowerSpectrum psd)
    {
        using var w = new StreamWriter(stream, new UTF8Encoding(false), 1 << 16);
        w.NewLine = "\n";
        w.WriteLine(psd.Settings.CalibrationDb != 0 ? "frequencyHz,psdDbmPerHz" : "frequencyHz,psdDbfsPerHz");
        for (int i = 0; i < psd.Count; i++)
            w.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{psd.FrequenciesHz[i]:R},{psd.Db(i):R}"));
    }

    private static void WriteSummary(
        TextWriter o,
        CaptureInfo info,
        PowerSpectrum psd,
        SpectrumResult result,
        TimeSpan elapsed
    )
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        int peak = psd.PeakIndex();
        string unit = psd.Settings.CalibrationDb != 0 ? "dBm" : "dBFS";
        void Row(string k, string v) => o.WriteLine($"{k,-19}{v}");
        Row("file", info.Path);
        Row(
            "spectrum",
            (psd.IsOneSided ? "one-sided (real input)" : "two-sided (IQ input), offsets from the centre")
                + string.Create(c, $", {psd.Averaging.ToString().ToLowerInvariant()} of {psd.Segments} segments")
        );
        Row(
            "window",
            string.Create(
                c,
                $"{psd.Window.Name}, FFT {psd.Settings.FftSize}, overlap {psd.Settings.OverlapSamples} samples "
                    + $"({100.0 * psd.Settings.OverlapSamples / psd.Settings.FftSize:0.#} %)"
            )
        );
        Row(
            "RBW",
            string.Create(
                c,
                $"{psd.RbwHz:0.###} Hz (ENBW {psd.Window.EnbwBins:0.####} bins x bin width {psd.BinWidthHz:0.###} Hz)"
            )
        );
        Row(
            "analysed",
            string.Create(
                c,
                $"{result.SamplesAnalysed} samples from sample {result.FirstSample} "
                    + $"({result.SamplesAnalysed / info.SampleRateHz:0.######} s)"
            )
        );
        Row(
            "peak",
            string.Create(c, $"{psd.Db(peak):0.00} {unit}/Hz at {psd.FrequenciesHz[peak]:0.###} Hz")
                + (
                    psd.CenterFrequencyHz is { } cf
                        ? string.Create(c, $" ({(cf + psd.FrequenciesHz[peak]) / 1e6:0.######} MHz)")
                        : string.Empty
                )
        );
        Row(
            "total power",
            string.Create(c, $"{10 * Math.Log10(psd.TotalPower()) + psd.Settings.CalibrationDb:0.00} {unit}")
        );
        if (result.DcBinsSuppressed > 0)
            Row("DC spike", $"{result.DcBinsSuppressed} bins around 0 Hz replaced by interpolation (--suppress-dc)");
        if (psd.Settings.CalibrationDb != 0)
            Row("calibration", string.Create(c, $"{psd.Settings.CalibrationDb:+0.##;-0.##} dB added: levels in dBm"));
        Row(
            "time",
            string.Create(
                c,
                $"{elapsed.TotalSeconds:0.###} s, "
                    + $"{result.SamplesAnalysed / Math.Max(elapsed.TotalSeconds, 1e-9) / 1e6:0.#} MS/s on "
                    + $"{result.Threads} thread(s)"
            )
        );
    }
}
