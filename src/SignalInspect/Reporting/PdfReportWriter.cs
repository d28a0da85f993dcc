using System.Globalization;
using PdfSharp.Drawing;
using PdfSharp.Fonts;
using PdfSharp.Pdf;
using SignalInspect.Compliance;
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
    private const double Margin = 46;
    private const double Dpi = 300;
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
        var ctx = new Layout(doc, report.Paper);
        FirstPage(ctx, report);
        PlotPage(ctx, report);
        MethodPage(ctx, report);
        ctx.Finish(report);
        doc.Save(output, closeStream: false);
    }

    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    private static string Hz(double? v) =>
        v is { } x ? x.ToString(Math.Abs(x) >= 1e6 ? "#,0.###" : "0.###", C) + " Hz" : "unknown";

    private static void FirstPage(Layout l, MeasurementReport r)
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
            ("Date", r.Created.UtcDateTime.ToString("yyyy-MM-dd HH:mm 'UTC'", C)),
            ("Operator", r.Operator ?? "not given"),
            ("Equipment under test", r.Equipment ?? "not given"),
            (
                "Capture file",
                Path.GetFileName(info.Path)
                    + (info.DataPath is { } dp && dp != info.Path ? $" (data: {Path.GetFileName(dp)})" : string.Empty)
            ),
            ("File size", info.FileSizeBytes.ToString("#,0", C) + " bytes"),
            ("SHA-256 (sample data)", a.Sha256),
            (
                "Format",
                $"{info.Container}, {info.Datatype}, {(info.IsComplex ? "complex I/Q" : "real")}, {info.ChannelUse}"
            ),
            ("Sample rate", Hz(info.SampleRateHz)),
            ("Centre frequency", Hz(info.CenterFrequencyHz)),
            (
                "Duration",
                string.Create(
                    C,
                    $"{info.DurationS:0.######} s ({info.SampleCount:#,0} samples); analysed {a.Window.Count / info.SampleRateHz:0.######} s from {a.Window.First / info.SampleRateHz:0.######} s"
                )
            ),
            (
                "Capture time",
                info.StartTime?.UtcDateTime.ToString("yyyy-MM-dd HH:mm:ss.fff 'UTC'", C) ?? "not stated in the file"
            ),
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
                $"U: expanded uncertainty, k = {r.Profile?.CoverageFactor ?? 2:0.#}. Margin: limit minus value (positive = inside the limit). Decision rule: see Method."
            ),
            l.Small,
            XBrushes.DimGray
        );
        if (a.Warnings.Count > 0)
        {
            l.Gap(8);
            l.Text("Warnings", l.H2, XBrushes.DarkRed);
            foreach (string w in a.Warnings)
                l.Text("- " + w, l.Body);
        }
        l.Gap(8);
        l.Text(
            "Cautions: RF exposure, receiver protection and licensing, and the standing of these results, are on the last page.",
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
            string u =
                row.ExpandedUncertainty is { } x ? F(x, "0.###")
                : row.Text is not null && row.Unit.Length == 0 ? ""
                : "-";
            string last =
                row.Verdict is { } v ? v.ToString().ToUpperInvariant()
                : row.Text is not null ? row.Note ?? "-"
                : "-";
            cells.Add([
                row.Quantity,
                row.Verdict is null ? row.ValueText : F(row.Value ?? double.NaN, "0.###"),
                row.Unit,
                u,
                row.LimitText ?? "-",
                row.Margin is { } m ? F(m, "+0.##;-0.##") : "-",
                last,
            ]);
        }
        return cells;
    }

    private static void PlotPage(Layout l, MeasurementReport r)
    {
        AnalysisResult a = r.Analysis;
        l.NewPage();
        l.Text("Plots", l.H2);
        double w = l.ContentWidth;
        var psd = a.Spectrum.Mean;
        bool abs = FrequencyAxis.Of(a.Capture).IsAbsolute;
        double shift = abs ? a.Capture.CenterFrequencyHz!.Value : 0;
        var lines = new List<(double, string)>
        {
            (a.Bandwidth.LowerEdgeHz + shift, $"OBW {100 * (1 - a.Bandwidth.Beta):0.#} % edges"),
            (a.Bandwidth.UpperEdgeHz + shift, ""),
        };
        IReadOnlyList<(double, double)>? limit = null;
        string limitLabel = "limit";
        if (r.Profile?.Mask is { } mask && a.Carrier is { } car)
        {
            double total = 10 * Math.Log10(psd.TotalPower());
            double carrierAxis = car.FrequencyHz.Value - shift;
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
            "Spectrum (" + psd.Window.Name + ", RBW " + psd.RbwHz.ToString("0.##", C) + " Hz)",
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
            if (a.TrendHigh.Count > 1)
            {
                byte[] trend = TimePlots.SeriesPng(
                    a.TrendHigh,
                    (unit.StartsWith("env") ? "Envelope" : "Deviation") + " against time (highest and lowest per 5 ms)",
                    unit,
                    Px(w),
                    Px(hWave),
                    Dpi / 96,
                    levels,
                    a.TrendLow
                );
                l.Image(trend, w, hWave);
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
    }

    private static int Px(double pt) => (int)Math.Round(pt / 72 * Dpi);

    private static void MethodPage(Layout l, MeasurementReport r)
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
                $"{info.Container}; datatype {info.Datatype}; {info.ChannelUse}; full scale = amplitude 1.0; checksum {info.ChecksumStatus}"
            ),
            (
                "Spectrum",
                string.Create(
                    C,
                    $"Welch's method, {psd(a).Window.Name} window (periodic), FFT {m.Spectrum.FftSize}, overlap {100.0 * m.Spectrum.OverlapSamples / m.Spectrum.FftSize:0.#} %, {a.Spectrum.Mean.Segments} segments averaged (mean; max-hold for the mask), no detrending, density scaling; RBW {m.RbwHz:0.###} Hz (window ENBW){(a.Spectrum.DcBinsSuppressed > 0 ? $"; {a.Spectrum.DcBinsSuppressed} bins around 0 Hz interpolated (DC spike)" : string.Empty)}"
                )
            ),
            (
                "Occupied bandwidth",
                $"beta-% method, ITU Radio Regulations No. 1.153, ITU-R SM.328 and SM.443 Annex 1; noise floor {(m.ObwNoise == NoiseFloorTreatment.Subtract ? "subtracted (10th percentile of the PSD bins)" : "kept")}"
            ),
            (
                "x-dB bandwidth",
                string.Create(C, $"ITU-R SM.443 Annex 2, x = {a.Bandwidth.Xdb:0.#} dB below the maximum of the PSD")
            ),
            ("Channel filter", m.ChannelFilter),
            (
                "Demodulation",
                string.Create(
                    C,
                    $"at {m.DemodRateHz:0.###} Hz: envelope |z|, unwrapped phase, instantaneous frequency from phase differences; post-detection low-pass {m.PostLowPassHz:0.#} Hz{(m.PostHighPassHz is { } hp ? $", high-pass {hp:0.#} Hz" : string.Empty)}{(m.DeEmphasisUs is { } de ? $", de-emphasis {de:0.#} us" : string.Empty)}"
                )
            ),
            ("Peaks", m.PeakStatistic),
            ("Carrier", a.Carrier is { } c ? $"{c.Method}; offset from {c.OffsetReference}" : "no carrier (noise)"),
            (
                "Classification",
                a.Classification.Reason + string.Create(C, $" (SNR in the occupied bandwidth {a.ChannelSnrDb:0.#} dB)")
            ),
            (
                "Emission designator",
                "necessary bandwidth from the measured values by 47 CFR 2.202 / ITU Radio Regulations Appendix 1; code by 47 CFR 2.202(b)(3)"
            ),
            (
                "Uncertainty",
                "standard uncertainties: carrier from the least-squares fit (statistical); deviation, depth, phase and shift type-B from validation against synthesised signals, growing below 30 dB SNR; bandwidths from the resolution bandwidth; expanded with the coverage factor shown. Not included: the recorder's calibration and frequency reference."
            ),
            ("Decision rule", Judgement.DecisionRule),
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
        if (r.Notes is { } notes)
            items.Add(("Notes", notes));
        if (r.CommandLine is { } cmd)
            items.Add(("Command", cmd));
        l.KeyValueTable(items, keyWidth: 105);
        l.Gap(10);
        l.Text("Cautions", l.H2);
        foreach (string caution in MeasurementReport.Cautions)
            l.Text("- " + caution, l.Body);
        l.Gap(6);
        l.Text("Standing of these results", l.H2);
        l.Text(MeasurementReport.Disclaimer, l.Body);
        static Spectrum.PowerSpectrum psd(AnalysisResult x) => x.Spectrum.Mean;
    }

    /// <summary>A cursor over pages with the house fonts, wrapping text and simple tables.</summary>
    internal sealed class Layout
    {
        private readonly PdfDocument _doc;
        private readonly PaperSize _paper;
        private XGraphics? _g;
        private double _y;

        public Layout(PdfDocument doc, PaperSize paper)
        {
            _doc = doc;
            _paper = paper;
            H1 = new XFont("SI", 17, XFontStyleEx.Bold);
            H2 = new XFont("SI", 11.5, XFontStyleEx.Bold);
            Body = new XFont("SI", 8.6, XFontStyleEx.Regular);
            Bold = new XFont("SI", 8.6, XFontStyleEx.Bold);
            Small = new XFont("SI", 7.2, XFontStyleEx.Regular);
        }

        public XFont H1 { get; }
        public XFont H2 { get; }
        public XFont Body { get; }
        public XFont Bold { get; }
        public XFont Small { get; }
        private double PageWidth => _paper == PaperSize.A4 ? 595.28 : 612;
        private double PageHeight => _paper == PaperSize.A4 ? 841.89 : 792;
        public double ContentWidth => PageWidth - 2 * Margin;
        private double Bottom => PageHeight - Margin - 18;

        public void NewPage()
        {
            _g?.Dispose();
            PdfPage page = _doc.AddPage();
            page.Width = XUnit.FromPoint(PageWidth);
            page.Height = XUnit.FromPoint(PageHeight);
            _g = XGraphics.FromPdfPage(page);
            _y = Margin;
        }

        private void Need(double h)
        {
            if (_y + h > Bottom)
                NewPage();
        }

        public void Gap(double h) => _y += h;

        private List<string> Wrap(string text, XFont font, double width)
        {
            var lines = new List<string>();
            foreach (string para in text.Split('\n'))
            {
                string line = string.Empty;
                foreach (string word in para.Split(' '))
                {
                    string candidate = line.Length == 0 ? word : line + " " + word;
                    if (_g!.MeasureString(candidate, font).Width <= width || line.Length == 0)
                    {
                        // A single word wider than the column (a hash) is cut where it must be.
                        if (line.Length == 0 && _g.MeasureString(candidate, font).Width > width)
                        {
                            string rest = candidate;
                            while (_g.MeasureString(rest, font).Width > width)
                            {
                                int cut = rest.Length - 1;
                                while (cut > 1 && _g.MeasureString(rest[..cut], font).Width > width)
                                    cut--;
                                lines.Add(rest[..cut]);
                                rest = rest[cut..];
                            }
                            line = rest;
                        }
                        else
                            line = candidate;
                    }
                    else
                    {
                        lines.Add(line);
                        line = word;
                    }
                }
                lines.Add(line);
            }
            return lines;
        }

        private double LineHeight(XFont f) => f.Size * 1.32;

        public void Text(string text, XFont font, XBrush? brush = null)
        {
            foreach (string line in Wrap(text, font, ContentWidth))
            {
                Need(LineHeight(font));
                _g!.DrawString(
                    line,
                    font,
                    brush ?? XBrushes.Black,
                    new XRect(Margin, _y, ContentWidth, LineHeight(font)),
                    XStringFormats.TopLeft
                );
                _y += LineHeight(font);
            }
        }

        public void VerdictBanner(Verdict? v, string? profile)
        {
            Need(30);
            (XColor colour, string word) = v switch
            {
                Verdict.Pass => (XColor.FromArgb(46, 125, 50), "PASS"),
                Verdict.Fail => (XColor.FromArgb(192, 0, 0), "FAIL"),
                Verdict.Inconclusive => (XColor.FromArgb(191, 120, 0), "INCONCLUSIVE"),
                _ => (XColor.FromArgb(110, 110, 110), "NO LIMITS APPLIED"),
            };
            var rect = new XRect(Margin, _y, ContentWidth, 26);
            _g!.DrawRectangle(new XSolidBrush(colour), rect);
            string text = v is null ? word : $"Overall verdict: {word}";
            _g.DrawString(
                text,
                H2,
                XBrushes.White,
                new XRect(Margin + 8, _y, ContentWidth - 16, 26),
                XStringFormats.CenterLeft
            );
            _y += 28;
            if (profile is not null)
                Text("against the limit profile: " + profile, Body, XBrushes.DimGray);
        }

        public void KeyValueTable(IReadOnlyList<(string Key, string Value)> rows, double keyWidth = 120)
        {
            double valueWidth = ContentWidth - keyWidth - 6;
            foreach (var (key, value) in rows)
            {
                XFont vf = value.Length == 64 && value.All(Uri.IsHexDigit) ? Small : Body;
                var lines = Wrap(value, vf, valueWidth);
                double h = Math.Max(1, lines.Count) * LineHeight(vf) + 2;
                Need(h);
                _g!.DrawLine(
                    new XPen(XColor.FromArgb(225, 225, 225), 0.5),
                    Margin,
                    _y + h,
                    Margin + ContentWidth,
                    _y + h
                );
                _g.DrawString(
                    key,
                    Bold,
                    XBrushes.Black,
                    new XRect(Margin, _y + 1, keyWidth, LineHeight(Body)),
                    XStringFormats.TopLeft
                );
                double y = _y + 1;
                foreach (string line in lines)
                {
                    _g.DrawString(
                        line,
                        vf,
                        XBrushes.Black,
                        new XRect(Margin + keyWidth + 6, y, valueWidth, LineHeight(vf)),
                        XStringFormats.TopLeft
                    );
                    y += LineHeight(vf);
                }
                _y += h;
            }
        }

        public void ResultsTable(IReadOnlyList<string[]> rows)
        {
            string[] head = ["Measurement", "Value", "Unit", "U", "Limit", "Margin", "Verdict"];
            double[] frac = [0.25, 0.13, 0.07, 0.08, 0.19, 0.11, 0.17];
            double[] widths = [.. frac.Select(f => f * ContentWidth)];
            void Row(string[] cells, XFont font, XBrush? fill, bool verdictColours)
            {
                var wrapped = cells.Select((c, i) => Wrap(c, font, widths[i] - 6)).ToArray();
                double h = wrapped.Max(w => w.Count) * LineHeight(font) + 4;
                Need(h);
                if (fill is not null)
                    _g!.DrawRectangle(fill, new XRect(Margin, _y, ContentWidth, h));
                double x = Margin;
                for (int i = 0; i < cells.Length; i++)
                {
                    XBrush brush = XBrushes.Black;
                    XFont f = font;
                    if (verdictColours && i == cells.Length - 1)
                    {
                        (brush, f) = cells[i] switch
                        {
                            "PASS" => (new XSolidBrush(XColor.FromArgb(46, 125, 50)), Bold),
                            "FAIL" => (new XSolidBrush(XColor.FromArgb(192, 0, 0)), Bold),
                            "INCONCLUSIVE" => (new XSolidBrush(XColor.FromArgb(191, 120, 0)), Bold),
                            _ => (XBrushes.Black, font),
                        };
                    }
                    double y = _y + 2;
                    foreach (string line in wrapped[i])
                    {
                        _g!.DrawString(
                            line,
                            f,
                            brush,
                            new XRect(x + 3, y, widths[i] - 6, LineHeight(font)),
                            XStringFormats.TopLeft
                        );
                        y += LineHeight(font);
                    }
                    x += widths[i];
                }
                _y += h;
                _g!.DrawLine(new XPen(XColor.FromArgb(210, 210, 210), 0.5), Margin, _y, Margin + ContentWidth, _y);
            }
            Row(head, Bold, new XSolidBrush(XColor.FromArgb(232, 238, 245)), false);
            foreach (string[] r in rows)
                Row(r, Body, null, true);
        }

        /// <summary>A table whose first column is a small image (a spectrum thumbnail); the last column coloured by
        /// verdict.</summary>
        public void ThumbnailTable(
            string[] head,
            double[] frac,
            IReadOnlyList<(byte[]? Png, string[] Cells)> rows,
            double thumbHeight
        )
        {
            double[] widths = [.. frac.Select(f => f * ContentWidth)];
            double headH = LineHeight(Bold) + 4;
            void Head()
            {
                Need(headH);
                _g!.DrawRectangle(
                    new XSolidBrush(XColor.FromArgb(232, 238, 245)),
                    new XRect(Margin, _y, ContentWidth, headH)
                );
                double hx = Margin;
                for (int i = 0; i < head.Length; i++)
                {
                    _g.DrawString(
                        head[i],
                        Bold,
                        XBrushes.Black,
                        new XRect(hx + 3, _y + 2, widths[i] - 6, headH),
                        XStringFormats.TopLeft
                    );
                    hx += widths[i];
                }
                _y += headH;
            }
            Head();
            foreach (var (png, cells) in rows)
            {
                var wrapped = cells
                    .Select((c, i) => Wrap(c, i == cells.Length - 1 ? Bold : Small, widths[i + 1] - 6))
                    .ToArray();
                double h = Math.Max(thumbHeight + 4, wrapped.Max(w => w.Count) * LineHeight(Small) + 4);
                if (_y + h > Bottom)
                {
                    NewPage();
                    Head();
                }
                if (png is not null)
                {
                    using var ms = new MemoryStream(png);
                    using XImage img = XImage.FromStream(ms);
                    _g!.DrawImage(img, Margin + 2, _y + 2, widths[0] - 4, thumbHeight);
                }
                double x = Margin + widths[0];
                for (int i = 0; i < cells.Length; i++)
                {
                    bool last = i == cells.Length - 1;
                    XBrush brush = last
                        ? cells[i] switch
                        {
                            "FAIL" or "ERROR" => new XSolidBrush(XColor.FromArgb(192, 0, 0)),
                            "PASS" => new XSolidBrush(XColor.FromArgb(46, 125, 50)),
                            "INCONCLUSIVE" => new XSolidBrush(XColor.FromArgb(191, 120, 0)),
                            _ => XBrushes.Black,
                        }
                        : XBrushes.Black;
                    double y = _y + 2;
                    foreach (string line in wrapped[i])
                    {
                        _g!.DrawString(
                            line,
                            last ? Bold : Small,
                            brush,
                            new XRect(x + 3, y, widths[i + 1] - 6, LineHeight(Small)),
                            XStringFormats.TopLeft
                        );
                        y += LineHeight(Small);
                    }
                    x += widths[i + 1];
                }
                _y += h;
                _g!.DrawLine(new XPen(XColor.FromArgb(210, 210, 210), 0.5), Margin, _y, Margin + ContentWidth, _y);
            }
        }

        public void Image(byte[] png, double width, double height)
        {
            Need(height);
            using var ms = new MemoryStream(png);
            using XImage img = XImage.FromStream(ms);
            _g!.DrawImage(img, Margin, _y, width, height);
            _y += height;
        }

        public void Finish(MeasurementReport r) => Finish(r.ReportId);

        public void Finish(string id)
        {
            _g?.Dispose();
            _g = null;
            int n = _doc.PageCount;
            for (int i = 0; i < n; i++)
            {
                using XGraphics g = XGraphics.FromPdfPage(_doc.Pages[i], XGraphicsPdfPageOptions.Append);
                string left =
                    $"SignalInspect {AnalysisJson.Version}  |  {id}  |  informative results, see the last page";
                g.DrawString(
                    left,
                    Small,
                    XBrushes.DimGray,
                    new XRect(Margin, PageHeight - Margin + 4, ContentWidth, 10),
                    XStringFormats.TopLeft
                );
                g.DrawString(
                    $"page {i + 1} of {n}",
                    Small,
                    XBrushes.DimGray,
                    new XRect(Margin, PageHeight - Margin + 4, ContentWidth, 10),
                    XStringFormats.TopRight
                );
            }
        }
    }
}
