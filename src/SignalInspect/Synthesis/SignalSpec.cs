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

    /// <summary>On-off keying: the carrier on for a 1 bit and off for a 0, random bits at the symbol rate.</summary>
    Ook,

    /// <summary>A pulse train: the carrier on for the pulse width every pulse period, each pulse's amplitude and
    /// position optionally modulated by the tone.</summary>
    Pulse,

    /// <summary>16-point quadrature amplitude modulation: random symbols at the symbol rate, rectangular pulses
    /// (envelope and phase both keyed: a signal of none of the analyser's classes).</summary>
    Qam,
}

/// <summary>One more modulating tone (AM, FM, PM), added to the main one.</summary>
/// <param name="FrequencyHz">Its frequency, Hz.</param>
/// <param name="Amount">Its share of the modulation: depth m_i (AM), peak deviation D_i in Hz (FM), peak phase
/// P_i in rad (PM).</param>
public readonly record struct ExtraTone(double FrequencyHz, double Amount);

/// <summary>An unmodulated carrier beside the signal (a spur, a neighbour).</summary>
/// <param name="OffsetHz">Its offset from the signal's carrier, Hz.</param>
/// <param name="LevelDbc">Its level relative to the signal's carrier amplitude, dB (negative: weaker).</param>
public readonly record struct Spur(double OffsetHz, double LevelDbc);

/// <summary>One transmission of a keyed capture: the carrier is on from <paramref name="StartS"/> to
/// <paramref name="EndS"/>, with its own carrier offset and modulation amount when given.</summary>
/// <param name="StartS">Key-up, seconds from the first sample.</param>
/// <param name="EndS">Key-down, seconds.</param>
/// <param name="OffsetHz">Its carrier offset (replaces the spec's), Hz; null for the spec's.</param>
/// <param name="Amount">Its main tone's amount (replaces the spec's): peak deviation in Hz (FM), depth as a fraction
/// (AM), peak phase in rad (PM); null for the spec's.</param>
/// <param name="ToneHz">Its main modulating tone's frequency (replaces the spec's), Hz; null for the spec's (a tone
/// series for an audio response: one burst per tone).</param>
public readonly record struct Burst(
    double StartS,
    double EndS,
    double? OffsetHz = null,
    double? Amount = null,
    double? ToneHz = null
);

/// <summary>A digital code squelch word sent under FM: its 23 bits repeated at 134.4 bit/s from each burst's start
/// (0 without bursts), least significant bit first (<see cref="Dsp.DcsCode.Word"/>), each bit adding
/// +<paramref name="DeviationHz"/> (a 1) or -<paramref name="DeviationHz"/> (a 0) to the instantaneous frequency
/// (non-return-to-zero, each change a 2 ms raised-cosine edge: a transmitter filters the word).</summary>
/// <param name="Code">The code number, 0 to 511 (e.g. 0x13 for "023").</param>
/// <param name="Inverted">Every bit complemented.</param>
/// <param name="DeviationHz">Its deviation, Hz.</param>
/// <param name="TurnOffS">The turn-off code: for the last this many seconds of each burst (of the capture without
/// bursts) a 134.4 Hz tone of the same deviation replaces the word; 0 for none.</param>
public readonly record struct CodeSquelchSpec(int Code, bool Inverted, double DeviationHz, double TurnOffS = 0);

/// <summary>A reverse burst at each key-down: for the last <paramref name="DurationS"/> seconds of each burst (of the
/// capture without bursts) the added tones' phase is shifted by <paramref name="ShiftDeg"/>.</summary>
/// <param name="ShiftDeg">The phase shift, degrees (180 in common use, 120 on some radios).</param>
/// <param name="DurationS">How long before key-down, s.</param>
public readonly record struct ReverseBurstSpec(double ShiftDeg, double DurationS);

/// <summary>A key-up transient: at each key-up the carrier starts <paramref name="ExcursionHz"/> away and settles
/// exponentially with time constant <paramref name="TauS"/>.</summary>
/// <param name="ExcursionHz">Frequency difference at the key-up instant, Hz (signed).</param>
/// <param name="TauS">Time constant of the settling, s.</param>
public readonly record struct KeyUpTransient(double ExcursionHz, double TauS);

