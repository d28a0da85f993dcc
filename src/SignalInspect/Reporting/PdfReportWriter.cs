using System.Globalization;
using PdfSharp.Drawing;
using PdfSharp.Fonts;
using PdfSharp.Pdf;
using SignalInspect.Compliance;
using SignalInspect.Diagnostics;
using SignalInspect.Measure;
using SignalInspect.Reporting.Plots;
using SignalInspect.Spectrum;

namespace SignalInspect.Reporting;

/// <summary>
/// Renders a <see cref="MeasurementReport"/> as PDF (PDFsharp): title block, summary table with
/// verdicts, plots (spectrum with occupied-bandwidth edges and mask, spectrogram, demodulated
/// signal), method, cautions and disclaimer; page numbers; embedded TrueType font, selectable text;
/// plots as 300 dpi images.
/// </summary>
public static class PdfReportWriter
{
    internal const double Dpi = 300;
    private static readonly object FontGate = new();
    private static bool _fontsReady;

    private sealed class FontResolver(string regular, string bold) : IFontResolver
    {
        public FontResolverInfo ResolveTypeface(string familyName, bool isBold, bool isItalic) =>
            new(isBold ? "si-bold" : "si-regular");

        public byte[] GetFont(string faceName) => File.ReadAllBytes(faceName == "si-bold" ? bold : regular);
    }

    internal static void EnsureFonts()
    {
        lock (FontGate)
        {
            if (_fontsReady)
                return;
            var (regular, bold, _) = FontLocator.Require();
            GlobalFontSettings.FontResolver = new FontResolver(regular, bold);
            _fontsReady = true;
        }
    }

