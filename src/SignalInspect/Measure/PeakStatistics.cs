using SignalInspect.Spectrum;

namespace SignalInspect.Measure;

/// <summary>Variance estimates from a <see cref="LineSpectrum"/>: how much of a stream is a tone and how much is
/// noise.</summary>
public static class LineSpectrumVariance
{
    /// <summary>
    /// Variance of the stream between <paramref name="minHz"/> and <paramref name="maxHz"/>, split into
    /// the part in the lines at the harmonics of <paramref name="toneHz"/> (within +/- guard bins) and
    /// the rest, the noise; the noise in the guarded bins is filled in from the mean of the others.
    /// For a windowed periodogram, variance = 2 / (N sum w^2) x the sum of one-sided |X|^2.
    /// The guard of 6 bins covers the Blackman-Harris main lobe (+/-4 bins) and its first sidelobes.
    /// </summary>
    public static (double Tone, double Noise) Split(
        this LineSpectrum s,
        double toneHz,
        double minHz,
        double maxHz,
        int guard = 6
    )
    {
        int n = s.FftSize;
        // Bins within the guard of 0 Hz hold the leakage of the mean (for an envelope, the carrier): left out.
        int k0 = Math.Max(guard + 1, (int)Math.Ceiling(minHz / s.BinWidthHz)),
            k1 = Math.Min(n / 2 - 1, (int)Math.Floor(maxHz / s.BinWidthHz));
        double tone = 0,
            noise = 0;
        int noiseBins = 0,
            all = 0;
        for (int k = k0; k <= k1; k++)
        {
            all++;
            double f = k * s.BinWidthHz;
            bool near =
                toneHz > 0
                && Math.Abs(f - Math.Round(f / toneHz) * toneHz) <= guard * s.BinWidthHz
                && Math.Round(f / toneHz) >= 1;
            if (near)
                tone += s.Power(k);
            else
            {
                noise += s.Power(k);
                noiseBins++;
            }
        }
        double scale = s.VarianceScale;
        double noisePerBin = noiseBins > 0 ? noise / noiseBins : 0;
        double guardedNoise = noisePerBin * (all - noiseBins);
        return (Math.Max(0, tone - guardedNoise) * scale, (noise + guardedNoise) * scale);
    }
}

/// <summary>The peak of a sine from a high percentile when Gaussian noise is added to it.</summary>
public static class SinePeak
{
    /// <summary>
    /// The peak D of a sine such that D sin(theta) + n, theta uniform and n Gaussian of standard
    /// deviation <paramref name="sigma"/>, exceeds <paramref name="level"/> a fraction
    /// <paramref name="tail"/> of the time. With sigma = 0 this is level / cos(pi tail) (the
    /// arcsine law). Used to read a tone's peak from the 99.9th percentile without the noise that
    /// raises the percentile.
    /// </summary>
    public static double FromPercentile(double level, double sigma, double tail = 0.001)
    {
        if (!(level > 0))
            return level;
        if (!(sigma > 0))
            return level / Math.Cos(Math.PI * tail);
        // P = (1/pi) int_0^pi Q((level - d cos phi) / sigma) dphi, integrated only where the
        // integrand is not negligible (d cos phi above level - 9 sigma), by the midpoint rule. The
        // integrand is even about phi = 0 and dies away at the upper end, so the rule converges
        // far faster than its h^2 (Euler-Maclaurin): checked against scipy.integrate.quad for
        // sigma / level from 1e-5 to 2 and d across the search's bracket, 512 steps were within
        // 2e-11 relative (4000 before: the same to 1e-11, eight times the erfc calls).
        double Exceed(double d)
        {
            double c = (level - 9 * sigma) / d;
            double phiMax =
                c <= -1 ? Math.PI
                : c >= 1 ? 0
                : Math.Acos(c);
            if (phiMax <= 0)
                return 0;
            const int steps = 512;
            double s = 0,
                h = phiMax / steps;
            for (int i = 0; i < steps; i++)
                s += UpperTail((level - d * Math.Cos((i + 0.5) * h)) / sigma);
            return s * h / Math.PI;
        }
        double lo = Math.Max(0, level - 6 * sigma),
            hi = level / Math.Cos(Math.PI * tail) + 1e-12;
        // The root of ln(exceedance / tail), increasing in d and close to a straight line where the
        // tail's exponential has been taken out, bracketed to 1e-10 of the bracket's top by the
        // Illinois method (false position, the value of an end kept twice in a row halved; a halving
        // while an end's value is not finite): 9 to 16 integrations where bisection took 35.
        double flo = Math.Log(Exceed(lo) / tail);
        if (flo > 0)
            return lo;
        double fhi = Math.Log(Exceed(hi) / tail);
        if (!(fhi > 0))
            return hi;
        int kept = 0; // +1: the top was kept last time, -1: the bottom
        for (int it = 0; it < 100 && hi - lo > 1e-10 * hi; it++)
        {
            double x = lo - flo * (hi - lo) / (fhi - flo);
            if (!(x > lo && x < hi) || !double.IsFinite(flo))
                x = (lo + hi) / 2;
            double fx = Math.Log(Exceed(x) / tail);
            if (fx == 0)
                return x;
            if (fx < 0)
            {
                lo = x;
                flo = fx;
                if (kept == 1)
                    fhi /= 2;
                kept = 1;
            }
            else
            {
                hi = x;
                fhi = fx;
                if (kept == -1)
                    flo /= 2;
                kept = -1;
            }
        }
        return (lo + hi) / 2;
    }

