using SignalInspect.Capture;
using SignalInspect.Compliance;
using SignalInspect.Diagnostics;
using SignalInspect.Measure;
using SignalInspect.Reporting;

namespace SignalInspect.Inspection;

/// <summary>What <see cref="CaptureInspection.Inspect"/> asks for besides the capture.</summary>
public sealed record InspectionSettings
{
    /// <summary>What to measure and how.</summary>
    public AnalysisOptions Analysis { get; init; } = new();

    /// <summary>The limit profile to judge against, or null.</summary>
    public LimitProfile? Profile { get; init; }

    /// <summary>Where the profile was read from, for the report.</summary>
    public string? ProfilePath { get; init; }

    /// <summary>The report's header.</summary>
    public ReportHeader Header { get; init; } = new();
}

/// <summary>
/// Inspect a capture: measure it, judge it against the profile and make the report model; and write
/// the report (PDF and its JSON model) as one step. The one path that <c>analyze</c>, <c>batch</c>
/// and <c>demo</c> share.
/// </summary>
public static class CaptureInspection
{
    /// <summary>
    /// Measures <paramref name="source"/> and makes its report. The nominal frequency is the one asked
    /// for, else the profile's.
    /// </summary>
    public static MeasurementReport Inspect(
        CaptureSource source,
        InspectionSettings settings,
        Action<long>? progress = null,
        CancellationToken cancel = default,
        StageTimer? timer = null
    )
    {
        AnalysisOptions options = settings.Analysis with
        {
            NominalHz = settings.Analysis.NominalHz ?? settings.Profile?.NominalFrequencyHz,
        };
        AnalysisResult result = Analyzer.Analyze(source, options, progress, cancel, timer);
        ReportHeader h = settings.Header;
        return MeasurementReport.Create(
            result,
            settings.Profile,
            settings.ProfilePath,
            h.Title ?? $"Measurement of {Path.GetFileName(source.Info.Path)}"
        ) with
        {
            Header = h,
        };
    }

    /// <summary>The JSON model written beside a PDF report.</summary>
    public static string ModelPathFor(string pdfPath) => Path.ChangeExtension(pdfPath, ".json");

    /// <summary>Writes the PDF report and its JSON model beside it, each atomically.</summary>
    /// <exception cref="OutputException">A file exists and <paramref name="overwrite"/> is false, or its folder is
    /// missing.</exception>
    public static void WriteReport(MeasurementReport model, string pdfPath, bool overwrite)
    {
        AtomicFile.WriteSet(
            [
                (ModelPathFor(pdfPath), s => s.Write(ReportJson.ToBytes(model))),
                (pdfPath, s => PdfReportWriter.Write(model, s)),
            ],
            overwrite
        );
    }
}
