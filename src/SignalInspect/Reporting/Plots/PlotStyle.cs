using ScottPlot;

namespace SignalInspect.Reporting.Plots;

/// <summary>The house look of every plot: one registered font, light grid, plain colours.</summary>
internal static class PlotStyle
{
    private static readonly Lazy<string> FontFamily = new(() =>
    {
        var (regular, bold, family) = FontLocator.Require();
        Fonts.AddFontFile(family, regular, bold: false, italic: false);
        Fonts.AddFontFile(family, bold, bold: true, italic: false);
        return family;
    });

    public static readonly Color Trace = Color.FromHex("#1f4e79");
    public static readonly Color Secondary = Color.FromHex("#7f7f7f");
    public static readonly Color Limit = Color.FromHex("#c00000");
    public static readonly Color Edge = Color.FromHex("#2e7d32");

    /// <summary>A new plot with the house font registered and set.</summary>
    public static Plot NewPlot()
    {
        var plot = new Plot();
        plot.Font.Set(FontFamily.Value);
        plot.Grid.MajorLineColor = Color.FromHex("#e0e0e0");
        return plot;
    }
}
