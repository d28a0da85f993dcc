namespace SignalInspect.Synthesis;

/// <summary>
/// Generates the samples of a <see cref="SignalSpec"/> block by block (interleaved I, Q for
/// complex output). Phases are computed from the sample index, not accumulated, except for
/// FSK whose phase is continuous by definition; the result does not depend on the block size.
/// </summary>
public sealed class SignalGenerator
{
    private readonly SignalSpec _spec;
    private readonly Random _random;
    private readonly double _noiseSigma;
    private long _n;
    private double _fskCycles;
    private long _symbol = -1;
    private int _bit;
    private double? _spareGaussian;
    private readonly double[]? _noiseTaps;
    private readonly double[] _noiseRing = [];
    private int _noiseAt;
    private readonly SignalGenerator[] _others;
    private readonly Random _fmRandom;
    private readonly double[] _fmTaps = [];
    private readonly double[] _fmRing = [];
    private int _fmAt;
    private double _fmScale,
        _fmCycles;
    private double[] _otherBuffer = [];
    private double _codeCycles;
    private readonly int _codeWord;

    /// <summary>Creates a generator at sample 0.</summary>
    /// <exception cref="SettingException">The spec is invalid (named by its property).</exception>
    public SignalGenerator(SignalSpec spec)
    {
        spec.Validate();
        _spec = spec;
        _random = new Random(spec.Seed);
        _noiseSigma = spec.SnrDb is { } snr ? Math.Sqrt(spec.SignalPower / Math.Pow(10, snr / 10)) : 0;
        if (spec.Kind == SignalKind.Noise)
            _noiseSigma = Math.Sqrt(spec.SignalPower);
        _fmRandom = new Random(spec.Seed + 7919);
        if (spec.ResidualFmHz is { } rfm)
        {
            // Band-pass 300-3000 Hz as the difference of two low-passes of one length; white noise scaled so that
            // the output's rms is the residual asked for (its variance is sum h^2 times the input's).
            double fs = spec.SampleRateHz;
            double[] hi = Dsp.FirDesign.LowPass(3000, fs, 200, 80, 4095),
                lo = Dsp.FirDesign.LowPass(300, fs, 200, 80, 4095);
            int n = Math.Max(hi.Length, lo.Length);
            _fmTaps = new double[n];
            for (int i = 0; i < hi.Length; i++)
                _fmTaps[i + (n - hi.Length) / 2] += hi[i];
            for (int i = 0; i < lo.Length; i++)
                _fmTaps[i + (n - lo.Length) / 2] -= lo[i];
            _fmRing = new double[n];
            _fmScale = rfm / Math.Sqrt(_fmTaps.Sum(h => h * h));
        }
        if (spec.CodeSquelch is { } cs)
            _codeWord = Dsp.DcsCode.Word(cs.Code, cs.Inverted);
        _others = [.. spec.Others.Select(o => new SignalGenerator(o with { SnrDb = null, NoiseBandHz = null }))];
        if (spec.NoiseBandHz is { } band)
        {
            _noiseTaps = Dsp.FirDesign.LowPass(band, spec.SampleRateHz, 0.1 * band, 80, 4095);
            _noiseRing = new double[2 * _noiseTaps.Length];
        }
    }

    /// <summary>The next complex noise sample: white, or through the receiver's filter (unit gain in its passband,
    /// so the density there is the white noise's).</summary>
    private (double I, double Q) NextNoise()
    {
        double wi = Gaussian() * _noiseSigma / Math.Sqrt(2),
            wq = Gaussian() * _noiseSigma / Math.Sqrt(2);
        if (_noiseTaps is not { } h)
            return (wi, wq);
        int l = h.Length;
        _noiseAt = (_noiseAt + 1) % l;
        _noiseRing[2 * _noiseAt] = wi;
        _noiseRing[2 * _noiseAt + 1] = wq;
        double ni = 0,
            nq = 0;
        for (int k = 0; k < l; k++)
        {
            int j = (_noiseAt - k + l) % l;
            ni += h[k] * _noiseRing[2 * j];
            nq += h[k] * _noiseRing[2 * j + 1];
        }
        return (ni, nq);
    }

