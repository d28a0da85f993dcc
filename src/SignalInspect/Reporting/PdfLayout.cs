using PdfSharp.Drawing;
using PdfSharp.Pdf;
using SignalInspect.Compliance;

namespace SignalInspect.Reporting;

/// <summary>A cursor over pages with the house fonts, wrapping text and simple tables.</summary>
internal sealed class PdfLayout
{
    /// <summary>Page margin, points.</summary>
    public const double Margin = 46;

    private readonly PdfDocument _doc;
    private readonly PaperSize _paper;
    private XGraphics? _g;
    private double _y;

    public PdfLayout(PdfDocument doc, PaperSize paper)
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

    /// <summary>Starts a new page unless <paramref name="h"/> points fit on this one.</summary>
    public void Need(double h)
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
            Verdict.NotTested => (XColor.FromArgb(191, 120, 0), "NOT TESTED"),
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
            _g!.DrawLine(new XPen(XColor.FromArgb(225, 225, 225), 0.5), Margin, _y + h, Margin + ContentWidth, _y + h);
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

    public void ResultsTable(IReadOnlyList<string[]> rows) =>
        Table(
            ["Measurement", "Value", "Unit", "U", "Limit", "Margin", "Verdict"],
            [0.25, 0.13, 0.07, 0.08, 0.19, 0.11, 0.17],
            rows,
            verdicts: true
        );

    /// <summary>A table of text: a shaded head, then the rows, each column a share <paramref name="frac"/> of the
    /// width, cells wrapped (a row of fewer cells spans its last one over the columns left); with
    /// <paramref name="verdicts"/> the last column coloured by verdict.</summary>
    public void Table(string[] head, double[] frac, IReadOnlyList<string[]> rows, bool verdicts, XFont? font = null)
    {
        XFont body = font ?? Body;
        double[] widths = [.. frac.Select(f => f * ContentWidth)];
        void Row(string[] cells, XFont font, XBrush? fill, bool verdictColours)
        {
            // A row of fewer cells than columns: its last cell spans the columns left (a text row with nothing to
            // judge).
            double[] cw = [.. cells.Select((_, i) => i < cells.Length - 1 ? widths[i] : widths.Skip(i).Sum())];
            verdictColours &= cells.Length == widths.Length;
            var wrapped = cells.Select((c, i) => Wrap(c, font, cw[i] - 6)).ToArray();
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
                        "INCONCLUSIVE" or "NOT TESTED" => (new XSolidBrush(XColor.FromArgb(191, 120, 0)), Bold),
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
                        new XRect(x + 3, y, cw[i] - 6, LineHeight(font)),
                        XStringFormats.TopLeft
                    );
                    y += LineHeight(font);
                }
                x += cw[i];
            }
            _y += h;
            _g!.DrawLine(new XPen(XColor.FromArgb(210, 210, 210), 0.5), Margin, _y, Margin + ContentWidth, _y);
        }
        Row(head, Bold, new XSolidBrush(XColor.FromArgb(232, 238, 245)), false);
        foreach (string[] r in rows)
            Row(r, body, null, verdicts);
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
            string left = $"SignalInspect {AnalysisJson.Version}  |  {id}  |  informative results, see the last page";
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