    /// <summary>Writes the PDF to a stream.</summary>
    public static void Write(MeasurementReport report, Stream output)
    {
        EnsureFonts();
        var doc = new PdfDocument();
        doc.Info.Title = report.Title;
        doc.Info.Subject = "Measurement report " + report.ReportId;
        doc.Info.Creator = "SignalInspect " + AnalysisJson.Version;
        var ctx = new PdfLayout(doc, report.Header.Paper);
        FirstPage(ctx, report);
        PlotPage(ctx, report);
        MethodPage(ctx, report);
        ctx.Finish(report);
        doc.Save(output, closeStream: false);
    }

    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>A frequency as the report writes every number: no thousands separator (one convention throughout;
    /// ISO 80000-1 allows only a thin space between groups, never a comma), a point for the decimals.</summary>
    private static string Hz(double? v) => v is { } x ? x.ToString("0.###", C) + " Hz" : "unknown";

    /// <summary>Who made the recording and where (SigMF core:author, core:geolocation).</summary>
    private static string RecordedBy(Capture.CaptureInfo info) =>
        string.Join("; ", new[] { info.Author, info.Location }.Where(x => x is not null).Select(SafeText.ForTerminal))
            is { Length: > 0 } text
            ? text
            : "not stated in the file";

    private static void FirstPage(PdfLayout l, MeasurementReport r)
    {
        AnalysisResult a = r.Analysis;
        l.NewPage();
        l.Text(r.Title, l.H1);
        l.Gap(2);
        l.Text("Radio measurement report", l.Body, XBrushes.DimGray);
        l.Gap(6);
        l.VerdictBanner(r.Overall, r.Profile?.Name);
        l.Gap(8);
        l.Text("Identification", l.H2);
        var info = a.Capture;
        var block = new List<(string, string)>
        {
            ("Report ID", r.ReportId),
            ("Software", $"SignalInspect {AnalysisJson.Version}, commit {AnalysisJson.Commit}"),
            ("Date", r.Created.UtcDateTime.ToString("yyyy-MM-dd HH:mm 'UTC'", C)),
            ("Operator", r.Header.Operator ?? "not given"),
            ("Equipment under test", r.Header.Equipment ?? "not given"),
            (
                "Capture file",
                Path.GetFileName(info.Path)
                    + (info.DataPath is { } dp && dp != info.Path ? $" (data: {Path.GetFileName(dp)})" : string.Empty)
            ),
            ("File size", info.FileSizeBytes.ToString("0", C) + " bytes"),
            ("SHA-256 (sample data)", a.Sha256),
            (
                "Format",
                $"{info.Container}, {info.Datatype}, {(info.IsComplex ? "complex I/Q" : "real")}, {info.ChannelUse}"
            ),
            (
                "Receiver (from the file)",
                string.Join(
                    "; ",
                    new[] { info.Hardware, info.Recorder is { } rec ? "recorded by " + rec : null }
                        .Where(x => !string.IsNullOrEmpty(x))
                        .Select(SafeText.ForTerminal)
                )
                    is { Length: > 0 } hw
                    ? hw
                    : "not stated in the file"
            ),
            ("Recorded by", RecordedBy(info)),
            ("Sample rate", Hz(info.SampleRateHz)),
            ("Centre frequency", Hz(info.CenterFrequencyHz)),
            (
                "Duration",
                string.Create(
                    C,
                    $"{info.DurationS:0.######} s ({info.SampleCount} samples); analysed "
                        + $"{a.Window.Count / info.SampleRateHz:0.######} s from "
                        + $"{a.Window.First / info.SampleRateHz:0.######} s"
                )
            ),
            (
                "Capture time",
                info.StartTime?.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss.fff 'UTC'", C) ?? "not stated in the file"
            ),
            ("Frequency reference", a.FrequencyReference?.Text ?? FrequencyReference.NotCorrected),
            (
                "Level calibration",
                a.Spectrum.Mean.Settings.CalibrationDb is { } cal and not 0
                    ? string.Create(C, $"{cal:+0.###;-0.###} dB applied to levels (dBFS to dBm, as given)")
                    : "none: levels in dBFS"
            ),
            ("Test conditions", r.Header.Conditions ?? "not given"),
            (
                "Limit profile",
                r.Profile is { } p
                    ? p.Name + (p.Source is { } s ? $" ({s})" : string.Empty)
                    : "none (measurements only, no verdicts)"
            ),
        };
        l.KeyValueTable(block);
        l.Gap(10);
        l.Text("Results", l.H2);
        l.ResultsTable(Rows(r));
        l.Gap(4);
        l.Text(
            string.Create(
                C,
                $"U: expanded uncertainty, k = {r.Profile?.CoverageFactor ?? 2:0.#}. Margin: limit minus value "
            ) + "(positive = inside the limit). Decision rule: see Method.",
            l.Small,
            XBrushes.DimGray
        );
        IReadOnlyList<string> transmissions = ResultRows.Transmissions(a, r.Profile?.CoverageFactor ?? 2);
        if (transmissions.Count > 0)
        {
            l.Gap(8);
            l.Text("Transmissions (carrier-on intervals, from the capture's first sample)", l.H2);
            foreach (string t in transmissions)
                l.Text("- " + t, l.Body);
            foreach (string n in a.Notes)
                l.Text(n, l.Small, XBrushes.DimGray);
        }
        if (ResultRows.TimelineSummary(a, r.Profile?.CoverageFactor ?? 2) is { } timeline)
        {
            l.Gap(6);
            l.Text("Carrier against time: " + timeline, l.Body);
        }
        var located = r.Checks.Where(x => x.Where is not null).ToList();
        if (located.Count > 0)
        {
            l.Gap(8);
            l.Text("Where the deciding readings are", l.H2);
            foreach (LimitCheck x in located)
                l.Text($"- {x.Measurement}: {x.Verdict.Text()}, {x.Where}", l.Body);
        }
        var unproven = r.Checks.Where(x => x.Reason is not null).ToList();
        if (unproven.Count > 0)
        {
            l.Gap(8);
            l.Text("Limits not shown to be met", l.H2);
            foreach (LimitCheck x in unproven)
                l.Text($"- {x.Verdict.Text()}: {x.Measurement}: {x.Reason}", l.Body);
        }
        if (a.Warnings.Count > 0)
        {
            l.Gap(8);
            l.Text("Warnings", l.H2, XBrushes.DarkRed);
            foreach (string w in a.Warnings)
                l.Text("- " + w, l.Body);
        }
        l.Gap(8);
        l.Text(
            "Cautions: RF exposure, receiver protection and licensing, and the standing of these results, are on the "
                + "last page.",
            l.Small,
            XBrushes.DimGray
        );
    }

    /// <summary>The results table's cells, one array per row of <see cref="ResultRows"/>.</summary>
    private static List<string[]> Rows(MeasurementReport r)
    {
        string F(double v, string f) => double.IsFinite(v) ? v.ToString(f, C) : "-";
        var cells = new List<string[]>();
        foreach (ResultRow row in ResultRows.For(r.Analysis, r.Checks, r.Profile?.CoverageFactor ?? 2))
        {
            // Value and U rounded together (U to two significant digits, the value to the same place).
            var (value, rounded) = row.Rounded;
            string u =
                row.ExpandedUncertainty is not null ? rounded
                : row.Text is not null && row.Unit.Length == 0 ? ""
                : "-";
            // A text row's note goes with its value; with no unit, limit or verdict it spans the columns left.
            string last = row.Verdict is { } v ? v.Text() : "-";
            if (row.Text is not null && row.Unit.Length == 0 && row.Verdict is null && row.LimitText is null)
                cells.Add([row.Quantity, row.Note is { } n ? $"{value} ({n})" : value]);
            else
                cells.Add([
                    row.Quantity,
                    row.Text is not null && row.Note is { } note ? $"{value} ({note})"
                    : row.Verdict is null || row.ExpandedUncertainty is { } ue && double.IsFinite(ue) && ue > 0 ? value
                    : F(row.Value ?? double.NaN, "0.###"),
                    row.Unit,
                    u,
                    row.LimitText ?? "-",
                    row.Margin is { } m ? F(m, "+0.##;-0.##") : "-",
                    last,
                ]);
        }
        return cells;
    }

    private static void PlotPage(PdfLayout l, MeasurementReport r)
    {
        AnalysisResult a = r.Analysis;
        l.NewPage();
        l.Text("Plots", l.H2);
        double w = l.ContentWidth;
        var psd = a.Spectrum.Mean;
        bool abs = FrequencyAxis.Of(a.Capture).IsAbsolute;
        double shift = abs ? a.Capture.CenterFrequencyHz!.Value : 0;
        // Discriminator audio: its spectrum is the demodulated audio's, with no RF occupied band to mark.
        var lines = a.DiscriminatorHzPerFullScale is null
            ? new List<(double, string)>
            {
                (a.Bandwidth.LowerEdgeHz + shift, $"OBW {100 * (1 - a.Bandwidth.Beta):0.#} % edges"),
                (a.Bandwidth.UpperEdgeHz + shift, ""),
            }
            : [];
        IReadOnlyList<(double, double)>? limit = null;
        string limitLabel = "limit";
        if (r.Profile?.Mask is { } mask && a.Carrier is { } car)
        {
            double total = 10 * Math.Log10(psd.TotalPower());
            double carrierAxis = a.CarrierAxisHz ?? car.FrequencyHz.Value - shift;
            var pts = new List<(double, double)>();
            for (int i = 0; i < psd.Count; i += Math.Max(1, psd.Count / 800))
            {
                double fd = psd.FrequenciesHz[i] - carrierAxis;
                pts.Add(
                    (
                        psd.FrequenciesHz[i] + shift,
                        total
                            - mask.RequiredAttenuationDb(fd)
                            - 10 * Math.Log10(mask.ReferenceBandwidthHz)
                            + psd.Settings.CalibrationDb
                    )
                );
            }
            limit = pts;
            limitLabel = mask.Name + " (as PSD)";
        }
        double hSpec = 210;
        byte[] spec = SpectrumPlot.RenderPng(
            a.Spectrum.MaxHold is { } hold && limit is not null ? hold : psd,
            (a.DiscriminatorHzPerFullScale is null ? "Spectrum (" : "Discriminator audio spectrum (")
                + psd.Window.Name
                + ", RBW "
                + psd.RbwHz.ToString("0.##", C)
                + " Hz"
                + (a.FrequencyReference is not null ? "; frequencies as the receiver read them, uncorrected" : "")
                + ")",
            Px(w),
            Px(hSpec),
            Dpi / 96,
            new SpectrumPlot.Marks
            {
                Lines = lines,
                Limit = limit,
                LimitLabel = limitLabel,
            },
            absolute: true
        );
        l.Image(spec, w, hSpec);
        l.Gap(6);
        double hGram = 165;
        Spectrum.Spectrogram map = a.Spectrum.Spectrogram
            ?? throw new ArgumentException(
                "the analysis was made without its spectrogram (AnalysisOptions.KeepSpectrogram off): a report needs it"
            );
        byte[] gram = TimePlots.SpectrogramPng(
            map,
            a.Capture.IsComplex ? a.Capture.CenterFrequencyHz : null,
            $"Spectrogram ({map.Rows} rows)",
            Px(w),
            Px(hGram),
            Dpi / 96
        );
        l.Image(gram, w, hGram);
        l.Gap(6);
        if (a.Audio is { Spectrum.Count: > 1 } au)
        {
            var marks = new List<(double, string)>();
            if (au.ToneHz is { } f0)
                for (int k = 1; k <= 10 && k * f0 <= au.Spectrum[^1].Hz; k++)
                    marks.Add((k * f0, k == 1 ? "tone" : k.ToString(C)));
            if (au.SubAudible is { } sub)
                marks.Add((sub.FrequencyHz.Value, "sub-audible"));
            string unit = a.Am is not null ? "dB (FS^2)" : "dB (Hz^2)";
            byte[] audio = AudioSpectrumPlot.Png(
                au.Spectrum,
                marks,
                "Demodulated audio (the tone's harmonics and a sub-audible tone marked)",
                unit,
                Px(w),
                Px(150),
                Dpi / 96
            );
            l.Image(audio, w, 150);
            l.Gap(6);
        }
        if (a.Response is { } resp && resp.Points.Count(p => p.ResponseDb is not null) >= 2)
        {
            LimitProfile? pr = r.Profile;
            byte[] png = ResponsePlot.Png(
                resp,
                pr is { ResponseAboveDb: { } up, ResponseBelowDb: { } down } ? (up, down) : null,
                pr?.ResponseFlat ?? false,
                pr?.CoverageFactor ?? 2,
                Px(w),
                Px(150),
                Dpi / 96
            );
            l.Image(png, w, 150);
            l.Gap(6);
        }
        if (a.Waveform.Count > 1)
        {
            double hWave = 135;
            var levels = new List<(double, string)>();
            if (a.Fm is { } fm && r.Profile?.MaxPeakDeviationHz is { } md)
            {
                levels.Add((md, "deviation limit"));
                levels.Add((-md, ""));
            }
            string unit = a.WaveformLabel.StartsWith("envelope", StringComparison.Ordinal)
                ? "envelope (FS)"
                : "deviation (Hz)";
            var shaded = a.Transmissions.Select(t => (t.StartS, t.EndS)).ToList();
            if (a.TrendHigh.Count > 1)
            {
                byte[] trend = TimePlots.SeriesPng(
                    a.TrendHigh,
                    (unit.StartsWith("env") ? "Envelope" : "Deviation")
                        + string.Create(C, $" against time (max and min per {1000 * a.TrendStepS:0.#} ms)"),
                    unit,
                    Px(w),
                    Px(hWave),
                    Dpi / 96,
                    levels,
                    a.TrendLow,
                    seconds: true,
                    shaded: shaded
                );
                l.Image(trend, w, hWave);
                if (shaded.Count > 0)
                    l.Text(
                        "Shaded: the transmissions found (carrier on). The figures and plots are those of the window "
                            + "analysed (see Identification).",
                        l.Small,
                        XBrushes.DimGray
                    );
                l.Gap(6);
            }
            if (a.Timeline is { Windows.Count: > 1 } tl)
            {
                var band = new List<(double, string)>();
                if (r.Profile?.ToleranceHzAt(r.Profile.NominalFrequencyHz ?? a.Capture.CenterFrequencyHz) is { } tol)
                {
                    double centre =
                        a.Carrier!.OffsetHz
                        - (
                            r.Profile?.NominalFrequencyHz is { } nom && FrequencyAxis.Of(a.Capture).IsAbsolute
                                ? a.Carrier.FrequencyHz.Value - nom
                                : a.Carrier.OffsetHz
                        );
                    band.Add((centre + tol, "frequency tolerance"));
                    band.Add((centre - tol, ""));
                }
                byte[] carrier = TimePlots.SeriesPng(
                    [.. tl.Windows.Select(x => ((x.StartS + x.EndS) / 2, x.CarrierOffsetHz))],
                    string.Create(C, $"Carrier offset against time ({tl.WindowS:0.###} s windows)"),
                    "offset (Hz)",
                    Px(w),
                    Px(hWave),
                    Dpi / 96,
                    band,
                    seconds: true,
                    shaded: shaded
                );
                l.Image(carrier, w, hWave);
                l.Gap(6);
            }
            byte[] wave = TimePlots.SeriesPng(
                a.Waveform,
                "Demodulated waveform (start of the capture)",
                unit,
                Px(w),
                Px(hWave),
                Dpi / 96,
                levels
            );
            l.Image(wave, w, hWave);
        }
        KeyUpPlot(l, r, w);
    }

    /// <summary>The frequency at the first key-up the capture holds, with the profile's transient limits as boxes
    /// (about the assigned frequency: the profile's nominal, else the capture's centre).</summary>
    private static void KeyUpPlot(PdfLayout l, MeasurementReport r, double w)
    {
        AnalysisResult a = r.Analysis;
        int index = a.Transmissions.ToList().FindIndex(t => t.KeyUp is not null);
        if (index < 0)
            return;
        Transmission t = a.Transmissions[index];
        KeyTransient k = t.KeyUp!;
        AnalysisResult x = t.Result ?? a;
        double assigned =
            r.Profile?.NominalFrequencyHz is { } nom && FrequencyAxis.Of(a.Capture).IsAbsolute
                ? nom
                : x.Carrier!.FrequencyHz.Value - x.Carrier.OffsetHz;
        double settled = k.SettledHz - assigned;
        var boxes = new List<(double, double, double, string)>();
        if (r.Profile?.Transient is { } tl)
        {
            boxes.Add((0, 1000 * tl.T1S, tl.T1MaxHz, "limits (t1, t2)"));
            boxes.Add((1000 * tl.T1S, 1000 * (tl.T1S + tl.T2S), tl.T2MaxHz, ""));
        }
        l.NewPage();
        l.Text("Frequency at key-up", l.H2);
        byte[] png = TimePlots.TransientPng(
            [.. k.Trace.Select(p => (1000 * p.T, settled + p.DfHz))],
            boxes,
            string.Create(C, $"Transmission {index + 1}, key-up at {k.InstantS:0.####} s (difference from ")
                + string.Create(C, $"{assigned:0.###} Hz)"),
            Px(w),
            Px(200),
            Dpi / 96
        );
        l.Image(png, w, 200);
        l.Gap(4);
        l.Text(
            string.Create(C, $"Peak {k.PeakExcursionHz:+0;-0} Hz from the settled carrier at {1000 * k.PeakAtS:0.##} ")
                + string.Create(C, $"ms; within {k.SettleBandHz:0} Hz after {1000 * k.SettlingS:0.#} ms. The trace ")
                + string.Create(C, $"shows +/-{k.VisibleHz / 1000:0.#} kHz about the carrier; readings start where ")
                + "the carrier has reached its full level.",
            l.Small,
            XBrushes.DimGray
        );
    }

    internal static int Px(double pt) => (int)Math.Round(pt / 72 * Dpi);

    private static void MethodPage(PdfLayout l, MeasurementReport r)
    {
        AnalysisResult a = r.Analysis;
        MethodRecord m = a.Method;
        l.NewPage();
        l.Text("Method", l.H2);
        var info = a.Capture;
        var items = new List<(string, string)>
        {
            (
                "Reader",
                $"{info.Container}; datatype {info.Datatype}; {info.ChannelUse}; full scale = amplitude 1.0; checksum "
                    + $"{info.ChecksumStatus}"
            ),
            (
                "Spectrum",
                string.Create(C, $"Welch's method, {psd(a).Window.Name} window (periodic), FFT {m.Spectrum.FftSize}, ")
                    + string.Create(C, $"overlap {100.0 * m.Spectrum.OverlapSamples / m.Spectrum.FftSize:0.#} %, ")
                    + string.Create(C, $"{a.Spectrum.Mean.Segments} segments averaged (mean; max-hold for the mask), ")
                    + string.Create(C, $"no detrending, density scaling; RBW {m.RbwHz:0.###} Hz (window ENBW)")
                    + (
                        a.Spectrum.DcBinsSuppressed > 0
                            ? $"; {a.Spectrum.DcBinsSuppressed} bins around 0 Hz interpolated (DC spike)"
                            : string.Empty
                    )
            ),
            (
                "Occupied bandwidth",
                "beta-% method, ITU Radio Regulations No. 1.153, ITU-R SM.328 and SM.443 Annex 1; noise floor "
                    + (
                        m.ObwNoise == NoiseFloorTreatment.Subtract
                            ? "subtracted (10th percentile of the PSD bins)"
                            : "kept"
                    )
            ),
            (
                "x-dB bandwidth",
                string.Create(C, $"ITU-R SM.443 Annex 2, x = {a.Bandwidth.Xdb:0.#} dB below the maximum of the PSD")
            ),
            ("Channel filter", m.ChannelFilter),
            (
                "Demodulation",
                string.Create(C, $"at {m.DemodRateHz:0.###} Hz: envelope |z|, unwrapped phase, ")
                    + "instantaneous frequency from phase differences; "
                    + string.Create(C, $"post-detection low-pass {m.PostLowPassHz:0.#} Hz")
                    + (m.PostHighPassHz is { } hp ? string.Create(C, $", high-pass {hp:0.#} Hz") : string.Empty)
                    + (m.DeEmphasisUs is { } de ? string.Create(C, $", de-emphasis {de:0.#} us") : string.Empty)
            ),
            ("Peaks", m.PeakStatistic),
            (
                "Carrier",
                a.Carrier is { } c
                    ? $"{c.Method}; offset from {c.OffsetReference}"
                    : $"no carrier ({a.Classification.Kind.Name()})"
            ),
            (
                "Classification",
                a.Classification.Reason + string.Create(C, $" (SNR in the occupied bandwidth {a.ChannelSnrDb:0.#} dB)")
            ),
            (
                "Emission designator",
                "necessary bandwidth from the measured values by 47 CFR 2.202 / ITU Radio Regulations Appendix 1; "
                    + "code by 47 CFR 2.202(b)(3)"
            ),
            (
                "Uncertainty",
                "standard uncertainties: carrier from the least-squares fit (statistical); deviation, depth, phase "
                    + "and shift type-B, their noise terms set by a Monte Carlo of synthesised signals at 20-60 dB SNR "
                    + "(U = 2u covered 91-98 % of trials; the project's docs/COVERAGE.md); occupied bandwidth from "
                    + "its edges' resolution (on a spectral line, the line's interpolation); expanded with the "
                    + "coverage factor shown. "
                    + (
                        a.FrequencyReference is { } fr
                            ? "The receiver's frequency reference: corrected, its uncertainty in the carrier's budget ("
                                + fr.Source
                                + "). "
                            : "Not included: the receiver's frequency reference (not corrected). "
                    )
                    + "Not included: the recorder's level calibration."
            ),
            ("Uncertainty budget", UncertaintyText.Budget(a)),
            ("Decision rule", Judgement.RuleText(r.Profile)),
        };
        if (r.Profile is { } p)
            items.Add(
                (
                    "Limits",
                    $"{p.Name}"
                        + (p.Source is { } s ? $"; {s}" : string.Empty)
                        + (r.ProfilePath is { } pp ? $"; file {Path.GetFileName(pp)}" : string.Empty)
                )
            );
        foreach (string n in info.Notes)
            items.Add(("Reader note", n));
        if (r.Header.Notes is { } notes)
            items.Add(("Notes", notes));
        if (r.Header.CommandLine is { } cmd)
            items.Add(("Command", cmd));
        l.KeyValueTable(items, keyWidth: 105);
        l.Gap(10);
        l.Text("Cautions", l.H2);
        foreach (string caution in MeasurementReport.Cautions)
            l.Text("- " + caution, l.Body);
        l.Gap(6);
        l.Text("Standing of these results", l.H2);
        l.Text(MeasurementReport.Disclaimer, l.Body);
        l.Gap(10);
        l.Text("Sign-off", l.H2);
        l.KeyValueTable(
            [
                ("Measured by", (r.Header.Operator ?? "") + "    signature ____________________    date ____________"),
                ("Checked by", "____________________    signature ____________________    date ____________"),
            ],
            keyWidth: 105
        );
        static Spectrum.PowerSpectrum psd(AnalysisResult x) => x.Spectrum.Mean;
    }
}