    /// <summary>
    /// <see cref="FromPercentile"/> of an upper and a lower excursion with the same noise, the two
    /// computed side by side (each integrates the tail a few hundred thousand times).
    /// </summary>
    public static (double Upper, double Lower) FromPercentiles(double upper, double lower, double sigma)
    {
        Task<double> up = Task.Run(() => FromPercentile(upper, sigma));
        double low = FromPercentile(lower, sigma);
        return (up.Result, low);
    }

    private static double UpperTail(double z) => 0.5 * MathNet.Numerics.SpecialFunctions.Erfc(z / Math.Sqrt(2));
}

/// <summary>
/// The noise correction of peak readings, written once for the AM and FM measurements: applied
/// only when one tone carries nearly all of the demodulated signal's power in the searched band;
/// and the peak statistic's description for the method record.
/// </summary>
internal static class TonePeaks
{
    /// <summary>Share of the band's power (up to the post-detection cutoff, the discriminator's noise included) the
    /// tone's lines must hold for the correction to apply: the noise may be large, the model takes it in.</summary>
    public const double OneToneShare = 0.5;

    /// <summary>Share of the modulating components' power the strongest must hold: a second tone (a sub-audible
    /// tone under the test tone) is not noise, and the sine-plus-noise model would read the sum's peak low.</summary>
    public const double OneComponentShare = 0.99;

    /// <summary>
    /// Replaces <paramref name="up"/> and <paramref name="down"/> (peaks about the mean, both positive)
    /// by the sine's peaks (<see cref="SinePeak.FromPercentiles"/>) when the tone at
    /// <paramref name="toneHz"/> holds at least <see cref="OneToneShare"/> of the power of
    /// <paramref name="spectrum"/> between <paramref name="minHz"/> and <paramref name="maxHz"/>; the
    /// rest is the noise. Returns whether it did.
    /// </summary>
    public static bool TryCorrect(
        LineSpectrum spectrum,
        IReadOnlyList<ModulatingComponent> components,
        double toneHz,
        double minHz,
        double maxHz,
        ref double up,
        ref double down
    )
    {
        if (!OneToneCarries(components))
            return false;
        var (tone, noise) = spectrum.Split(toneHz, minHz, maxHz);
        if (!(tone >= OneToneShare * (tone + noise)))
            return false;
        (up, down) = SinePeak.FromPercentiles(up, down, Math.Sqrt(noise));
        return true;
    }

    /// <summary>
    /// The standard deviation of the noise under a peak read raw (no correction): the variance of
    /// <paramref name="spectrum"/> between <paramref name="minHz"/> and <paramref name="maxHz"/> less that of the
    /// modulating components (each a sine: peak^2 / 2), in the stream's unit. A raw percentile is pushed up by
    /// about this much: the budget carries it as a component of its own.
    /// </summary>
    public static double RawPeakNoise(
        LineSpectrum spectrum,
        IReadOnlyList<ModulatingComponent> components,
        double toneHz,
        double minHz,
        double maxHz,
        double unitsPerStream
    )
    {
        var (tone, noise) = spectrum.Split(toneHz, minHz, maxHz);
        double lines = components.Sum(c => Math.Pow(c.PeakAmount / unitsPerStream, 2) / 2);
        // A spectrum of many lines (a code word's, every 5.8 Hz) outruns the components listed, and the band less
        // their lines can read nothing: the median bin (lines are few among the band's bins) bounds the noise from
        // below.
        return Math.Sqrt(Math.Max(Math.Max(0, tone + noise - lines), MedianNoise(spectrum, minHz, maxHz)));
    }

