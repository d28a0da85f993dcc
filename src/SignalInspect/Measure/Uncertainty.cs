namespace SignalInspect.Measure;

/// <summary>One named contribution to a standard uncertainty (k = 1), in the unit of the value.</summary>
/// <param name="Name">What it covers: "noise (phase-slope fit)", "peak statistic", "resolution" ...</param>
/// <param name="StandardUncertainty">Its standard uncertainty (k = 1), same unit as the value.</param>
/// <param name="Source">Where the figure comes from: a formula, a named constant of <see cref="TypeB"/>.</param>
public sealed record UncertaintyComponent(string Name, double StandardUncertainty, string Source);

/// <summary>The budget of a peak read from a histogram: the statistic's type-B share and one histogram bin.</summary>
internal static class PeakBudget
{
    /// <summary>
    /// [peak statistic: <paramref name="fraction"/> x value x growth (named <paramref name="source"/>),
    /// histogram resolution: one bin of <paramref name="binWidth"/>].
    /// </summary>
    public static UncertaintyComponent[] Of(
        double value,
        double fraction,
        double growth,
        double binWidth,
        string source
    ) =>
        [
            new("peak statistic", fraction * value * growth, source + " x TypeB.NoiseGrowth"),
            new("histogram resolution", binWidth, "one bin of the deviation histogram"),
        ];
}

/// <summary>
/// A measured value with its standard uncertainty (k = 1) and the budget it was combined from.
/// </summary>
/// <param name="Value">The value, in the unit of the property that holds it.</param>
/// <param name="StandardUncertainty">Standard uncertainty (k = 1), same unit.</param>
public readonly record struct Measured(double Value, double StandardUncertainty)
{
    /// <summary>The components <see cref="StandardUncertainty"/> was combined from (empty when not given).</summary>
    public IReadOnlyList<UncertaintyComponent> Budget { get; init; } = [];

    /// <summary>
    /// A value whose standard uncertainty is the root sum of squares of uncorrelated components (GUM
    /// 5.1.2 with unit sensitivity coefficients); one component is taken as it is.
    /// </summary>
    public static Measured FromBudget(double value, params UncertaintyComponent[] components) =>
        new(value, Combine(components)) { Budget = components };

    /// <summary>Root sum of squares of the components' standard uncertainties (one component: its value).</summary>
    public static double Combine(IReadOnlyList<UncertaintyComponent> components)
    {
        if (components.Count == 1)
            return components[0].StandardUncertainty;
        double sum = 0;
        foreach (UncertaintyComponent c in components)
            sum += Math.Pow(c.StandardUncertainty, 2);
        return Math.Sqrt(sum);
    }
}
