using ScottPlot;
using SignalInspect.Spectrum;

namespace SignalInspect.Reporting.Plots;

/// <summary>Spectrogram and time-series plots for the report, as PNG.</summary>
public static class TimePlots
{
    /// <summary>Spectrogram: time down, frequency across, colour in dBFS/Hz.</summary>
    public static byte[] SpectrogramPng(
        Spectrogram g,
        double? centreHz,
        string title,
        int widthPx,
        int heightPx,
        double scale
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        var data = new double[g.Rows, g.Columns];
        double max = double.NegativeInfinity;
        for (int r = 0; r < g.Rows; r++)
            for (int c = 0; c < g.Columns; c++)
            {
                data[r, c] = g.Db(r, c);
                if (data[r, c] > max)
                    max = data[r, c];
            }
        for (int r = 0; r < g.Rows; r++)
            for (int c = 0; c < g.Columns; c++)
                data[r, c] = Math.Max(data[r, c], max - 80);
        double f0 = g.ColumnFrequenciesHz[0],
            f1 = g.ColumnFrequenciesHz[^1];
        (double div, string unit) = Math.Max(Math.Abs(f0), Math.Abs(f1)) >= 20e3 ? (1e3, "kHz") : (1, "Hz");
        double t1 = g.RowTimesS[^1] + (g.Rows > 1 ? g.RowTimesS[1] - g.RowTimesS[0] : 0) / 2;
        var hm = plot.Add.Heatmap(data);
        hm.Extent = new CoordinateRect(f0 / div, f1 / div, t1, 0);
        hm.Colormap = new ScottPlot.Colormaps.Viridis();
        var bar = plot.Add.ColorBar(hm);
        bar.Label = g.CalibrationDb != 0 ? "dBm/Hz" : "dBFS/Hz";
        plot.XLabel(
            centreHz is { } centre ? $"offset from {centre / 1e6:0.######} MHz ({unit})" : $"frequency ({unit})"
        );
        // Time runs down the page (the first row on top, as a waterfall display shows it): the label says so.
        plot.YLabel("time (s), downwards");
        plot.Title(title);
        plot.Axes.SetLimits(f0 / div, f1 / div, t1, 0);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }

    /// <summary>A line plot of (time, value) points.</summary>
    public static byte[] SeriesPng(
        IReadOnlyList<(double TimeS, double Value)> points,
        string title,
        string yLabel,
        int widthPx,
        int heightPx,
        double scale,
        IReadOnlyList<(double Value, string Label)>? levels = null,
        IReadOnlyList<(double TimeS, double Value)>? second = null,
        bool seconds = false,
        IReadOnlyList<(double StartS, double EndS)>? shaded = null
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        double unit = seconds ? 1 : 1e3;
        if (shaded is not null)
            foreach (var (a, b) in shaded)
            {
                var span = plot.Add.HorizontalSpan(a * unit, b * unit);
                span.FillStyle.Color = PlotStyle.Edge.WithAlpha(0.12);
                span.LineStyle.Width = 0;
            }
        double[] t = [.. points.Select(p => p.TimeS * unit)];
        double[] v = [.. points.Select(p => p.Value)];
        var line = plot.Add.ScatterLine(t, v, PlotStyle.Trace);
        line.LineWidth = 1.2f;
        if (second is { Count: > 1 })
        {
            var low = plot.Add.ScatterLine(
                second.Select(p => p.TimeS * unit).ToArray(),
                second.Select(p => p.Value).ToArray(),
                PlotStyle.Trace
            );
            low.LineWidth = 1.2f;
        }
        if (levels is not null)
        {
            foreach (var (value, label) in levels)
            {
                var h = plot.Add.HorizontalLine(value, 1, PlotStyle.Limit, LinePattern.Dashed);
                h.LegendText = label;
            }
            if (levels.Count > 0)
                plot.ShowLegend(Alignment.UpperRight);
        }
        plot.XLabel(seconds ? "time from the capture's start (s)" : "time (ms)");
        plot.YLabel(yLabel);
        plot.Title(title);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }

    /// <summary>
    /// Frequency against time at a key instant: the trace (ms from the instant, Hz from the assigned frequency) and,
    /// for each interval of a transient rule, its limits drawn as a box (+/- max over from..to ms).
    /// </summary>
    public static byte[] TransientPng(
        IReadOnlyList<(double TimeMs, double Hz)> trace,
        IReadOnlyList<(double FromMs, double ToMs, double MaxHz, string Label)> boxes,
        string title,
        int widthPx,
        int heightPx,
        double scale
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        var line = plot.Add.ScatterLine(
            trace.Select(p => p.TimeMs).ToArray(),
            trace.Select(p => p.Hz / 1e3).ToArray(),
            PlotStyle.Trace
        );
        line.LineWidth = 1.2f;
        line.LegendText = "frequency difference";
        bool labelled = false;
        foreach (var (from, to, max, label) in boxes)
            foreach (double sign in new[] { 1.0, -1.0 })
            {
                var edge = plot.Add.Line(from, sign * max / 1e3, to, sign * max / 1e3);
                edge.LineColor = PlotStyle.Limit;
                edge.LinePattern = LinePattern.Dashed;
                edge.LineWidth = 1.2f;
                if (!labelled)
                {
                    edge.LegendText = label;
                    labelled = true;
                }
            }
        plot.ShowLegend(Alignment.UpperRight);
        plot.XLabel("time from the key instant (ms)");
        plot.YLabel("frequency difference (kHz)");
        plot.Title(title);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }
}
