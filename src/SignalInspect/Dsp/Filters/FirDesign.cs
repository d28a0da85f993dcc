namespace SignalInspect.Dsp;

/// <summary>Linear-phase FIR design: Kaiser-windowed sinc (Kaiser 1974; the window method).</summary>
public static class FirDesign
{
    /// <summary>
    /// Low-pass taps with cutoff (the -6 dB point) at <paramref name="cutoffHz"/>, normalised to unit
    /// gain at 0 Hz. Taps are odd in number so the delay is a whole number of samples.
    /// </summary>
    /// <param name="cutoffHz">Cutoff in Hz, above 0 and below half the sample rate.</param>
    /// <param name="sampleRateHz">Sample rate in Hz.</param>
    /// <param name="transitionHz">Width of the transition band in Hz; sets the number of taps.</param>
    /// <param name="stopbandDb">Stop-band attenuation in dB (sets the Kaiser beta), default 80.</param>
    /// <param name="maxTaps">Upper bound on the taps.</param>
    /// <exception cref="ArgumentOutOfRangeException">Cutoff outside (0, fs/2) or a non-positive transition.</exception>
    public static double[] LowPass(
        double cutoffHz,
        double sampleRateHz,
        double transitionHz,
        double stopbandDb = 80,
        int maxTaps = 4095
    )
    {
        if (!(cutoffHz > 0 && cutoffHz < sampleRateHz / 2))
            throw new ArgumentOutOfRangeException(
                nameof(cutoffHz),
                cutoffHz,
                "must lie between 0 and half the sample rate"
            );
        if (!(transitionHz > 0))
            throw new ArgumentOutOfRangeException(nameof(transitionHz), transitionHz, "must be positive");
        double beta = Kaiser.Beta(stopbandDb);
        int taps = Kaiser.Length(stopbandDb, transitionHz, sampleRateHz);
        taps = Math.Clamp(taps | 1, 3, maxTaps | 1);
        var h = new double[taps];
        int m = taps - 1;
        double fc = cutoffHz / sampleRateHz;
        double i0b = Kaiser.Peak(beta);
        for (int n = 0; n < taps; n++)
        {
            double k = n - m / 2.0;
            double sinc = k == 0 ? 2 * fc : Math.Sin(2 * Math.PI * fc * k) / (Math.PI * k);
            double r = 2.0 * n / m - 1;
            h[n] = sinc * Kaiser.Taper(beta, r * r) / i0b;
        }
        double sum = h.Sum();
        for (int n = 0; n < taps; n++)
            h[n] /= sum;
        return h;
    }

    /// <summary>
    /// A half-band low-pass for decimation by 2: flat to within the attenuation's ripple over
    /// [0, <paramref name="passEdgeHz"/>], at least <paramref name="stopbandDb"/> down over
    /// [fs/2 - passEdge, fs/2], the band that folds onto [0, passEdge] when every other output is
    /// kept. A Kaiser-windowed sinc at fs/4 (length and shape by Kaiser's formulas, as
    /// <see cref="LowPass"/>), 4M + 3 taps so that the outermost ones are not zero; every other tap
    /// is exactly zero, the centre is exactly 1/2 and the DC gain 1 (the half-band property:
    /// H(f) + H(fs/2 - f) = 1 up to the window's ripple). Kaiser's length formula is approximate
    /// for filters this short: the response is checked on 256 frequencies of the stop band and
    /// the filter made 4 taps longer until it meets the attenuation there.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">The pass edge is not below fs/4.</exception>
    public static double[] HalfBand(double passEdgeHz, double sampleRateHz, double stopbandDb = 80)
    {
        double transition = sampleRateHz / 2 - 2 * passEdgeHz;
        if (!(passEdgeHz > 0 && transition > 0))
            throw new ArgumentOutOfRangeException(
                nameof(passEdgeHz),
                passEdgeHz,
                "must lie between 0 and a quarter of the sample rate"
            );
        double beta = Kaiser.Beta(stopbandDb);
        int taps = Kaiser.Length(stopbandDb, transition, sampleRateHz);
        taps = Math.Max(3, taps + ((3 - taps % 4) + 4) % 4); // up to the next 4M + 3
        for (; ; taps += 4)
        {
            double[] h = HalfBandOf(taps, beta);
            double worst = 0;
            for (int i = 0; i <= 256; i++)
            {
                double f = (sampleRateHz / 2 - passEdgeHz + passEdgeHz * i / 256) / sampleRateHz,
                    re = 0,
                    im = 0;
                for (int n = 0; n < taps; n++)
                {
                    re += h[n] * Math.Cos(2 * Math.PI * f * n);
                    im -= h[n] * Math.Sin(2 * Math.PI * f * n);
                }
                worst = Math.Max(worst, Math.Sqrt(re * re + im * im));
            }
            if (20 * Math.Log10(worst) <= -stopbandDb || taps > 4095)
                return h;
        }
    }

    private static double[] HalfBandOf(int taps, double beta)
    {
        int c = (taps - 1) / 2;
        var h = new double[taps];
        double i0b = Kaiser.Peak(beta),
            odd = 0;
        for (int n = 0; n < taps; n++)
        {
            int k = n - c;
            if (k == 0 || k % 2 == 0)
                continue;
            double r = (double)k / c;
            h[n] = Math.Sin(Math.PI * k / 2) / (Math.PI * k) * Kaiser.Taper(beta, r * r) / i0b;
            odd += h[n];
        }
        for (int n = 0; n < taps; n++)
            h[n] *= 0.5 / odd;
        h[c] = 0.5;
        return h;
    }
}
