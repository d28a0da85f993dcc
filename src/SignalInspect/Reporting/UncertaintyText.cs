using System.Globalization;
using SignalInspect.Measure;

namespace SignalInspect.Reporting;

/// <summary>The uncertainty budget in words, for the report's method section.</summary>
internal static class UncertaintyText
{
    /// <summary>Each measured value's standard uncertainty components (k = 1), as the JSON's uncertaintyBudget holds
    /// them, for the method section.</summary>
    public static string Budget(AnalysisResult a)
    {
        var parts = new List<string>();
        void Add(string what, string unit, IReadOnlyList<UncertaintyComponent> budget)
        {
            if (budget.Count > 0)
                parts.Add(
                    what
                        + ": "
                        + string.Join(
                            ", ",
                            budget.Select(c =>
                                string.Create(
                                    CultureInfo.InvariantCulture,
                                    $"{c.Name} {c.StandardUncertainty:G3} {unit}"
                                )
                            )
                        )
                );
        }
        Add("carrier", "Hz", a.Carrier?.FrequencyHz.Budget ?? []);
        Add("AM depth", "%", a.Am?.DepthPercent.Budget ?? []);
        Add("FM peak deviation", "Hz", a.Fm?.PeakDeviationHz.Budget ?? []);
        Add("PM peak phase", "rad", a.Pm?.PeakDeviationRad.Budget ?? []);
        Add("FSK shift", "Hz", a.Fsk?.ShiftHz.Budget ?? []);
        Add("modulating frequency", "Hz", a.ModulatingFrequencyHz?.Budget ?? []);
        Add("occupied bandwidth", "Hz", a.OccupiedBudget);
        return parts.Count > 0 ? "standard uncertainties (k = 1): " + string.Join("; ", parts) : "none measured";
    }
}
