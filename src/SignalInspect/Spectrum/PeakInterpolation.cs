namespace SignalInspect.Spectrum;

/// <summary>Sub-bin location of a peak from three neighbouring values (the peak in the middle).</summary>
public static class PeakInterpolation
{
    /// <summary>
    /// Vertex of the parabola through (-1, a), (0, b), (1, c), in bins from the middle one, clamped
    /// to +/-0.5; 0 when the three points do not make a maximum.
    /// </summary>
    public static double Parabolic(double a, double b, double c)
    {
        double den = a - 2 * b + c;
        return den < 0 ? Math.Clamp(0.5 * (a - c) / den, -0.5, 0.5) : 0;
    }

    /// <summary>
    /// The same on the logarithms of three power values (Gaussian interpolation): nearly unbiased
    /// for the smooth main lobes of the Hann and Blackman-Harris windows.
    /// </summary>
    public static double LogParabolic(double a, double b, double c) =>
        Parabolic(Math.Log(Math.Max(a, 1e-300)), Math.Log(Math.Max(b, 1e-300)), Math.Log(Math.Max(c, 1e-300)));
}
