using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// The C-message and psophometric weightings (issue 26 item 1) against their published tables: IEEE Std 743-1995
/// (C-message) and ITU-T O.41 (psophometric), as printed in a TIA-470.120-C draft, Annex A, tables A.1 and A.2
/// (testdata/REFERENCE-VALUES.md, "Noise weighting tables"). The tables are typed here again from that page.
/// </summary>
public class NoiseWeightingTests
{
    public static TheoryData<string, double, double> TablePoints()
    {
        var d = new TheoryData<string, double, double>();
        foreach (
            var (f, db) in new (double, double)[]
            {
                (60, -55.7),
                (100, -42.5),
                (200, -25.1),
                (300, -16.3),
                (400, -11.2),
                (500, -7.7),
                (600, -5.0),
                (700, -2.8),
                (800, -1.3),
                (900, -0.3),
                (1000, 0.0),
                (1200, -0.4),
                (1300, -0.7),
                (1500, -1.2),
                (1800, -1.3),
                (2000, -1.1),
                (2500, -1.1),
                (2800, -2.0),
                (3000, -3.0),
                (3300, -5.1),
                (3500, -7.1),
                (4000, -14.6),
                (4500, -22.3),
                (5000, -28.7),
            }
        )
            d.Add("c-message", f, db);
        foreach (
            var (f, db) in new (double, double)[]
            {
                (16.66, -85.0),
                (50, -63.0),
                (100, -41.0),
                (200, -21.0),
                (300, -10.6),
                (400, -6.3),
                (500, -3.6),
                (600, -2.0),
                (700, -0.9),
                (800, 0.0),
                (900, 0.6),
                (1000, 1.0),
                (1200, 0.0),
                (1400, -0.9),
                (1600, -1.7),
                (1800, -2.4),
                (2000, -3.0),
                (2500, -4.2),
                (3000, -5.6),
                (3500, -8.5),
                (4000, -15.0),
                (4500, -25.0),
                (5000, -36.0),
                (6000, -43.0),
            }
        )
            d.Add("psophometric", f, db);
        return d;
    }

    /// <summary>Every point of both tables (0.05 dB: the tables print tenths).</summary>
    [Theory]
    [MemberData(nameof(TablePoints))]
    public void The_weighting_is_its_published_table(string name, double hz, double db) =>
        Near.Equal(db, NoiseWeighting.Named(name)!.Db(hz), 0.05, $"{name} at {hz} Hz");

    /// <summary>Between two neighbouring points of a table the weight lies between theirs (the interpolation does not
    /// ring).</summary>
    [Fact]
    public void Between_points_the_weight_lies_between_theirs()
    {
        foreach (
            var group in TablePoints().Select(x => ((string)x[0], (double)x[1], (double)x[2])).GroupBy(x => x.Item1)
        )
        {
            NoiseWeighting w = NoiseWeighting.Named(group.Key)!;
            var points = group.ToList();
            for (int i = 1; i < points.Count; i++)
                for (int j = 1; j < 10; j++)
                {
                    double f = points[i - 1].Item2 * Math.Pow(points[i].Item2 / points[i - 1].Item2, j / 10.0);
                    double lo = Math.Min(points[i - 1].Item3, points[i].Item3),
                        hi = Math.Max(points[i - 1].Item3, points[i].Item3);
                    Assert.InRange(w.Db(f), lo - 1e-9, hi + 1e-9);
                }
        }
    }

    /// <summary>
    /// Through the whole measurement: FM by a 1 kHz tone at 1.5 kHz deviation plus a second tone at 150 Hz
    /// deviation (everything in the band that is not the tone counts against SINAD). Weighted,
    /// SINAD = 10 log10((g(1000) 1500^2 + g(f) 150^2) / (g(f) 150^2)) with g the power weight of the table; within
    /// 0.3 dB.
    /// </summary>
    [Theory]
    [InlineData("c-message", 300, 0.0, -16.3)]
    [InlineData("c-message", 2500, 0.0, -1.1)]
    [InlineData("c-message", 3500, 0.0, -7.1)]
    [InlineData("psophometric", 500, 1.0, -3.6)]
    [InlineData("psophometric", 3500, 1.0, -8.5)]
    public void SINAD_weighs_what_is_not_the_tone(string name, double otherHz, double toneDb, double otherDb)
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 48_000,
            DurationS = 2,
            PeakDeviationHz = 1500,
            SnrDb = 70,
            ExtraTones = [new ExtraTone(otherHz, 150)],
        };
        AnalysisResult r = Measuring.Analyze(
            tmp,
            spec,
            new AnalysisOptions { Weighting = NoiseWeighting.Named(name), PostLowPassHz = 8000 }
        );
        double g0 = Math.Pow(10, toneDb / 10),
            g = Math.Pow(10, otherDb / 10);
        double expected = 10 * Math.Log10((g0 * 1500 * 1500 + g * 150 * 150) / (g * 150 * 150));
        Near.Equal(expected, r.Audio!.SinadDb!.Value.Value, 0.3, $"{name} SINAD with a tone at {otherHz} Hz");
        Assert.StartsWith(name == "c-message" ? "C-message" : "psophometric", r.Audio.Weighting);
    }
}
