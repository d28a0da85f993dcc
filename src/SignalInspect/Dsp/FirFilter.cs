using MathNet.Numerics;

namespace SignalInspect.Dsp;

/// <summary>Inner products with SIMD (System.Numerics.Vector), the kernel of every FIR here.</summary>
internal static class Simd
{
    /// <summary>sum a[i] b[i] over the common length.</summary>
    public static double Dot(ReadOnlySpan<double> a, ReadOnlySpan<double> b)
    {
        int n = Math.Min(a.Length, b.Length);
        int w = System.Numerics.Vector<double>.Count;
        var acc = System.Numerics.Vector<double>.Zero;
        int i = 0;
        for (; i + w <= n; i += w)
            acc += new System.Numerics.Vector<double>(a.Slice(i, w)) * new System.Numerics.Vector<double>(b.Slice(i, w));
        double s = System.Numerics.Vector.Sum(acc);
        for (; i < n; i++) s += a[i] * b[i];
        return s;
    }
}

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
    public static double[] LowPass(double cutoffHz, double sampleRateHz, double transitionHz, double stopbandDb = 80, int maxTaps = 4095)
    {
        if (!(cutoffHz > 0 && cutoffHz < sampleRateHz / 2)) throw new ArgumentOutOfRangeException(nameof(cutoffHz), cutoffHz, "must lie between 0 and half the sample rate");
        if (!(transitionHz > 0)) throw new ArgumentOutOfRangeException(nameof(transitionHz), transitionHz, "must be positive");
        // Kaiser's formulas: beta from the attenuation, length from attenuation and transition width.
        double beta = stopbandDb > 50 ? 0.1102 * (stopbandDb - 8.7) : stopbandDb >= 21 ? 0.5842 * Math.Pow(stopbandDb - 21, 0.4) + 0.07886 * (stopbandDb - 21) : 0;
        int taps = (int)Math.Ceiling((stopbandDb - 7.95) / (2.285 * 2 * Math.PI * transitionHz / sampleRateHz)) + 1;
        taps = Math.Clamp(taps | 1, 3, maxTaps | 1);
        var h = new double[taps];
        int m = taps - 1;
        double fc = cutoffHz / sampleRateHz;
        double i0b = SpecialFunctions.BesselI0(beta);
        for (int n = 0; n < taps; n++)
        {
            double k = n - m / 2.0;
            double sinc = k == 0 ? 2 * fc : Math.Sin(2 * Math.PI * fc * k) / (Math.PI * k);
            double r = 2.0 * n / m - 1;
            h[n] = sinc * SpecialFunctions.BesselI0(beta * Math.Sqrt(Math.Max(0, 1 - r * r))) / i0b;
        }
        double sum = h.Sum();
        for (int n = 0; n < taps; n++) h[n] /= sum;
        return h;
    }
}

/// <summary>
/// Shifts a complex (or real) stream in frequency, low-passes it with a linear-phase FIR and keeps
/// every M-th output: the channel filter and decimator in front of the demodulators. A plan with
/// state: construct once, call <see cref="Process"/> block by block; the result does not depend on
/// the block size.
/// </summary>
public sealed class ChannelDecimator
{
    private readonly double[] _taps;
    private readonly int _decimation;
    private readonly bool _complexInput;
    private readonly double _shiftCyclesPerSample;
    private readonly double[] _histRe;
    private readonly double[] _histIm;
    private int _histPos;
    private long _n;
    private int _phase;
    private double _c = 1, _s;
    private readonly double _stepC, _stepS;

    /// <summary>Creates the plan.</summary>
    /// <param name="taps">Low-pass taps (from <see cref="FirDesign.LowPass"/>).</param>
    /// <param name="decimation">Keep one output in this many, 1 or more.</param>
    /// <param name="shiftHz">Frequency shift applied before filtering (e.g. minus the carrier), in Hz.</param>
    /// <param name="sampleRateHz">Input sample rate in Hz.</param>
    /// <param name="complexInput">True for interleaved I/Q input, false for real input.</param>
    public ChannelDecimator(double[] taps, int decimation, double shiftHz, double sampleRateHz, bool complexInput)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(decimation, 1);
        _taps = [.. taps.Reverse()];
        _decimation = decimation;
        _complexInput = complexInput;
        _shiftCyclesPerSample = shiftHz / sampleRateHz;
        _stepC = Math.Cos(2 * Math.PI * _shiftCyclesPerSample);
        _stepS = Math.Sin(2 * Math.PI * _shiftCyclesPerSample);
        // History doubled so that a window of taps is always contiguous.
        _histRe = new double[2 * taps.Length];
        _histIm = new double[2 * taps.Length];
    }

    /// <summary>Group delay of the filter in input samples ((taps - 1) / 2).</summary>
    public int DelaySamples => (_taps.Length - 1) / 2;

    /// <summary>Output sample rate for a given input rate.</summary>
    public double OutputRateHz(double inputRateHz) => inputRateHz / _decimation;

    /// <summary>
    /// Consumes input samples; writes the filtered, decimated complex output (interleaved I, Q).
    /// Returns the number of output samples. <paramref name="output"/> must hold at least
    /// 2 x ceil(input samples / decimation) values.
    /// </summary>
    public int Process(ReadOnlySpan<double> input, Span<double> output)
    {
        int count = _complexInput ? input.Length / 2 : input.Length;
        int taps = _taps.Length;
        int produced = 0;
        ReadOnlySpan<double> h = _taps;
        for (int i = 0; i < count; i++, _n++)
        {
            double xr = _complexInput ? input[2 * i] : input[i];
            double xi = _complexInput ? input[2 * i + 1] : 0;
            // Oscillator: a rotation per sample, re-anchored to the exact phase every 1024 samples.
            if ((_n & 1023) == 0)
            {
                double cyc = _shiftCyclesPerSample * _n;
                double a = 2 * Math.PI * (cyc - Math.Floor(cyc));
                _c = Math.Cos(a);
                _s = Math.Sin(a);
            }
            double c = _c, s = _s;
            _c = c * _stepC - s * _stepS;
            _s = c * _stepS + s * _stepC;
            double yr = xr * c - xi * s, yi = xr * s + xi * c;
            _histRe[_histPos] = yr; _histRe[_histPos + taps] = yr;
            _histIm[_histPos] = yi; _histIm[_histPos + taps] = yi;
            _histPos = _histPos + 1 == taps ? 0 : _histPos + 1;
            if (++_phase < _decimation) continue;
            _phase = 0;
            // The window of the last `taps` inputs, oldest first, starts at _histPos.
            ReadOnlySpan<double> wr = _histRe.AsSpan(_histPos, taps), wi = _histIm.AsSpan(_histPos, taps);
            output[2 * produced] = Simd.Dot(h, wr);
            output[2 * produced + 1] = Simd.Dot(h, wi);
            produced++;
        }
        return produced;
    }
}

