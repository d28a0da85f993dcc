using ScottPlot;

namespace SignalInspect.Reporting.Plots;

/// <summary>The demodulated audio's spectrum with the test tone's harmonics and the sub-audible tone marked, as
/// PNG.</summary>
public static class AudioSpectrumPlot
{
    /// <summary>Renders (frequency, dB) points with labelled vertical marks.</summary>
    public static byte[] Png(
        IReadOnlyList<(double Hz, double Db)> points,
        IReadOnlyList<(double Hz, string Label)> marks,
        string title,
        string yLabel,
        int widthPx,
        int heightPx,
        double scale
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        double[] xs = [.. points.Select(p => p.Hz)],
            ys = [.. points.Select(p => p.Db)];
        var line = plot.Add.ScatterLine(xs, ys, PlotStyle.Trace);
        line.LineWidth = 1;
        line.LegendText = "demodulated audio";
        double top = ys.Max(),
            floor = ys.Order().ElementAt(ys.Length / 10);
        foreach (var (hz, label) in marks)
        {
            plot.Add.VerticalLine(hz, 1, PlotStyle.Edge, LinePattern.Dotted);
            var t = plot.Add.Text(label, hz, top + 3);
            t.LabelFontSize = 10;
            t.LabelAlignment = Alignment.LowerCenter;
        }
        plot.Axes.SetLimitsY(Math.Max(floor - 10, top - 120), top + 10);
        plot.Axes.SetLimitsX(0, xs.Length > 0 ? xs[^1] : 1);
        plot.XLabel("audio frequency (Hz)");
        plot.YLabel(yLabel);
        plot.Title(title);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }
}
