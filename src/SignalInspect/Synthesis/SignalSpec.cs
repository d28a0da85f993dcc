namespace SignalInspect.Synthesis;

/// <summary>The kinds of test signal the synthesiser makes.</summary>
public enum SignalKind
{
    /// <summary>Unmodulated carrier.</summary>
    Cw,

    /// <summary>Double-sideband full-carrier AM by one tone.</summary>
    Am,

    /// <summary>FM by one tone.</summary>
    Fm,

    /// <summary>PM by one tone.</summary>
    Pm,

    /// <summary>Binary continuous-phase FSK with random data.</summary>
    Fsk,

    /// <summary>Noise only (no carrier).</summary>
    Noise,
}

/// <summary>
/// Parameters of a synthesised test signal. Formulas (t = n / fs, n = 0, 1, ...):
/// <list type="bullet">
/// <item>complex: s[n] = a(t) exp(j (2 pi (f0 t + d t^2 / 2) + phi(t))); real: s[n] = a(t) cos(the same phase);</item>
/// <item>CW: a = A, phi = 0; AM: a = A (1 + m cos(2 pi fm t)), phi = 0;</item>
/// <item>FM: a = A, phi = (D / fm) sin(2 pi fm t), so the instantaneous frequency is f0 + D cos(2 pi fm t);</item>
/// <item>PM: a = A, phi = P sin(2 pi fm t);</item>
/// <item>FSK: a = A, continuous phase, instantaneous frequency f0 +/- shift/2 for bit 1/0, symbol k covering
/// floor(n Rs / fs) = k, bits from the seeded generator;</item>
/// <item>noise: white Gaussian, complex circular (I and Q each of variance sigma^2 / 2) for complex output,
/// real of variance sigma^2 for real output, with sigma^2 = P / 10^(SNR/10) and P the signal's mean power
/// (A^2 (1 + m^2/2) for complex AM, A^2 for complex angle modulation; half of those for real output).
/// SNR is therefore measured over the whole sampled bandwidth (fs for complex, fs/2 for real).</item>
/// </list>
/// f0 is the carrier offset from the centre (complex) or the carrier frequency itself (real), d the drift rate.
/// </summary>
public sealed record SignalSpec
{
    /// <summary>Signal kind.</summary>
    public SignalKind Kind { get; init; } = SignalKind.Cw;

    /// <summary>Sample rate in Hz, positive.</summary>
    public double SampleRateHz { get; init; } = 48_000;

    /// <summary>Duration in seconds, positive.</summary>
    public double DurationS { get; init; } = 1.0;

    /// <summary>True for complex (I/Q) output, false for a real signal.</summary>
    public bool IsComplex { get; init; } = true;

    /// <summary>Centre (tuning) frequency written to the metadata, null for unknown.</summary>
    public double? CenterFrequencyHz { get; init; }

    /// <summary>Carrier offset from the centre in Hz (complex), or the carrier frequency (real).</summary>
    public double CarrierOffsetHz { get; init; }

    /// <summary>Carrier amplitude A in full-scale units.</summary>
    public double Amplitude { get; init; } = 0.5;

    /// <summary>Modulating tone frequency fm in Hz (AM, FM, PM).</summary>
    public double ModulatingFrequencyHz { get; init; } = 1000;

    /// <summary>AM depth m, 0 to 1 (1 = 100 %).</summary>
    public double AmDepth { get; init; } = 0.5;

    /// <summary>FM peak deviation D in Hz.</summary>
    public double PeakDeviationHz { get; init; } = 2500;

    /// <summary>PM peak phase deviation P in radians.</summary>
    public double PeakPhaseRad { get; init; } = 1.0;

    /// <summary>FSK shift (distance between the two tones) in Hz.</summary>
    public double FskShiftHz { get; init; } = 1000;

    /// <summary>FSK symbol rate in baud.</summary>
    public double SymbolRateBd { get; init; } = 1200;

    /// <summary>Carrier drift in Hz per second (linear).</summary>
    public double DriftHzPerS { get; init; }

    /// <summary>Signal-to-noise ratio in dB over the sampled bandwidth; null for no noise.</summary>
    public double? SnrDb { get; init; }

    /// <summary>Seed of the noise and FSK data generator.</summary>
    public int Seed { get; init; } = 1;

    /// <summary>Samples in the capture: round(duration x rate).</summary>
    public long SampleCount => (long)Math.Round(DurationS * SampleRateHz);

    /// <summary>Mean power of the noise-free signal in full-scale units.</summary>
    public double SignalPower
    {
        get
        {
            double p = Kind switch
            {
                SignalKind.Am => Amplitude * Amplitude * (1 + AmDepth * AmDepth / 2),
                SignalKind.Noise => Amplitude * Amplitude,
                _ => Amplitude * Amplitude,
            };
            return IsComplex ? p : p / 2;
        }
    }

    /// <summary>Checks every parameter; the message names the parameter and its allowed range.</summary>
    /// <exception cref="SettingException">A parameter is out of range (named by its property).</exception>
    public void Validate()
    {
        static void Positive(double v, string name)
        {
            if (!double.IsFinite(v) || v <= 0)
                throw new SettingException(name, v, "must be a positive number");
        }
        Positive(SampleRateHz, nameof(SampleRateHz));
        Positive(DurationS, nameof(DurationS));
        if (SampleCount < 1)
            throw new SettingException(nameof(DurationS), DurationS, "gives no sample at this rate");
        if (!double.IsFinite(Amplitude) || Amplitude < 0 || Amplitude > 1)
            throw new SettingException(nameof(Amplitude), Amplitude, "must be from 0 to 1 (full scale)");
        if (!double.IsFinite(CarrierOffsetHz) || Math.Abs(CarrierOffsetHz) >= SampleRateHz / 2)
            throw new SettingException(
                nameof(CarrierOffsetHz),
                CarrierOffsetHz,
                "must lie inside +/- half the sample rate"
            );
        if (!IsComplex && CarrierOffsetHz <= 0)
            throw new SettingException(
                nameof(CarrierOffsetHz),
                CarrierOffsetHz,
                "a real signal needs a positive carrier frequency"
            );
        if (Kind is SignalKind.Am or SignalKind.Fm or SignalKind.Pm)
            Positive(ModulatingFrequencyHz, nameof(ModulatingFrequencyHz));
        if (Kind == SignalKind.Am && (!double.IsFinite(AmDepth) || AmDepth < 0 || AmDepth > 1))
            throw new SettingException(nameof(AmDepth), AmDepth, "must be from 0 to 1");
        if (Kind == SignalKind.Am && Amplitude * (1 + AmDepth) > 1)
            throw new SettingException(nameof(Amplitude), Amplitude, "x (1 + depth) must not exceed full scale (1.0)");
        if (Kind == SignalKind.Fm)
            Positive(PeakDeviationHz, nameof(PeakDeviationHz));
        if (Kind == SignalKind.Pm)
            Positive(PeakPhaseRad, nameof(PeakPhaseRad));
        if (Kind == SignalKind.Fsk)
        {
            Positive(FskShiftHz, nameof(FskShiftHz));
            Positive(SymbolRateBd, nameof(SymbolRateBd));
        }
        if (!double.IsFinite(DriftHzPerS))
            throw new SettingException(nameof(DriftHzPerS), DriftHzPerS, "must be a number");
        if (SnrDb is { } s && !double.IsFinite(s))
            throw new SettingException(nameof(SnrDb), s, "must be a number in dB");
    }
}
