using SignalInspect.Capture;
using SignalInspect.Reporting;
using SignalInspect.Reporting.Plots;
using SignalInspect.Survey;

namespace SignalInspect.Batch;

/// <summary>
/// batch --survey: each capture surveyed (<see cref="BandSurvey"/>), one record per emission with its measurements
/// and time on air; a capture with none gets one record saying so. Survey rows are measured, not judged: a limit
/// profile judges one emission against its assigned channel, which a survey of a band does not know (the command
/// line refuses a profile with --survey).
/// </summary>
internal static class BatchSurveyRows
{
    public static IReadOnlyList<BatchRecord> Survey(BatchInput input, string? hash, BatchOptions o, string settings)
    {
        try
        {
            CaptureSource source = CaptureSource.Open(
                input.Path,
                CaptureFormats.WithSidecar(input.Path, input.Options)
            );
            CaptureInfo info = source.Info;
            SurveySettings ss = o.Survey! with
            {
                Analysis = o.Inspection.Analysis with { Threads = 1, KeepSpectrogram = false },
            };
            SurveyResult s = BandSurvey.Run(source, ss);
            string stem = (hash ?? FileHash.Sha256(info.DataPath ?? info.Path))[..16];
            string thumbRel = Path.Combine("thumbs", stem + ".png");
            Directory.CreateDirectory(Path.Combine(o.OutDir, "thumbs"));
            byte[] png = SpectrumPlot.RenderPng(s.Spectrum.Mean, "", 480, 150, 1, absolute: false, compact: true);
            AtomicFile.Write(Path.Combine(o.OutDir, thumbRel), overwrite: true, st => st.Write(png));
            string? reportRel = null;
            if (o.Reports)
            {
                reportRel = Path.Combine(
                    "reports",
                    Path.GetFileNameWithoutExtension(input.Path.Replace(".sigmf-meta", string.Empty))
                        + "-survey-"
                        + stem[..8]
                        + ".pdf"
                );
                Directory.CreateDirectory(Path.Combine(o.OutDir, "reports"));
                AtomicFile.Write(Path.Combine(o.OutDir, reportRel), overwrite: true, st => SurveyPdf.Write(s, st));
            }
            var capture = new BatchRecord
            {
                File = input.Path,
                Status = "ok",
                ContentSha256 = hash,
                Bytes = input.Bytes,
                SampleRateHz = info.SampleRateHz,
                DurationS = info.DurationS,
                CenterFrequencyHz = info.CenterFrequencyHz,
                Settings = settings,
                Report = reportRel?.Replace('\\', '/'),
                Thumbnail = thumbRel.Replace('\\', '/'),
            };
            if (s.Emissions.Count == 0)
                return [capture with { Warnings = string.Join("; ", s.Warnings) }];
            var rows = new List<BatchRecord>(s.Emissions.Count);
            foreach (SurveyEmission e in s.Emissions)
            {
                BatchRecord row = e.Analysis is { } r
                    ? BatchRunner.FromAnalysis(input, hash, info, MeasurementReport.Create(r, null, null, ""), settings)
                    : capture with
                    {
                        Status = "warn",
                        CarrierFrequencyHz = e.CentreHz,
                        Warnings = "not measured: " + e.NotMeasuredReason,
                    };
                rows.Add(
                    row with
                    {
                        Emission = e.Number,
                        OnAirPercent = Math.Round(e.OnAirPercent, 2),
                        Report = capture.Report,
                        Thumbnail = capture.Thumbnail,
                    }
                );
            }
            return rows;
        }
        catch (Exception e) when (e is UserInputException or IOException or UnauthorizedAccessException)
        {
            return [BatchRunner.ErrorRecord(input, hash, o, settings, e)];
        }
    }
}
