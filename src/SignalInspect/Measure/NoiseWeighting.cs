namespace SignalInspect.Measure;

/// <summary>
/// A noise weighting for the audio figures: none (flat within the land-mobile band), C-message (IEEE Std 743) or
/// psophometric (ITU-T O.41). Each weighting is its published table of relative weight against frequency
/// (testdata/REFERENCE-VALUES.md names the source), interpolated linearly in dB against log frequency between the
/// table's points; outside the table it keeps the weight of the nearest end point (both curves fall steeply there,
/// so the end weight bounds them from above). A weighting replaces the band-pass: the figures are taken from the
/// table's first frequency to its last (or the demodulated band's top).
/// </summary>
public sealed class NoiseWeighting
{
    private readonly (double Hz, double Db)[] _table;

    private NoiseWeighting(string name, string description, (double, double)[] table)
    {
        Name = name;
        Description = description;
        _table = table;
    }

    /// <summary>The weighting's name as the command line and JSON give it.</summary>
    public string Name { get; }

    /// <summary>What the report says of it.</summary>
    public string Description { get; }

    /// <summary>The table's lowest frequency, Hz (0 for none).</summary>
    public double LowHz => _table.Length > 0 ? _table[0].Hz : 0;

    /// <summary>The table's highest frequency, Hz (infinite for none).</summary>
    public double HighHz => _table.Length > 0 ? _table[^1].Hz : double.PositiveInfinity;

    /// <summary>Whether this is no weighting.</summary>
    public bool IsNone => _table.Length == 0;

    /// <summary>No weighting: flat within the band.</summary>
    public static NoiseWeighting None { get; } = new("none", "none (flat within the band)", []);

    /// <summary>C-message weighting, 0 dB at 1000 Hz (IEEE Std 743-1995 table as printed in TIA-470.120-C draft,
    /// Annex A, table A.2).</summary>
    public static NoiseWeighting CMessage { get; } =
        new(
            "c-message",
            "C-message (IEEE Std 743 table, 0 dB at 1 kHz)",
            [
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
            ]
        );

    /// <summary>Psophometric weighting, 0 dB at 800 Hz (ITU-T O.41 table as printed in TIA-470.120-C draft,
    /// Annex A, table A.1).</summary>
    public static NoiseWeighting Psophometric { get; } =
        new(
            "psophometric",
            "psophometric (ITU-T O.41 table, 0 dB at 800 Hz)",
            [
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
            ]
        );

    /// <summary>The weightings by name.</summary>
    public static IReadOnlyList<NoiseWeighting> All { get; } = [None, CMessage, Psophometric];

    /// <summary>The weighting named <paramref name="name"/> (case-insensitive), or null.</summary>
    public static NoiseWeighting? Named(string name) =>
        All.FirstOrDefault(w => string.Equals(w.Name, name, StringComparison.OrdinalIgnoreCase));

    /// <summary>The relative weight at <paramref name="hz"/>, dB (0 for none).</summary>
    public double Db(double hz)
    {
        if (_table.Length == 0)
            return 0;
        if (hz <= _table[0].Hz)
            return _table[0].Db;
        if (hz >= _table[^1].Hz)
            return _table[^1].Db;
        int i = 1;
        while (_table[i].Hz < hz)
            i++;
        var (f0, d0) = _table[i - 1];
        var (f1, d1) = _table[i];
        return d0 + (d1 - d0) * Math.Log(hz / f0) / Math.Log(f1 / f0);
    }

    /// <summary>The power weight at <paramref name="hz"/>: 10^(dB / 10).</summary>
    public double PowerGain(double hz) => _table.Length == 0 ? 1 : Math.Pow(10, Db(hz) / 10);
}
