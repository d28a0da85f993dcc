using MathNet.Numerics;

namespace SignalInspect.Dsp;

/// <summary>
/// The Kaiser window and Kaiser's design formulas (J. F. Kaiser, "Nonrecursive digital filter design
/// using the I0-sinh window function", 1974; as in Oppenheim and Schafer, Discrete-Time Signal
/// Processing, 3rd ed., 7.6.1): written once for the FIR designs (<see cref="FirDesign"/>), the
/// jittered sampler's interpolator and the spectral window (<see cref="Window"/>).
/// </summary>
internal static class Kaiser
{
    /// <summary>
    /// The shape parameter beta for a stop band <paramref name="attenuationDb"/> dB down:
    /// 0.1102 (A - 8.7) above 50 dB, 0.5842 (A - 21)^0.4 + 0.07886 (A - 21) from 21 to 50 dB, else 0.
    /// </summary>
    public static double Beta(double attenuationDb) =>
        attenuationDb > 50 ? 0.1102 * (attenuationDb - 8.7)
        : attenuationDb >= 21 ? 0.5842 * Math.Pow(attenuationDb - 21, 0.4) + 0.07886 * (attenuationDb - 21)
        : 0;

    /// <summary>
    /// Kaiser's length estimate, N = ceil((A - 7.95) / (2.285 * 2 pi df / fs)) + 1 taps, for a
    /// transition of <paramref name="transitionHz"/> at <paramref name="sampleRateHz"/>.
    /// </summary>
    public static int Length(double attenuationDb, double transitionHz, double sampleRateHz) =>
        (int)Math.Ceiling((attenuationDb - 7.95) / (2.285 * 2 * Math.PI * transitionHz / sampleRateHz)) + 1;

    /// <summary>
    /// The window's value before normalisation, I0(beta sqrt(1 - r^2)), at a point whose squared
    /// distance from the centre (as a fraction of the half-length) is <paramref name="rSquared"/>;
    /// values above 1 are taken as 1. Divide by <see cref="Peak"/> for a window of peak 1.
    /// </summary>
    public static double Taper(double beta, double rSquared) =>
        SpecialFunctions.BesselI0(beta * Math.Sqrt(Math.Max(0, 1 - rSquared)));

    /// <summary>The window's value at its centre, I0(beta).</summary>
    public static double Peak(double beta) => SpecialFunctions.BesselI0(beta);
}
