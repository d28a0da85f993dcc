namespace SignalInspect.Spectrum;

/// <summary>
/// Power over time and frequency for a whole capture, in density scaling (full-scale^2/Hz).
/// Each row combines a run of consecutive Welch segments (mean or max), so the number of rows is
/// bounded whatever the capture's length; adjacent bins are averaged when the FFT has more bins
/// than <see cref="SpectrumSettings.SpectrogramColumns"/>.
/// </summary>
public sealed class Spectrogram
{
    private readonly double[] _values;

    internal Spectrogram(
        int rows,
        int columns,
        double[] values,
        double[] rowTimesS,
        double[] columnFrequenciesHz,
        int segmentsPerRow,
        SpectrumAveraging averaging,
        double calibrationDb
    )
    {
        Rows = rows;
        Columns = columns;
        _values = values;
        RowTimesS = rowTimesS;
        ColumnFrequenciesHz = columnFrequenciesHz;
        SegmentsPerRow = segmentsPerRow;
        Averaging = averaging;
        CalibrationDb = calibrationDb;
    }

    /// <summary>Rows (time steps).</summary>
    public int Rows { get; }

    /// <summary>Columns (frequency bins, ascending).</summary>
    public int Columns { get; }

    /// <summary>Time of each row's centre in seconds from the analysed window's start.</summary>
    public IReadOnlyList<double> RowTimesS { get; }

    /// <summary>Frequency of each column's centre in Hz (offset from the centre for complex input).</summary>
    public IReadOnlyList<double> ColumnFrequenciesHz { get; }

    /// <summary>Welch segments combined into one row.</summary>
    public int SegmentsPerRow { get; }

    /// <summary>How the segments of a row are combined.</summary>
    public SpectrumAveraging Averaging { get; }

    /// <summary>Calibration offset in dB applied by <see cref="Db"/>.</summary>
    public double CalibrationDb { get; }

    /// <summary>Linear density of one cell.</summary>
    public double Value(int row, int column) => _values[row * Columns + column];

    /// <summary>One row's linear densities.</summary>
    public ReadOnlySpan<double> Row(int row) => _values.AsSpan(row * Columns, Columns);

    /// <summary>One cell in dBFS/Hz (plus calibration).</summary>
    public double Db(int row, int column)
    {
        double v = Value(row, column);
        return (v > 0 ? 10 * Math.Log10(v) : -400) + CalibrationDb;
    }
}
