using System.Globalization;
using SignalInspect.Diagnostics;
using SignalInspect.Measure;

namespace SignalInspect.Survey;

/// <summary>A survey as text: the console table and the CSV (one row per emission; fixed decimals, units in the
/// headers).</summary>
public static class SurveyText
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>The CSV header.</summary>
    public const string CsvHeader =
        "number,frequencyHz,class,occupiedBandwidthHz,peakPowerDb,meanPowerDb,snrDb,onAirPercent,firstSeenS,"
        + "lastSeenS,peakDeviationHz,amDepthPercent,fskShiftHz,symbolRateBd,modulatingFrequencyHz,"
        + "emissionDesignator,detectedLowHz,detectedHighHz,imageOf,notMeasuredReason";

    /// <summary>One CSV row per emission, after <see cref="CsvHeader"/>.</summary>
    public static void WriteCsv(TextWriter w, SurveyResult s)
    {
        w.WriteLine(CsvHeader);
        foreach (SurveyEmission e in s.Emissions)
        {
            AnalysisResult? r = e.Analysis;
            string[] cells =
            [
                e.Number.ToString(C),
                F(e.CentreHz, 1),
                e.ClassName,
                F(e.OccupiedBandwidthHz, 1),
                F(e.PeakPowerDb, 2),
                F(e.MeanPowerDb, 2),
                F(e.SnrDb, 1),
                F(e.OnAirPercent, 1),
                F(NaNToNull(e.FirstSeenS), 3),
                F(NaNToNull(e.LastSeenS), 3),
                F(r?.Fm?.PeakDeviationHz.Value, 1),
                F(r?.Am?.DepthPercent.Value, 2),
                F(r?.Fsk?.ShiftHz.Value, 1),
                F(r?.Fsk?.SymbolRateBd?.Value, 2),
                F(r?.ModulatingFrequencyHz?.Value, 3),
                r?.EmissionDesignator ?? "",
                F(e.LowHz, 1),
                F(e.HighHz, 1),
                e.ImageOf?.ToString(C) ?? "",
                SafeText.CsvCell(e.NotMeasuredReason ?? ""),
            ];
            w.WriteLine(string.Join(',', cells));
        }
    }

    /// <summary>The console table: one line per emission, then the channels' occupancy.</summary>
    public static void WriteTable(TextWriter w, SurveyResult s)
    {
        string unit = s.Spectrum.Mean.Settings.CalibrationDb != 0 ? "dBm" : "dBFS";
        w.WriteLine(
            string.Create(
                C,
                $"{SafeText.ForTerminal(Path.GetFileName(s.Capture.Path))}: {s.Emissions.Count} emission(s), time step "
                    + $"{s.TimeStepS * 1000:0.###} ms, RBW {s.Spectrum.Mean.RbwHz:0.##} Hz"
            )
        );
        if (s.Emissions.Count > 0)
        {
            w.WriteLine(
                $"{"#",3}  {"frequency (Hz)",16}  {"class",-7}  {"OBW (Hz)",9}  {"peak " + unit,9}  "
                    + $"{"mean " + unit,9}  {"SNR dB",6}  {"on air %",8}  {"seen (s)",-15}  measurements"
            );
            foreach (SurveyEmission e in s.Emissions)
                w.WriteLine(
                    string.Create(
                        C,
                        $"{e.Number,3}  {e.CentreHz,16:0.0}  {e.ClassName,-7}  {F(e.OccupiedBandwidthHz, 0),9}  "
                            + $"{e.PeakPowerDb,9:0.0}  {e.MeanPowerDb,9:0.0}  {e.SnrDb,6:0.0}  {e.OnAirPercent,8:0.0}  "
                            + $"{Seen(e),-15}  {Key(e)}"
                    )
                );
        }
        if (s.Channels.Count > 0)
        {
            w.WriteLine($"{"channel (Hz)",16}  {"occupied %",10}  {"mean " + unit,9}  {"max " + unit,9}");
            foreach (ChannelOccupancy c in s.Channels)
                w.WriteLine(
                    string.Create(
                        C,
                        $"{c.CentreHz,16:0.0}  {c.OccupancyPercent,10:0.0}  {c.MeanPowerDb,9:0.0}  {c.MaxPowerDb,9:0.0}"
                    )
                );
        }
    }

    /// <summary>The key measurements of an emission, or why it was not measured.</summary>
    public static string Key(SurveyEmission e)
    {
        string image = e.ImageOf is { } of ? $"suspected IQ image of #{of}; " : "";
        if (e.Analysis is not { } r)
            return image + "not measured: " + e.NotMeasuredReason;
        var parts = new List<string>();
        if (r.Fm is { } fm)
            parts.Add(string.Create(C, $"deviation {fm.PeakDeviationHz.Value:0} Hz"));
        if (r.Am is { } am)
            parts.Add(string.Create(C, $"depth {am.DepthPercent.Value:0.0} %"));
        if (r.Pm is { } pm)
            parts.Add(string.Create(C, $"phase {pm.PeakDeviationRad.Value:0.00} rad"));
        if (r.Fsk is { } fsk)
            parts.Add(
                string.Create(C, $"shift {fsk.ShiftHz.Value:0} Hz")
                    + (fsk.SymbolRateBd is { } sr ? string.Create(C, $" at {sr.Value:0} Bd") : "")
            );
        if (r.Ook is { } ook)
            parts.Add(string.Create(C, $"on {ook.OnSharePercent:0} % of the time"));
        if (r.ModulatingFrequencyHz is { } fm2)
            parts.Add(string.Create(C, $"tone {fm2.Value:0.0} Hz"));
        if (r.EmissionDesignator is { } d)
            parts.Add(d);
        return image + string.Join(", ", parts);
    }

    private static string Seen(SurveyEmission e) =>
        double.IsNaN(e.FirstSeenS) ? "-" : string.Create(C, $"{e.FirstSeenS:0.00}-{e.LastSeenS:0.00}");

    private static double? NaNToNull(double v) => double.IsNaN(v) ? null : v;

    private static string F(double? v, int decimals) => v is { } x ? x.ToString("F" + decimals, C) : "";
}
