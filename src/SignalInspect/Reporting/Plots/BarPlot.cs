using ScottPlot;

namespace SignalInspect.Reporting.Plots;

/// <summary>Bars of a percentage per named item (e.g. channel occupancy), as PNG.</summary>
public static class BarPlot
{
    /// <summary>Renders one bar per item, 0 to 100 %.</summary>
    public static byte[] PercentPng(
        IReadOnlyList<(string Label, double Percent)> bars,
        string title,
        string yLabel,
        string xLabel,
        int widthPx,
        int heightPx,
        double scale
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        double[] values = [.. bars.Select(b => b.Percent)];
        var bar = plot.Add.Bars(values);
        bar.Color = PlotStyle.Trace;
        // At most about 24 tick labels: every k-th channel named.
        int every = Math.Max(1, (bars.Count + 23) / 24);
        double[] at = [.. Enumerable.Range(0, bars.Count).Where(i => i % every == 0).Select(i => (double)i)];
        string[] names = [.. at.Select(i => bars[(int)i].Label)];
        plot.Axes.Bottom.SetTicks(at, names);
        plot.Axes.SetLimitsY(0, 105);
        plot.Axes.SetLimitsX(-0.6, bars.Count - 0.4);
        plot.YLabel(yLabel);
        plot.XLabel(xLabel);
        plot.Title(title);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }
}