    /// <summary>The noise variance between the edges from the median bin: median x bins, the median of a K-segment
    /// average of chi-square(2) bins taken back to its mean by (1 - 1 / (9 K))^3 (Wilson-Hilferty).</summary>
    private static double MedianNoise(LineSpectrum s, double minHz, double maxHz)
    {
        int k0 = Math.Max(7, (int)Math.Ceiling(minHz / s.BinWidthHz)),
            k1 = Math.Min(s.FftSize / 2 - 1, (int)Math.Floor(maxHz / s.BinWidthHz));
        if (k1 - k0 < 8 || s.Segments < 1)
            return 0;
        double[] p = new double[k1 - k0 + 1];
        for (int k = k0; k <= k1; k++)
            p[k - k0] = s.Power(k);
        Array.Sort(p);
        double median = p[p.Length / 2] / Math.Pow(1 - 1.0 / (9 * s.Segments), 3);
        return median * p.Length * s.VarianceScale;
    }

    /// <summary>What noise of rms <paramref name="sigma"/> can add to the extreme of <paramref name="samples"/>
    /// readings: sqrt(2 ln N) sigma (the largest of N Gaussian values, to first order).</summary>
    public static double ExtremeLift(double sigma, long samples) =>
        sigma * Math.Sqrt(2 * Math.Log(Math.Max(samples, 2)));

    /// <summary>
    /// The budget of a peak read as an extreme less <paramref name="lift"/>: half the lift (the noise at a sharp
    /// peak adds less than at a broad one) and the sampling of a sharp peak: where the components align their sum
    /// is A - 2 pi^2 sum(a_i f_i^2) t^2 near its peak (each a_i cos(2 pi f_i t) to second order), and a reading falls
    /// at most one interval of <paramref name="rateHz"/> from it (rectangular, u = bound / sqrt 3). In the
    /// components' unit times <paramref name="scale"/>.
    /// </summary>
    public static UncertaintyComponent[] ExtremeBudget(
        double lift,
        IReadOnlyList<ModulatingComponent> components,
        double rateHz,
        double scale = 1
    )
    {
        double dt = 1 / rateHz;
        double bound =
            2 * Math.PI * Math.PI * components.Sum(c => c.PeakAmount * c.FrequencyHz * c.FrequencyHz) * dt * dt;
        return
        [
            new(
                "noise at the extreme",
                scale * lift / 2,
                "half the sqrt(2 ln N) sigma taken off the extreme: the noise at a sharp peak adds less"
            ),
            new(
                "sampling of a sharp peak",
                bound / Math.Sqrt(3),
                "curvature of the components' aligned peak, 2 pi^2 sum(a_i f_i^2) dt^2, over one sample interval dt "
                    + "(rectangular, u = bound / sqrt 3)"
            ),
        ];
    }

    /// <summary>True when at most one modulating component was found, or the strongest holds at least
    /// <see cref="OneComponentShare"/> of their power.</summary>
    public static bool OneToneCarries(IReadOnlyList<ModulatingComponent> components) =>
        components.Count <= 1 || components[0].PowerShare >= OneComponentShare;

    /// <summary>The method record's words for the peak statistic of a measurement of <paramref name="kind"/>.</summary>
    public static string Describe(
        ModulationKind kind,
        Demodulation.PassResult? pass,
        bool corrected,
        IReadOnlyList<ModulatingComponent> components
    )
    {
        bool freq = kind is ModulationKind.Fm or ModulationKind.Fsk;
        bool jitter = pass is not null && (freq ? pass.JitterFrequency : pass.JitterEnvelope);
        string cutoff = freq ? "the post-detection cutoff" : "the channel filter's cutoff";
        string how = jitter
            ? "read at a pseudo-random instant in each sample interval (64-phase band-limited interpolation; "
                + $"fewer than 30 samples per period at {cutoff}); "
            : $"taken at the samples (30 or more per period at {cutoff}); ";
        return "positive peak = 99.9th percentile, negative peak = 0.1th percentile of the post-detection signal, "
            + how
            + (
                corrected ? "tone peaks corrected for the measured noise (sine-plus-Gaussian model)"
                : OneToneCarries(components) ? "raw percentiles"
                : $"raw percentiles ({components.Count} modulating components: the peak of their sum is read, no "
                    + "single-tone noise correction)"
                    + (
                        kind == ModulationKind.Fm
                            ? "; or, when larger, the extreme less sqrt(2 ln N) times the discriminator's noise rms "
                                + "(a composite's peak is rare and a percentile reads it low)"
                            : ""
                    )
            );
    }
}
