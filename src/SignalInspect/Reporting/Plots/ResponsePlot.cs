using ScottPlot;
using SignalInspect.Measure;

namespace SignalInspect.Reporting.Plots;

/// <summary>The audio response of a tone series against frequency (log axis): the steps read (with their expanded
/// uncertainty), the curve they are held to and, when a profile gives one, its tolerance band; or, for a level
/// series, the deviation against the input level beside the line it would follow without a limiter. PNG.</summary>
public static class ResponsePlot
{
    /// <summary>Renders the response; <paramref name="band"/> (above, below dB) draws the tolerance about the curve
    /// (<paramref name="flat"/>: 0 dB, else 6 dB/octave).</summary>
    public static byte[] Png(
        AudioResponseResult response,
        (double Above, double Below)? band,
        bool flat,
        double k,
        int widthPx,
        int heightPx,
        double scale
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        var read = response.Points.Where(p => p.ResponseDb is not null).ToList();
        bool levels = response.ReferenceLevelDb is not null;
        // A level series: x is the input level, the line the deviation would follow (+1 dB per dB).
        double X(ResponsePoint p) => levels ? p.Step.LevelDb ?? 0 : Math.Log10(p.ToneHz!.Value);
        double[] xs = [.. read.Select(X)],
            ys = [.. read.Select(p => p.ResponseDb!.Value)];
        var dots = plot.Add.ScatterPoints(xs, ys, PlotStyle.Trace);
        dots.MarkerSize = 7;
        dots.LegendText = "steps read";
        foreach (var (p, x) in read.Zip(xs))
        {
            double u = k * (p.ResponseUncertaintyDb ?? 0);
            if (u > 0)
                plot.Add.Line(x, p.ResponseDb!.Value - u, x, p.ResponseDb.Value + u).Color = PlotStyle.Trace;
        }
        double lo = xs.Min() - (levels ? 2 : 0.05),
            hi = xs.Max() + (levels ? 2 : 0.05);
        double[] cx = [.. Enumerable.Range(0, 41).Select(i => lo + (hi - lo) * i / 40)];
        double fRef = response.ReferenceHz ?? 1000;
        double Curve(double x) =>
            levels ? x - response.ReferenceLevelDb!.Value
            : flat ? 0
            : 20 * (x - Math.Log10(fRef));
        var curve = plot.Add.ScatterLine(cx, [.. cx.Select(Curve)], PlotStyle.Secondary);
        curve.LegendText =
            levels ? "without limiting"
            : flat ? "flat"
            : "6 dB/octave";
        curve.LinePattern = LinePattern.Dashed;
        if (band is { } b && !levels)
        {
            var up = plot.Add.ScatterLine(cx, [.. cx.Select(x => Curve(x) + b.Above)], PlotStyle.Limit);
            up.LegendText = "tolerance";
            plot.Add.ScatterLine(cx, [.. cx.Select(x => Curve(x) - b.Below)], PlotStyle.Limit);
        }
        if (!levels)
        {
            double[] ticks = [100, 200, 300, 500, 1000, 2000, 3000, 5000];
            plot.Axes.Bottom.TickGenerator = new ScottPlot.TickGenerators.NumericManual(
                [.. ticks.Select(Math.Log10)],
                [.. ticks.Select(t => t.ToString(System.Globalization.CultureInfo.InvariantCulture))]
            );
        }
        plot.Axes.SetLimitsX(lo, hi);
        plot.XLabel(levels ? "input level (dB)" : "tone (Hz)");
        plot.YLabel("response (dB)");
        plot.Title(
            levels ? "Deviation against input level (the limiter)" : "Audio response of the tone series (U, k = 2)"
        );
        plot.ShowLegend(Alignment.LowerRight);
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }
}
