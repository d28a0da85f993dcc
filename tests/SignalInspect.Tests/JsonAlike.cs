using System.Text.Json.Nodes;

namespace SignalInspect.Tests;

/// <summary>JSON results that must agree to the rounding of floating-point arithmetic.</summary>
internal static class JsonAlike
{
    /// <summary>
    /// Compares two JSON documents: the same keys in the same order, numbers within 1e-6 relative,
    /// strings equal once the numbers they print are set aside (those within 1e-6 or one unit in
    /// their last printed place). Returns the largest relative difference seen.
    /// </summary>
    public static double Compare(JsonNode? expected, JsonNode? actual, string at)
    {
        switch (expected)
        {
            case null:
                Assert.Null(actual);
                return 0;
            case JsonObject eo:
                {
                    JsonObject ao = Assert.IsType<JsonObject>(actual);
                    Assert.Equal(eo.Select(p => p.Key), ao.Select(p => p.Key));
                    return eo.Select(p => Compare(p.Value, ao[p.Key], $"{at}.{p.Key}")).DefaultIfEmpty(0).Max();
                }
            case JsonArray ea:
                {
                    JsonArray aa = Assert.IsType<JsonArray>(actual);
                    Assert.Equal(ea.Count, aa.Count);
                    return ea.Select((v, i) => Compare(v, aa[i], $"{at}[{i}]")).DefaultIfEmpty(0).Max();
                }
            default:
                var ev = expected.AsValue();
                if (ev.TryGetValue(out double e))
                {
                    double v = actual!.AsValue().GetValue<double>();
                    double d = Math.Abs(v - e),
                        scale = Math.Max(Math.Abs(e), Math.Abs(v));
                    // A budget's noise component is the residual phase less the modulation's, a difference of
                    // nearly equal numbers: float rounding shows there at 1e-5 of the component (1e-10 Hz).
                    // Likewise the timeline's scatter of 1 ms means about their line and a drift of nearly nothing
                    // (differences of nearly equal means), and a clean tone's distortion and noise (the band's power
                    // less the tone's).
                    double relative =
                        at.Contains("uncertaintyBudget", StringComparison.Ordinal)
                        || at.Contains(".timeline.", StringComparison.Ordinal)
                        || at.Contains(".audio.", StringComparison.Ordinal)
                            ? 1e-4
                            : 1e-6;
                    Assert.True(d <= relative * scale + 1e-12, $"{at}: {v} against {e}");
                    return scale > 0 ? d / scale : 0;
                }
                // Strings alike with the numbers they print read the same way, a unit in their last printed place
                // allowed.
                string es = expected.ToJsonString(),
                    acs = actual!.ToJsonString();
                var number = new System.Text.RegularExpressions.Regex(@"-?\d+(\.\d+)?");
                Assert.Equal(number.Replace(es, "#"), number.Replace(acs, "#"));
                double worst = 0;
                foreach (var (m, n) in number.Matches(es).Zip(number.Matches(acs)))
                {
                    double e2 = double.Parse(m.Value, System.Globalization.CultureInfo.InvariantCulture),
                        v2 = double.Parse(n.Value, System.Globalization.CultureInfo.InvariantCulture);
                    int places = m.Groups[1].Success ? m.Groups[1].Value.Length - 1 : 0;
                    double d = Math.Abs(v2 - e2),
                        scale = Math.Max(Math.Abs(e2), Math.Abs(v2));
                    Assert.True(d <= 1e-6 * scale + Math.Pow(10, -places) + 1e-12, $"{at}: {acs} against {es}");
                    worst = Math.Max(worst, scale > 0 && d > Math.Pow(10, -places) ? d / scale : 0);
                }
                return worst;
        }
    }
}
