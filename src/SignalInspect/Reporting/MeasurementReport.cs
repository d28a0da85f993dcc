using System.Globalization;
using SignalInspect.Compliance;
using SignalInspect.Measure;

namespace SignalInspect.Reporting;

/// <summary>Paper size of the PDF report.</summary>
public enum PaperSize
{
    /// <summary>ISO A4, 210 x 297 mm.</summary>
    A4,

    /// <summary>US Letter, 8.5 x 11 in.</summary>
    Letter,
}

/// <summary>Who and what a report names besides the measurements.</summary>
public sealed record ReportHeader
{
    /// <summary>Report title asked for; null for "Measurement of FILE".</summary>
    public string? Title { get; init; }

    /// <summary>Who measured.</summary>
    public string? Operator { get; init; }

    /// <summary>Equipment under test.</summary>
    public string? Equipment { get; init; }

    /// <summary>Free notes.</summary>
    public string? Notes { get; init; }

    /// <summary>Test conditions (temperature, supply voltage, set-up).</summary>
    public string? Conditions { get; init; }

    /// <summary>Paper size of the PDF.</summary>
    public PaperSize Paper { get; init; } = PaperSize.A4;

    /// <summary>The command that made the report, for reproduction.</summary>
    public string? CommandLine { get; init; }
}

/// <summary>
/// Everything a measurement report states: who, what, when, the analysis, the limits and the
/// verdicts. The JSON and PDF writers only render this record.
/// </summary>
public sealed record MeasurementReport
{
    /// <summary>Report identifier: SI-yyyyMMdd-HHmmss-first 8 hex of the capture hash.</summary>
    public required string ReportId { get; init; }

    /// <summary>When the report was made (UTC).</summary>
    public required DateTimeOffset Created { get; init; }

    /// <summary>Title.</summary>
    public required string Title { get; init; }

    /// <summary>Who measured, on what, with which notes, paper and command.</summary>
    public ReportHeader Header { get; init; } = new();

    /// <summary>The analysis.</summary>
    public required AnalysisResult Analysis { get; init; }

    /// <summary>The limit profile, null when none was given.</summary>
    public LimitProfile? Profile { get; init; }

    /// <summary>Path of the profile file, null when none.</summary>
    public string? ProfilePath { get; init; }

    /// <summary>Limit checks (empty without a profile).</summary>
    public IReadOnlyList<LimitCheck> Checks { get; init; } = [];

    /// <summary>Overall verdict, null without a profile.</summary>
    public Verdict? Overall { get; init; }

    /// <summary>
    /// The report of an analysis: judges it against the profile (when given) and fills the id and
    /// time; the caller adds the header with <c>with</c>.
    /// </summary>
    public static MeasurementReport Create(
        AnalysisResult analysis,
        LimitProfile? profile,
        string? profilePath,
        string title,
        DateTimeOffset? created = null
    )
    {
        DateTimeOffset now = created ?? DateTimeOffset.UtcNow;
        IReadOnlyList<LimitCheck> checks = profile is null ? [] : Judgement.Check(analysis, profile);
        return new MeasurementReport
        {
            ReportId = MakeId(now, analysis.Sha256),
            Created = now,
            Title = title,
            Analysis = analysis,
            Profile = profile,
            ProfilePath = profilePath,
            Checks = checks,
            Overall = profile is null ? null : Judgement.Overall(checks),
        };
    }

    /// <summary>Makes the report id from the time and the capture hash.</summary>
    public static string MakeId(DateTimeOffset created, string sha256) =>
        "SI-"
        + created.UtcDateTime.ToString("yyyyMMdd-HHmmss", CultureInfo.InvariantCulture)
        + "-"
        + sha256[..Math.Min(8, sha256.Length)].ToUpperInvariant();

    /// <summary>The cautions every report and the README carry.</summary>
    public static readonly IReadOnlyList<string> Cautions =
    [
        "RF exposure: keep clear of antennas in use and follow the exposure limits that apply to the transmitter and "
            + "its site.",
        "Receiver protection: put a dummy load and enough attenuation between a transmitter and any receiver, SDR or "
            + "analyser input; a direct connection destroys it.",
        "Transmit only where and how you are licensed to; testing on the air needs the authority the local rules "
            + "require.",
    ];

    /// <summary>The disclaimer every report carries.</summary>
    public const string Disclaimer =
        "The results in this report are informative. Whether a transmitter complies is decided by the applicable "
        + "regulations, accredited laboratories and licensed practice, not by this software. The uncertainties stated "
        + "cover the estimation from the recording only: they do not include the receiver's or recorder's "
        + "calibration, frequency reference or front-end effects, which the user must add.";
}