/// <summary>
/// Parameters of a synthesised test signal. Formulas (t = n / fs, n = 0, 1, ...):
/// <list type="bullet">
/// <item>complex: s[n] = a(t) exp(j (2 pi (f0 t + d t^2 / 2) + phi(t))); real: s[n] = a(t) cos(the same phase);</item>
/// <item>CW: a = A, phi = 0; AM: a = A max(0, 1 + m cos(2 pi fm t) + sum_i m_i cos(2 pi f_i t)), phi = 0
/// (a depth above 1 is overmodulation: the envelope is cut off at zero, as a transmitter's final stage does);</item>
/// <item>FM: a = A, phi = (D / fm) sin(2 pi fm t) + sum_i (D_i / f_i) sin(2 pi f_i t), so the instantaneous
/// frequency is f0 + D cos(2 pi fm t) + sum_i D_i cos(2 pi f_i t);</item>
/// <item>PM: a = A, phi = P sin(2 pi fm t) + sum_i P_i sin(2 pi f_i t);</item>
/// <item>OOK: a = A for a 1 bit, 0 for a 0 bit, symbols as FSK's, phi = 0;</item>
/// <item>spurs: each adds A 10^(L/20) exp(j 2 pi (f0 + offset) t) (complex) or its cosine (real);</item>
/// <item>IQ image (complex only): z + g conj(z) with g = 10^(image/20), the mirror a receiver's I/Q imbalance
/// leaves at minus the offset;</item>
/// <item>FSK: a = A, continuous phase, instantaneous frequency f0 +/- shift/2 for bit 1/0, symbol k covering
/// floor(n Rs / fs) = k, bits from the seeded generator;</item>
/// <item>bursts (when any is given): a = 0 outside them (the noise, spurs and image stay: a receiver hears its own
/// noise between calls); inside one, its offset and amount replace f0 and the main tone's D, m or P;</item>
/// <item>pulse: pulse k (t_k = k T) is on from t_k + D sin(2 pi fm t_k) for the width W, with amplitude
/// A (1 + m cos(2 pi fm t_k)) (T, W, m, D: PulsePeriodS, PulseWidthS, PulseAmDepth, PulsePositionS);</item>
/// <item>key-up transient (E, tau): from each burst's start t_on (0 without bursts) the instantaneous frequency
/// gains E exp(-(t - t_on) / tau), the phase 2 pi E tau (1 - exp(-(t - t_on) / tau));</item>
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

    /// <summary>More modulating tones (AM, FM, PM), e.g. a sub-audible tone under the test tone.</summary>
    public IReadOnlyList<ExtraTone> ExtraTones { get; init; } = [];

    /// <summary>Unmodulated carriers beside the signal.</summary>
    public IReadOnlyList<Spur> Spurs { get; init; } = [];

    /// <summary>Level of the IQ image relative to the signal, dB (complex output only); null for none.</summary>
    public double? ImageDbc { get; init; }

    /// <summary>A band-limited receiver: the noise only within +/- this many Hz of the centre (its filter, 80 dB
    /// down beyond a transition of a tenth of it), flat inside at the density the SNR gives; null for noise over the
    /// whole band (complex output only).</summary>
    public double? NoiseBandHz { get; init; }

    /// <summary>Transmissions of a keyed capture (the carrier is off outside them); empty for a carrier on
    /// throughout. The SNR is the signal's while on.</summary>
    public IReadOnlyList<Burst> Bursts { get; init; } = [];

    /// <summary>The burst holding time <paramref name="t"/> (bursts in the order given, the first that holds it),
    /// or null when the carrier is off.</summary>
    internal Burst? BurstAt(double t)
    {
        foreach (Burst b in Bursts)
            if (t >= b.StartS && t < b.EndS)
                return b;
        return null;
    }

    /// <summary>Other emissions in the same capture (a band holding several signals): each is generated as its own
    /// spec (its own kind, offset, amplitude, bursts and seed) and added to this one; their noise settings are
    /// ignored (this spec's noise is the capture's, its SNR relative to this signal). Same rate, duration and
    /// complex or real output as this one.</summary>
    public IReadOnlyList<SignalSpec> Others { get; init; } = [];

    /// <summary>Write what a receiver's FM discriminator gives instead of the signal: real audio, the instantaneous
    /// frequency's deviation (D cos(2 pi fm t) + sum D_i cos(2 pi f_i t)) over this many Hz per full scale, the noise
    /// added only while the carrier is on (the squelch closes between bursts: silence); null for the signal
    /// itself. FM and real output only.</summary>
    public double? DiscriminatorHzPerFullScale { get; init; }

    /// <summary>Residual FM: Gaussian frequency noise of this rms, Hz, within 300-3000 Hz (a transmitter's hum and
    /// noise), added to the carrier's phase; null for none. Complex output only.</summary>
    public double? ResidualFmHz { get; init; }

    /// <summary>A digital code squelch word under the FM (added to its instantaneous frequency); null for
    /// none.</summary>
    public CodeSquelchSpec? CodeSquelch { get; init; }

    /// <summary>A reverse burst of the added tones at each key-down; null for none.</summary>
    public ReverseBurstSpec? ReverseBurst { get; init; }

    /// <summary>Pulse width, s (pulse trains).</summary>
    public double PulseWidthS { get; init; } = 0.001;

    /// <summary>Pulse period, s (pulse trains).</summary>
    public double PulsePeriodS { get; init; } = 0.004;

    /// <summary>Pulse amplitude modulation: pulse k has amplitude A (1 + m cos(2 pi fm t_k)); 0 for none.</summary>
    public double PulseAmDepth { get; init; }

    /// <summary>Pulse position modulation: pulse k starts at t_k + D sin(2 pi fm t_k), D in s; 0 for none.</summary>
    public double PulsePositionS { get; init; }

    /// <summary>A key-up transient at each burst's start (at 0 without bursts); null for none.</summary>
    public KeyUpTransient? KeyUp { get; init; }

    /// <summary>Seed of the noise and FSK data generator.</summary>
    public int Seed { get; init; } = 1;

    /// <summary>Samples in the capture: round(duration x rate).</summary>
    public long SampleCount => (long)Math.Round(DurationS * SampleRateHz);

    /// <summary>
    /// Mean power of the noise-free signal of interest in full-scale units (spurs and the image are not part of
    /// it: the SNR is the signal's). AM: A^2 (1 + m^2/2 + sum m_i^2/2) when the envelope stays above zero, else the
    /// mean of the clipped envelope squared over a long stretch (numerically); OOK: A^2 / 2.
    /// </summary>
    public double SignalPower
    {
        get
        {
            double p = Kind switch
            {
                SignalKind.Am when AmDepth + ExtraTones.Sum(t => Math.Abs(t.Amount)) <= 1 => Amplitude
                    * Amplitude
                    * (1 + AmDepth * AmDepth / 2 + ExtraTones.Sum(t => t.Amount * t.Amount / 2)),
                SignalKind.Am => Amplitude * Amplitude * ClippedEnvelopePower(),
                SignalKind.Ook => Amplitude * Amplitude / 2,
                SignalKind.Qam => Amplitude * Amplitude * 10.0 / 18, // mean of (i^2 + q^2) / 18 over i, q in +/-1, 3
                SignalKind.Pulse => Amplitude
                    * Amplitude
                    * (1 + PulseAmDepth * PulseAmDepth / 2)
                    * Math.Min(1, PulseWidthS / PulsePeriodS),
                _ => Amplitude * Amplitude,
            };
            if (DiscriminatorHzPerFullScale is { } k)
                return (PeakDeviationHz * PeakDeviationHz + ExtraTones.Sum(t => t.Amount * t.Amount)) / (2 * k * k);
            return IsComplex ? p : p / 2;
        }
    }

    /// <summary>Mean of max(0, 1 + m cos + sum m_i cos)^2 over 2^16 samples at the spec's rate.</summary>
    private double ClippedEnvelopePower()
    {
        const int n = 1 << 16;
        double sum = 0;
        for (int k = 0; k < n; k++)
            sum += Math.Pow(Envelope(k), 2);
        return sum / n;
    }

    /// <summary>The AM envelope factor at sample k: max(0, 1 + m cos(2 pi fm t) + sum_i m_i cos(2 pi f_i t)).</summary>
    internal double Envelope(long k) => Envelope(k, AmDepth);

    /// <summary>The AM envelope factor at sample k with the main tone's depth <paramref name="depth"/>.</summary>
    internal double Envelope(long k, double depth)
    {
        double e = 1 + depth * Math.Cos(2 * Math.PI * Frac(ModulatingFrequencyHz * k / SampleRateHz));
        foreach (ExtraTone t in ExtraTones)
            e += t.Amount * Math.Cos(2 * Math.PI * Frac(t.FrequencyHz * k / SampleRateHz));
        return Math.Max(0, e);
    }

    internal static double Frac(double x) => x - Math.Floor(x);

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
        if (!IsComplex && CarrierOffsetHz <= 0 && DiscriminatorHzPerFullScale is null)
            throw new SettingException(
                nameof(CarrierOffsetHz),
                CarrierOffsetHz,
                "a real signal needs a positive carrier frequency"
            );
        if (Kind is SignalKind.Am or SignalKind.Fm or SignalKind.Pm)
            Positive(ModulatingFrequencyHz, nameof(ModulatingFrequencyHz));
        if (Kind == SignalKind.Am && (!double.IsFinite(AmDepth) || AmDepth < 0 || AmDepth > 4))
            throw new SettingException(nameof(AmDepth), AmDepth, "must be from 0 to 4 (above 1: overmodulated)");
        double peakFactor = 1 + AmDepth + ExtraTones.Sum(t => Math.Abs(t.Amount));
        if (Kind == SignalKind.Am && Amplitude * peakFactor > 1)
            throw new SettingException(
                nameof(Amplitude),
                Amplitude,
                "x (1 + the depths) must not exceed full scale (1.0)"
            );
        foreach (ExtraTone t in ExtraTones)
            if (!(t.FrequencyHz > 0 && t.FrequencyHz < SampleRateHz / 2 && double.IsFinite(t.Amount)))
                throw new SettingException(
                    nameof(ExtraTones),
                    t.FrequencyHz,
                    "each extra tone needs a frequency between 0 and half the sample rate and a finite amount"
                );
        if (ExtraTones.Count > 0 && Kind is not (SignalKind.Am or SignalKind.Fm or SignalKind.Pm))
            throw new SettingException(nameof(ExtraTones), ExtraTones.Count, "extra tones apply to am, fm and pm");
        foreach (Spur sp in Spurs)
            if (
                !(
                    double.IsFinite(sp.OffsetHz)
                    && Math.Abs(CarrierOffsetHz + sp.OffsetHz) < SampleRateHz / 2
                    && sp.LevelDbc <= 0
                )
            )
                throw new SettingException(
                    nameof(Spurs),
                    sp.OffsetHz,
                    "a spur must lie inside the sampled band and be at most as strong as the carrier (0 dBc)"
                );
        if (NoiseBandHz is { } nb && (!IsComplex || !(nb > 0 && nb * 1.1 < SampleRateHz / 2)))
            throw new SettingException(
                nameof(NoiseBandHz),
                nb,
                "a receiver's noise band needs complex output and must end (with its transition) inside the "
                    + "sampled band"
            );
        if (ImageDbc is { } img && (!IsComplex || !(img < 0)))
            throw new SettingException(
                nameof(ImageDbc),
                img,
                "an IQ image needs complex output and a level below 0 dB"
            );
        if (Kind == SignalKind.Fm)
            Positive(PeakDeviationHz, nameof(PeakDeviationHz));
        if (Kind == SignalKind.Pm)
            Positive(PeakPhaseRad, nameof(PeakPhaseRad));
        if (Kind == SignalKind.Pulse)
        {
            Positive(PulseWidthS, nameof(PulseWidthS));
            Positive(PulsePeriodS, nameof(PulsePeriodS));
            if (!(PulseWidthS < PulsePeriodS))
                throw new SettingException(nameof(PulseWidthS), PulseWidthS, "must be shorter than the pulse period");
            if (!(PulseAmDepth >= 0 && PulseAmDepth <= 1))
                throw new SettingException(nameof(PulseAmDepth), PulseAmDepth, "must be from 0 to 100 %");
            if (!(PulsePositionS >= 0 && PulsePositionS + PulseWidthS < PulsePeriodS / 2))
                throw new SettingException(
                    nameof(PulsePositionS),
                    PulsePositionS,
                    "must be 0 or more and keep each pulse within half a period of its place"
                );
        }
        if (Kind is SignalKind.Fsk or SignalKind.Ook or SignalKind.Qam)
            Positive(SymbolRateBd, nameof(SymbolRateBd));
        if (Kind == SignalKind.Fsk)
        {
            Positive(FskShiftHz, nameof(FskShiftHz));
            Positive(SymbolRateBd, nameof(SymbolRateBd));
        }
        foreach (Burst b in Bursts)
        {
            if (!(double.IsFinite(b.StartS) && double.IsFinite(b.EndS) && b.StartS >= 0 && b.EndS > b.StartS))
                throw new SettingException(
                    nameof(Bursts),
                    b.StartS,
                    "each burst needs 0 <= start < end, in seconds from the first sample"
                );
            if (b.StartS >= DurationS)
                throw new SettingException(nameof(Bursts), b.StartS, "a burst must start before the capture ends");
            if (Bursts.Any(o => o != b && o.StartS < b.EndS && b.StartS < o.EndS))
                throw new SettingException(nameof(Bursts), b.StartS, "bursts must not overlap");
            if (b.OffsetHz is { } bo && !(Math.Abs(bo) < SampleRateHz / 2 && (IsComplex || bo > 0)))
                throw new SettingException(nameof(Bursts), bo, "a burst's offset must lie inside the sampled band");
            if (b.ToneHz is { } bt && !(bt > 0 && bt < SampleRateHz / 2))
                throw new SettingException(nameof(Bursts), bt, "a burst's tone must lie between 0 and half the rate");
            if (b.Amount is { } ba && !(double.IsFinite(ba) && ba >= 0))
                throw new SettingException(nameof(Bursts), ba, "a burst's amount must be a number from 0 up");
        }
        if (KeyUp is { } ku && !(double.IsFinite(ku.ExcursionHz) && ku.TauS > 0 && ku.TauS < 10))
            throw new SettingException(
                nameof(KeyUp),
                ku.TauS,
                "needs a finite excursion in Hz and a time constant from 0 to 10 s"
            );
        if (!double.IsFinite(DriftHzPerS))
            throw new SettingException(nameof(DriftHzPerS), DriftHzPerS, "must be a number");
        if (SnrDb is { } s && !double.IsFinite(s))
            throw new SettingException(nameof(SnrDb), s, "must be a number in dB");
        if (
            DiscriminatorHzPerFullScale is { } dk
            && (!(dk > 0) || Kind != SignalKind.Fm || IsComplex || Others.Count > 0)
        )
            throw new SettingException(
                nameof(DiscriminatorHzPerFullScale),
                dk,
                "writes an FM signal's discriminator audio: needs a positive scale, FM, real output and one emission"
            );
        if (ResidualFmHz is { } rf && !(rf > 0 && rf < SampleRateHz / 4 && IsComplex && SampleRateHz > 8000))
            throw new SettingException(
                nameof(ResidualFmHz),
                rf,
                "needs complex output at more than 8 kHz and a positive rms below a quarter of the sample rate"
            );
        if (CodeSquelch is { } cs && !(Kind == SignalKind.Fm && cs.Code is >= 0 and < 512 && cs.DeviationHz > 0))
            throw new SettingException(
                nameof(CodeSquelch),
                cs.Code,
                "needs FM, a code of three octal digits and a positive deviation"
            );
        if (
            ReverseBurst is { } rb
            && !(ExtraTones.Count > 0 && rb.DurationS > 0 && rb.DurationS < DurationS && double.IsFinite(rb.ShiftDeg))
        )
            throw new SettingException(
                nameof(ReverseBurst),
                rb.DurationS,
                "needs an added (sub-audible) tone, a finite shift and a duration shorter than the capture"
            );
        foreach (SignalSpec o in Others)
        {
            if (o.SampleRateHz != SampleRateHz || o.DurationS != DurationS || o.IsComplex != IsComplex)
                throw new SettingException(
                    nameof(Others),
                    o.CarrierOffsetHz,
                    "another emission must share the capture's rate, duration and complex or real output"
                );
            if (o.Others.Count > 0)
                throw new SettingException(nameof(Others), o.CarrierOffsetHz, "another emission holds no others");
            o.Validate();
        }
    }
}