/// <summary>A real linear-phase FIR filter on a stream (the post-detection filters). A plan with state.</summary>
public sealed class RealFir
{
    private readonly double[] _taps;
    private readonly double[] _hist;
    private int _pos;

    /// <summary>Creates the filter from its taps.</summary>
    public RealFir(double[] taps)
    {
        _taps = [.. taps.Reverse()];
        _hist = new double[2 * taps.Length];
    }

    /// <summary>Group delay in samples.</summary>
    public int DelaySamples => (_taps.Length - 1) / 2;

    /// <summary>Filters one sample.</summary>
    public double Next(double x)
    {
        int taps = _taps.Length;
        _hist[_pos] = x;
        _hist[_pos + taps] = x;
        _pos = _pos + 1 == taps ? 0 : _pos + 1;
        return Simd.Dot(_taps, _hist.AsSpan(_pos, taps));
    }
}

/// <summary>
/// One-pole filters used after detection: a DC-blocking high-pass and de-emphasis (a first-order
/// low-pass of time constant tau, as in FM broadcast: 50 or 75 us). Bilinear transform.
/// </summary>
public sealed class OnePole
{
    private readonly double _b0, _b1, _a1;
    private double _x1, _y1;

    private OnePole(double b0, double b1, double a1)
    {
        _b0 = b0; _b1 = b1; _a1 = a1;
    }

    /// <summary>First-order high-pass with -3 dB at <paramref name="cornerHz"/>.</summary>
    public static OnePole HighPass(double cornerHz, double sampleRateHz)
    {
        double k = Math.Tan(Math.PI * cornerHz / sampleRateHz);
        double norm = 1 / (1 + k);
        return new OnePole(norm, -norm, (k - 1) * norm);
    }

    /// <summary>De-emphasis: first-order low-pass with time constant <paramref name="tauS"/> (corner 1 / (2 pi tau)).</summary>
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

/// <summary>
/// Band-limited interpolation by an integer factor L (a polyphase Kaiser-windowed sinc, 16 taps per
/// phase): used before peak statistics so that the peaks of a demodulated tone are not missed
/// between samples (a tone sampled 6 times a period can read 13 % low when phase-locked).
/// </summary>
public sealed class Upsampler
{
    private readonly double[][] _phases;
    private readonly double[] _hist;
    private readonly int _taps;
    private int _pos;

    /// <summary>Creates an interpolator by <paramref name="factor"/> (2 to 64).</summary>
    public Upsampler(int factor)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(factor, 2);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(factor, 64);
        Factor = factor;
        _taps = 16;
        int total = _taps * factor + 1;
        var h = new double[total];
        double beta = 0.1102 * (80 - 8.7);
        double i0b = MathNet.Numerics.SpecialFunctions.BesselI0(beta);
        int mid = (total - 1) / 2;
        for (int n = 0; n < total; n++)
        {
            double k = (n - mid) / (double)factor;
            double sinc = k == 0 ? 1 : Math.Sin(Math.PI * k) / (Math.PI * k);
            double r = 2.0 * n / (total - 1) - 1;
            h[n] = sinc * MathNet.Numerics.SpecialFunctions.BesselI0(beta * Math.Sqrt(Math.Max(0, 1 - r * r))) / i0b;
        }
        _phases = new double[factor][];
        for (int j = 0; j < factor; j++)
        {
            var p = new double[_taps + 1];
            for (int k = 0; k <= _taps; k++)
            {
                int idx = k * factor + j;
                p[k] = idx < total ? h[idx] : 0;
            }
            Array.Reverse(p);
            _phases[j] = p;
        }
        _hist = new double[2 * (_taps + 1)];
    }

    /// <summary>Interpolation factor L.</summary>
    public int Factor { get; }

    /// <summary>Takes one input sample and writes <see cref="Factor"/> interpolated outputs.</summary>
    public void Next(double x, Span<double> output)
    {
        int len = _taps + 1;
        _hist[_pos] = x;
        _hist[_pos + len] = x;
        int newest = _pos;
        _pos = _pos + 1 == len ? 0 : _pos + 1;
        // Output j of the newest input: sum_k h[k L + j] x[n - k]; the phases are stored reversed so
        // that the window (oldest first) is contiguous.
        ReadOnlySpan<double> window = _hist.AsSpan(newest + 1, len);
        for (int j = 0; j < Factor; j++) output[j] = Simd.Dot(_phases[j], window);
    }
}
