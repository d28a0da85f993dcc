using ScottPlot;
using SignalInspect.Spectrum;

namespace SignalInspect.Reporting.Plots;

/// <summary>Renders a power spectrum (dB against frequency) as a PNG image.</summary>
public static class SpectrumPlot
{
    /// <summary>Marks drawn over the spectrum: vertical lines (e.g. occupied-bandwidth edges) and a limit
    /// trace.</summary>
    public sealed record Marks
    {
        /// <summary>Vertical lines at frequencies in Hz on the plot's axis (absolute RF when the plot is absolute, else
        /// offsets), with labels.</summary>
        public IReadOnlyList<(double FrequencyHz, string Label)> Lines { get; init; } = [];

        /// <summary>A limit trace (e.g. an emission mask) as (frequency, dB) points, null for none.</summary>
        public IReadOnlyList<(double FrequencyHz, double Db)>? Limit { get; init; }

        /// <summary>Legend text of the limit trace.</summary>
        public string LimitLabel { get; init; } = "limit";

        /// <summary>A second spectrum of the same axis drawn under the first (e.g. the max-hold under the mean), null
        /// for none.</summary>
        public PowerSpectrum? Overlay { get; init; }

        /// <summary>Short labels written near the top at frequencies in Hz on the plot's axis (e.g. emission
        /// numbers).</summary>
        public IReadOnlyList<(double FrequencyHz, string Text)> Labels { get; init; } = [];
    }

    /// <summary>Renders the spectrum to PNG bytes.</summary>
    /// <param name="spectrum">The spectrum (any scaling; the axis label follows it).</param>
    /// <param name="title">Plot title.</param>
    /// <param name="widthPx">Width in pixels.</param>
    /// <param name="heightPx">Height in pixels.</param>
    /// <param name="scale">Scale factor of fonts and lines (2 or 3 for print resolution).</param>
    /// <param name="marks">Optional lines and limit trace.</param>
    /// <param name="absolute">Label the axis with absolute RF frequency in MHz when the centre is known.</param>
    /// <param name="compact">A thumbnail without axis labels or legend.</param>
    public static byte[] RenderPng(
        PowerSpectrum spectrum,
        string title,
        int widthPx = 1200,
        int heightPx = 600,
        double scale = 1,
        Marks? marks = null,
        bool absolute = false,
        bool compact = false
    )
    {
        Plot plot = PlotStyle.NewPlot();
        plot.ScaleFactor = scale;
        bool abs = absolute && spectrum.CenterFrequencyHz is not null && !spectrum.IsOneSided;
        double offset = abs ? spectrum.CenterFrequencyHz!.Value : 0;
        (double div, string unit) = AxisUnit(spectrum, abs);
        var xs = new double[spectrum.Count];
        var ys = new double[spectrum.Count];
        for (int i = 0; i < spectrum.Count; i++)
        {
            xs[i] = (spectrum.FrequenciesHz[i] + offset) / div;
            ys[i] = spectrum.Db(i);
        }
        double overTop = double.NegativeInfinity;
        if (marks?.Overlay is { } over && over.Count == spectrum.Count)
        {
            double[] oy = [.. Enumerable.Range(0, over.Count).Select(over.Db)];
            overTop = oy.Max();
            var under = plot.Add.ScatterLine(xs, oy, PlotStyle.Edge.WithAlpha(0.55));
            under.LineWidth = 1;
            under.LegendText = over.Averaging == SpectrumAveraging.MaxHold ? "max hold" : "mean (Welch)";
        }
        var trace = plot.Add.ScatterLine(xs, ys, PlotStyle.Trace);
        trace.LineWidth = 1;
        trace.LegendText = spectrum.Averaging == SpectrumAveraging.MaxHold ? "max hold" : "mean (Welch)";
        double top = Math.Max(ys.Max(), overTop),
            floor = Percentile(ys, 0.05);
        plot.Axes.SetLimitsY(Math.Max(floor - 15, top - 140), top + 8);
        plot.Axes.SetLimitsX(xs[0], xs[^1]);
        if (marks is not null)
        {
            foreach (var (f, label) in marks.Lines)
            {
                var line = plot.Add.VerticalLine(f / div, 1.5f, PlotStyle.Edge, LinePattern.Dashed);
                line.LegendText = label;
            }
            if (marks.Limit is { Count: > 1 } limit)
            {
                var l = plot.Add.ScatterLine(
                    limit.Select(p => p.FrequencyHz / div).ToArray(),
                    limit.Select(p => p.Db).ToArray(),
                    PlotStyle.Limit
                );
                l.LineWidth = 1.5f;
                l.LegendText = marks.LimitLabel;
            }
            foreach (var (f, text) in marks.Labels)
            {
                var t = plot.Add.Text(text, f / div, top + 4);
                t.LabelFontSize = 11;
                t.LabelAlignment = Alignment.LowerCenter;
            }
            plot.ShowLegend(Alignment.UpperLeft);
        }
        string cal = spectrum.Settings.CalibrationDb != 0 ? "dBm" : "dBFS";
        plot.YLabel(spectrum.Scaling == SpectrumScaling.DensityPerHz ? $"PSD ({cal}/Hz)" : $"power per bin ({cal})");
        plot.XLabel(
            abs ? $"frequency ({unit})"
            : spectrum.IsOneSided ? $"frequency ({unit})"
            : $"offset from centre ({unit})"
        );
        plot.Title(title);
        if (compact)
        {
            // A thumbnail: the trace and its axes' numbers only.
            plot.XLabel(string.Empty);
            plot.YLabel(string.Empty);
            plot.Legend.IsVisible = false;
        }
        return plot.GetImageBytes(widthPx, heightPx, ImageFormat.Png);
    }

    /// <summary>Chooses Hz, kHz or MHz for the axis.</summary>
    internal static (double Divisor, string Unit) AxisUnit(PowerSpectrum s, bool absolute)
    {
        double span = absolute ? s.CenterFrequencyHz!.Value + s.SampleRateHz : s.SampleRateHz;
        if (absolute && span >= 1e6)
            return (1e6, "MHz");
        return s.SampleRateHz >= 20e3 ? (1e3, "kHz") : (1, "Hz");
    }

    private static double Percentile(double[] v, double p)
    {
        double[] sorted = [.. v.Where(double.IsFinite).Order()];
        return sorted.Length == 0 ? -100 : sorted[(int)Math.Clamp(p * (sorted.Length - 1), 0, sorted.Length - 1)];
    }
}
