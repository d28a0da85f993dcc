namespace SignalInspect.Dsp;

/// <summary>
/// One-pole filters used after detection: a DC-blocking high-pass and de-emphasis (a first-order
/// low-pass of time constant tau, as in FM broadcast: 50 or 75 us). Bilinear transform.
/// </summary>
public sealed class OnePole
{
    private readonly double _b0,
        _b1,
        _a1;
    private double _x1,
        _y1;

    private OnePole(double b0, double b1, double a1)
    {
        _b0 = b0;
        _b1 = b1;
        _a1 = a1;
    }

    /// <summary>First-order high-pass with -3 dB at <paramref name="cornerHz"/>.</summary>
    public static OnePole HighPass(double cornerHz, double sampleRateHz)
    {
        double k = Math.Tan(Math.PI * cornerHz / sampleRateHz);
        double norm = 1 / (1 + k);
        return new OnePole(norm, -norm, (k - 1) * norm);
    }

    /// <summary>De-emphasis: first-order low-pass with time constant <paramref name="tauS"/> (corner 1 / (2 pi
    /// tau)).</summary>
    public static OnePole DeEmphasis(double tauS, double sampleRateHz)
    {
        double k = Math.Tan(1 / (2 * tauS * sampleRateHz));
        double norm = 1 / (1 + k);
        return new OnePole(k * norm, k * norm, (k - 1) * norm);
    }

    /// <summary>Filters one sample.</summary>
    public double Next(double x)
    {
        double y = _b0 * x + _b1 * _x1 - _a1 * _y1;
        _x1 = x;
        _y1 = y;
        return y;
    }
}