    /// <summary>The residual FM's phase so far in cycles: band-limited Gaussian frequency noise, integrated.</summary>
    private double NextResidualCycles(double fs)
    {
        int l = _fmTaps.Length;
        _fmAt = (_fmAt + 1) % l;
        double u1 = 1 - _fmRandom.NextDouble(),
            u2 = _fmRandom.NextDouble();
        _fmRing[_fmAt] = Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2) * _fmScale;
        double f = 0;
        for (int k = 0; k < l; k++)
            f += _fmTaps[k] * _fmRing[(_fmAt - k + l) % l];
        _fmCycles = Frac(_fmCycles + f / fs);
        return _fmCycles;
    }

    /// <summary>Values per sample: 2 for complex, 1 for real.</summary>
    public int ValuesPerSample => _spec.IsComplex ? 2 : 1;

    /// <summary>Samples still to come.</summary>
    public long Remaining => _spec.SampleCount - _n;

    /// <summary>Fills <paramref name="destination"/> with the next samples; returns how many.</summary>
    public int Generate(Span<double> destination)
    {
        int count = GenerateOwn(destination);
        if (_others.Length == 0)
            return count;
        int values = count * ValuesPerSample;
        if (_otherBuffer.Length < values)
            _otherBuffer = new double[values];
        foreach (SignalGenerator o in _others)
        {
            o.GenerateOwn(_otherBuffer.AsSpan(0, values));
            for (int i = 0; i < values; i++)
                destination[i] += _otherBuffer[i];
        }
        return count;
    }

    private int GenerateOwn(Span<double> destination)
    {
        int count = (int)Math.Min(destination.Length / ValuesPerSample, Remaining);
        SignalSpec s = _spec;
        double fs = s.SampleRateHz;
        for (int i = 0; i < count; i++, _n++)
        {
            double t = _n / fs;
            double a = s.Amplitude;
            double offset = s.CarrierOffsetHz;
            double? amount = null;
            double keyedAt = 0,
                tone = s.ModulatingFrequencyHz;
            if (s.Bursts.Count > 0)
            {
                if (s.BurstAt(t) is { } burst)
                    (offset, amount, keyedAt, tone) = (
                        burst.OffsetHz ?? offset,
                        burst.Amount,
                        burst.StartS,
                        burst.ToneHz ?? tone
                    );
                else
                    a = 0;
            }
            double cycles = Frac(offset * _n / fs) + Frac(0.5 * s.DriftHzPerS * t * t);
            if (_fmTaps.Length > 0)
                cycles += NextResidualCycles(fs);
            if (s.KeyUp is { } ku && a > 0)
                cycles += Frac(ku.ExcursionHz * ku.TauS * (1 - Math.Exp(-(t - keyedAt) / ku.TauS)));
            double phi = 0;
            switch (s.Kind)
            {
                case SignalKind.Am when s.ExtraTones.Count == 0 && (amount ?? s.AmDepth) <= 1:
                    a *= 1 + (amount ?? s.AmDepth) * Math.Cos(2 * Math.PI * Frac(tone * _n / fs));
                    break;
                case SignalKind.Am:
                    a *= s.Envelope(_n, amount ?? s.AmDepth);
                    break;
                case SignalKind.Fm:
                    phi = (amount ?? s.PeakDeviationHz) / tone * Math.Sin(2 * Math.PI * Frac(tone * _n / fs));
                    foreach (ExtraTone x in s.ExtraTones)
                        phi += x.Amount / x.FrequencyHz * ShiftedSine(s, x.FrequencyHz, t);
                    if (s.CodeSquelch is { } cs)
                    {
                        _codeCycles = Frac(_codeCycles + CodeLevel(s, t, keyedAt) * cs.DeviationHz / fs);
                        cycles += _codeCycles;
                    }
                    break;
                case SignalKind.Pm:
                    phi = (amount ?? s.PeakPhaseRad) * Math.Sin(2 * Math.PI * Frac(tone * _n / fs));
                    foreach (ExtraTone x in s.ExtraTones)
                        phi += x.Amount * Math.Sin(2 * Math.PI * Frac(x.FrequencyHz * _n / fs));
                    break;
                case SignalKind.Ook:
                    long symbol = (long)Math.Floor(_n * s.SymbolRateBd / fs);
                    while (_symbol < symbol)
                    {
                        _bit = _random.Next(2);
                        _symbol++;
                    }
                    a *= _bit;
                    break;
                case SignalKind.Fsk:
                    long k = (long)Math.Floor(_n * s.SymbolRateBd / fs);
                    while (_symbol < k)
                    {
                        _bit = _random.Next(2);
                        _symbol++;
                    }
                    cycles += _fskCycles;
                    _fskCycles = Frac(_fskCycles + (_bit == 1 ? 0.5 : -0.5) * s.FskShiftHz / fs);
                    break;
                case SignalKind.Pulse:
                    a *= PulseAmplitude(s, t);
                    break;
                case SignalKind.Qam:
                    long q = (long)Math.Floor(_n * s.SymbolRateBd / fs);
                    while (_symbol < q)
                    {
                        _bit = _random.Next(16);
                        _symbol++;
                    }
                    // I and Q from +/-1, +/-3, scaled so that the corner point (3, 3) has amplitude a.
                    double si = 2 * (_bit & 3) - 3,
                        sq = 2 * (_bit >> 2) - 3;
                    a *= Math.Sqrt(si * si + sq * sq) / Math.Sqrt(18);
                    phi = Math.Atan2(sq, si);
                    break;
                case SignalKind.Noise:
                    a = 0;
                    break;
            }
            if (s.DiscriminatorHzPerFullScale is { } scale)
            {
                // The discriminator's output: the deviation, noise only while the carrier is on (squelch).
                double dev = 0;
                if (a > 0)
                {
                    dev =
                        (amount ?? s.PeakDeviationHz) * Math.Cos(2 * Math.PI * Frac(s.ModulatingFrequencyHz * _n / fs));
                    foreach (ExtraTone x in s.ExtraTones)
                        dev +=
                            x.Amount * Math.Cos(2 * Math.PI * Frac(x.FrequencyHz * _n / fs) + ReverseShift(s, t).Rad);
                    if (s.CodeSquelch is { } cs)
                        dev += CodeLevel(s, t, keyedAt) * cs.DeviationHz;
                    dev = dev / scale + (_noiseSigma > 0 ? Gaussian() * _noiseSigma : 0);
                }
                destination[i] = dev;
                continue;
            }
            double theta = 2 * Math.PI * cycles + phi;
            double zi = a * Math.Cos(theta),
                zq = a * Math.Sin(theta);
            foreach (Spur sp in s.Spurs)
            {
                double g = s.Amplitude * Math.Pow(10, sp.LevelDbc / 20);
                double th = 2 * Math.PI * (cycles + Frac(sp.OffsetHz * _n / fs));
                zi += g * Math.Cos(th);
                zq += g * Math.Sin(th);
            }
            if (s.ImageDbc is { } image)
            {
                double g = Math.Pow(10, image / 20);
                (zi, zq) = (zi + g * zi, zq - g * zq); // z + g conj(z)
            }
            if (s.IsComplex)
            {
                double ni = 0,
                    nq = 0;
                if (_noiseSigma > 0)
                    (ni, nq) = NextNoise();
                destination[2 * i] = zi + ni;
                destination[2 * i + 1] = zq + nq;
            }
            else
            {
                destination[i] = zi + (_noiseSigma > 0 ? Gaussian() * _noiseSigma : 0);
            }
        }
        return count;
    }

    /// <summary>The code word's level at <paramref name="t"/>, keyed up at <paramref name="keyedAt"/>: +1 for a 1 bit,
    /// -1 for a 0, each change a raised-cosine edge of <see cref="CodeEdgeS"/> centred on the bits' boundary; in the
    /// turn-off code's stretch before key-down, cos(2 pi 134.4 t).</summary>
    private double CodeLevel(SignalSpec s, double t, double keyedAt)
    {
        if (s.CodeSquelch is { TurnOffS: > 0 } cs)
        {
            double end = s.Bursts.Count > 0 ? (s.BurstAt(t) is { } b ? b.EndS : double.NaN) : s.DurationS;
            if (t >= end - cs.TurnOffS)
                return Math.Cos(2 * Math.PI * Frac(Dsp.DcsCode.BitRateHz * t));
        }
        return WordLevel(t - keyedAt);
    }

    private double WordLevel(double sinceKeyUp)
    {
        double u = Math.Max(0, sinceKeyUp) * Dsp.DcsCode.BitRateHz;
        long k = (long)Math.Floor(u);
        double Bit(long i) => (_codeWord >> (int)(i % Dsp.DcsCode.WordBits) & 1) != 0 ? 1 : -1;
        double half = CodeEdgeS * Dsp.DcsCode.BitRateHz / 2,
            into = u - k;
        if (into < half && k > 0)
            return Edge(Bit(k - 1), Bit(k), 0.5 + into / (2 * half));
        if (1 - into < half)
            return Edge(Bit(k), Bit(k + 1), 0.5 - (1 - into) / (2 * half));
        return Bit(k);
    }

    /// <summary>Length of a code word bit's edge, s (a transmitter filters the word: no step in the
    /// frequency).</summary>
    public const double CodeEdgeS = 0.002;

    private static double Edge(double from, double to, double x) =>
        from + (to - from) * (1 - Math.Cos(Math.PI * Math.Clamp(x, 0, 1))) / 2;

    /// <summary>The added tones' phase shift at time <paramref name="t"/>: the reverse burst's within its last
    /// stretch before key-down, else 0 (rad); and when it applies, the time the shift began.</summary>
    private static (double Rad, double From) ReverseShift(SignalSpec s, double t)
    {
        if (s.ReverseBurst is not { } rb)
            return (0, 0);
        double end = s.Bursts.Count > 0 ? (s.BurstAt(t) is { } b ? b.EndS : double.NaN) : s.DurationS;
        return t >= end - rb.DurationS ? (rb.ShiftDeg * Math.PI / 180, end - rb.DurationS) : (0, 0);
    }

    /// <summary>sin(2 pi f t + shift), the integral of a tone whose phase the reverse burst shifts: from the shift on,
    /// the integral goes on from its value at the shift (the carrier's phase stays continuous, as a modulator
    /// integrating the shifted tone gives).</summary>
    private static double ShiftedSine(SignalSpec s, double hz, double t)
    {
        var (shift, from) = ReverseShift(s, t);
        double now = Math.Sin(2 * Math.PI * Frac(hz * t) + shift);
        return shift == 0
            ? now
            : now - Math.Sin(2 * Math.PI * Frac(hz * from) + shift) + Math.Sin(2 * Math.PI * Frac(hz * from));
    }

    /// <summary>The pulse train's amplitude factor at time <paramref name="t"/>: pulse k or its neighbour when either
    /// holds t (a position shift stays within half a period).</summary>
    private static double PulseAmplitude(SignalSpec s, double t)
    {
        long k = (long)Math.Floor(t / s.PulsePeriodS);
        for (long j = k - 1; j <= k + 1; j++)
        {
            if (j < 0)
                continue;
            double tk = j * s.PulsePeriodS;
            double w = 2 * Math.PI * s.ModulatingFrequencyHz * tk;
            double start = tk + s.PulsePositionS * Math.Sin(w);
            if (t >= start && t < start + s.PulseWidthS)
                return 1 + s.PulseAmDepth * Math.Cos(w);
        }
        return 0;
    }

    private static double Frac(double x) => x - Math.Floor(x);

    /// <summary>Standard normal deviate (Marsaglia polar method) from the seeded generator.</summary>
    private double Gaussian()
    {
        if (_spareGaussian is { } spare)
        {
            _spareGaussian = null;
            return spare;
        }
        double u,
            v,
            q;
        do
        {
            u = 2 * _random.NextDouble() - 1;
            v = 2 * _random.NextDouble() - 1;
            q = u * u + v * v;
        } while (q >= 1 || q == 0);
        double f = Math.Sqrt(-2 * Math.Log(q) / q);
        _spareGaussian = v * f;
        return u * f;
    }
}
