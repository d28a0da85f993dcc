using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using MathNet.Numerics;

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
        // Kaiser's formulas: beta from the attenuation, length from attenuation and transition width.
        double beta =
            stopbandDb > 50 ? 0.1102 * (stopbandDb - 8.7)
            : stopbandDb >= 21 ? 0.5842 * Math.Pow(stopbandDb - 21, 0.4) + 0.07886 * (stopbandDb - 21)
            : 0;
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
        double beta =
            stopbandDb > 50 ? 0.1102 * (stopbandDb - 8.7)
            : stopbandDb >= 21 ? 0.5842 * Math.Pow(stopbandDb - 21, 0.4) + 0.07886 * (stopbandDb - 21)
            : 0;
        int taps = (int)Math.Ceiling((stopbandDb - 7.95) / (2.285 * 2 * Math.PI * transition / sampleRateHz)) + 1;
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
        double i0b = SpecialFunctions.BesselI0(beta),
            odd = 0;
        for (int n = 0; n < taps; n++)
        {
            int k = n - c;
            if (k == 0 || k % 2 == 0)
                continue;
            double r = (double)k / c;
            h[n] =
                Math.Sin(Math.PI * k / 2)
                / (Math.PI * k)
                * SpecialFunctions.BesselI0(beta * Math.Sqrt(Math.Max(0, 1 - r * r)))
                / i0b;
            odd += h[n];
        }
        for (int n = 0; n < taps; n++)
            h[n] *= 0.5 / odd;
        h[c] = 0.5;
        return h;
    }
}

/// <summary>
/// Shifts a complex (or real) stream in frequency, low-passes it with a linear-phase FIR and keeps
/// every M-th output: the channel filter and decimator in front of the demodulators. A plan with
/// state: construct once, call <see cref="Process(ReadOnlySpan{double}, Span{double}, Span{double})"/> (or its float
/// overload) block by block; the result does not depend on the block size. Output m is the filter's output at input
/// sample (m + 1) M - 1; the history before the first input is zero. With a half-band filter (<see
/// cref="FirDesign.HalfBand"/>) the shifted samples are first filtered by it and every other one kept (the outputs at
/// odd input samples), then the taps (designed for half the rate) filter and keep one in M / 2: the same
/// output instants, far fewer multiply-adds per input sample than one filter at the full rate.
/// </summary>
/// <remarks>
/// The oscillator is exp(2 pi i f n) from a table of one block of 1024 rotations times an anchor
/// computed exactly at each block start, so its phase never drifts. The shifted samples and the
/// taps are single precision (24-bit mantissa: rounding noise about 150 dB below full scale, far
/// under any receiver's floor); each output is a SIMD dot product of the interleaved I/Q history
/// with the taps duplicated per component, summed in single precision and returned in double.
/// Non-finite input samples are taken as 0.
/// </remarks>
public sealed class ChannelDecimator
{
    private const int Block = 1024;
    private readonly float[] _taps2; // reversed taps, each twice (I and Q lanes), zero-padded in front to whole vectors
    private readonly int _taps; // taps of the padded filter (the zeros are the oldest)
    private readonly int _decimation;
    private readonly bool _complexInput;
    private readonly double _shiftCyclesPerSample;
    private readonly double[] _table; // exp(2 pi i f k), k < Block, interleaved
    private readonly float[] _z; // shifted samples, interleaved: history, then the block
    private int _fill; // complex samples held in _z
    private int _next; // index in _z of the newest input of the next output
    private long _n;

    /// <summary>Creates the plan.</summary>
    /// <param name="taps">Low-pass taps (from <see cref="FirDesign.LowPass"/>).</param>
    /// <param name="decimation">Keep one output in this many, 1 or more.</param>
    /// <param name="shiftHz">Frequency shift applied before filtering (e.g. minus the carrier), in Hz.</param>
    /// <param name="sampleRateHz">Input sample rate in Hz.</param>
    /// <param name="complexInput">True for interleaved I/Q input, false for real input.</param>
    /// <param name="halfBand">Half-band taps (from <see cref="FirDesign.HalfBand"/>, 4M + 3 of them) for a first stage
    /// that halves the rate, or null. With it the decimation must be even and <paramref name="taps"/> are for half the
    /// rate.</param>
    /// <exception cref="ArgumentException">The half-band taps are not of that form, or the decimation is
    /// odd.</exception>
    public ChannelDecimator(
        double[] taps,
        int decimation,
        double shiftHz,
        double sampleRateHz,
        bool complexInput,
        double[]? halfBand = null
    )
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(decimation, 1);
        ArgumentOutOfRangeException.ThrowIfZero(taps.Length);
        if (halfBand is not null)
        {
            int nh = halfBand.Length,
                c = (nh - 1) / 2;
            if (
                nh < 3
                || nh % 4 != 3
                || halfBand[c] != 0.5
                || Enumerable.Range(0, nh).Any(n => n != c && (n - c) % 2 == 0 && halfBand[n] != 0)
            )
                throw new ArgumentException(
                    "half-band taps must number 4M + 3, with 1/2 at the centre and zeros at every other place",
                    nameof(halfBand)
                );
            if (decimation % 2 != 0)
                throw new ArgumentException("a half-band first stage needs an even decimation", nameof(decimation));
            _hbM = (nh - 3) / 4;
            _hb = new float[_hbM + 1];
            for (int i = 0; i <= _hbM; i++)
                _hb[i] = (float)halfBand[2 * i];
            _hbv = [.. _hb.Select(Vector512.Create)];
            _mix = new float[2 * Block];
            _e = new float[2 * (2 * _hbM + 1 + Block / 2 + 16)];
            _o = new float[_e.Length];
            decimation /= 2;
        }
        // Taps padded to whole vectors of complex lanes: 512-bit ones where the CPU has them (Dot4).
        _wide = Simd.Wide;
        int lanes = _wide ? Vector512<float>.Count / 2 : Vector<float>.Count / 2;
        _taps = (taps.Length + lanes - 1) / lanes * lanes;
        int pad = _taps - taps.Length;
        _taps2 = new float[2 * _taps];
        for (int k = 0; k < taps.Length; k++)
            _taps2[2 * (pad + k)] = _taps2[2 * (pad + k) + 1] = (float)taps[taps.Length - 1 - k];
        _decimation = decimation;
        _complexInput = complexInput;
        _shiftCyclesPerSample = shiftHz / sampleRateHz;
        _table = new double[2 * Block];
        for (int k = 0; k < Block; k++)
        {
            double a = 2 * Math.PI * (_shiftCyclesPerSample * k - Math.Floor(_shiftCyclesPerSample * k));
            _table[2 * k] = Math.Cos(a);
            _table[2 * k + 1] = Math.Sin(a);
        }
        _z = new float[2 * (_taps - 1 + Block) + 16];
        _fill = _taps - 1;
        _next = _taps - 1 + decimation - 1;
        ResetHalfBand();
    }

    // The half-band first stage (null without one): its distinct taps g_i = h[2i], i <= M, the
    // shifted samples of a block, and the shifted samples at even and odd places since the start
    // (E and O, 2M + 1 of history each, then the new ones): output m is
    // 0.5 E[m + M + 1] + sum_i g_i (O[m + 2M + 1 - i] + O[m + i]).
    private readonly float[]? _hb;
    private readonly Vector512<float>[] _hbv = [];
    private readonly int _hbM;
    private readonly float[] _mix = [],
        _e = [],
        _o = [];
    private int _eFill,
        _oFill,
        _hbNext;
    private long _t;

    /// <summary>Input samples that one output depends on, for these <paramref name="taps"/> and half-band taps (or
    /// none): the whole filter's length at the input rate.</summary>
    public static int InputSpan(double[] taps, double[]? halfBand) =>
        halfBand is null ? taps.Length : halfBand.Length + 2 * (taps.Length - 1);

    private void ResetHalfBand()
    {
        if (_hb is null)
            return;
        Array.Clear(_e);
        Array.Clear(_o);
        _eFill = _oFill = 2 * _hbM + 1;
        _hbNext = 0;
        _t = 0;
    }

    /// <summary>
    /// Starts again with zero history, as if constructed, with the next input taken as sample
    /// <paramref name="inputIndex"/> of the stream (the oscillator's phase follows it).
    /// </summary>
    public void Reset(long inputIndex = 0)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(inputIndex);
        Array.Clear(_z);
        _fill = _taps - 1;
        _next = _taps - 1 + _decimation - 1;
        _n = inputIndex;
        ResetHalfBand();
    }

    /// <summary>
    /// Consumes input samples (interleaved I, Q for complex input); writes the filtered, decimated
    /// complex output to <paramref name="outRe"/> and <paramref name="outIm"/>. Returns the number
    /// of outputs, at most ceil(input samples / decimation): the spans must hold that many.
    /// </summary>
    public int Process(ReadOnlySpan<double> input, Span<double> outRe, Span<double> outIm) =>
        Process<double>(input, outRe, outIm);

    /// <summary>
    /// <see cref="Process(ReadOnlySpan{double}, Span{double}, Span{double})"/> from single-precision
    /// input (a float32 capture as stored): each value is widened to double before the shift, so the
    /// outputs equal those of the widened input exactly.
    /// </summary>
    public int Process(ReadOnlySpan<float> input, Span<double> outRe, Span<double> outIm) =>
        Process<float>(input, outRe, outIm);

    private int Process<T>(ReadOnlySpan<T> input, Span<double> outRe, Span<double> outIm)
        where T : unmanaged
    {
        int count = _complexInput ? input.Length / 2 : input.Length;
        int produced = 0;
        for (int done = 0; done < count;)
        {
            // Up to the next oscillator block boundary, so that one anchor serves the piece.
            int k0 = (int)(_n % Block);
            int piece = Math.Min(count - done, Block - k0);
            ReadOnlySpan<T> x = _complexInput ? input.Slice(2 * done, 2 * piece) : input.Slice(done, piece);
            done += piece;
            if (_hb is null)
            {
                Mix(x, k0, piece, _z.AsSpan(2 * _fill, 2 * piece));
                _n += piece;
                _fill += piece;
            }
            else
            {
                Mix(x, k0, piece, _mix.AsSpan(0, 2 * piece));
                _n += piece;
                _fill += HalfBandStage(piece);
            }
            while (_wide && _next + 7 * _decimation < _fill)
            {
                Dot8Wide(_next - _taps + 1, outRe.Slice(produced, 8), outIm.Slice(produced, 8));
                produced += 8;
                _next += 8 * _decimation;
            }
            while (_next + 3 * _decimation < _fill)
            {
                Dot4(_next - _taps + 1, outRe.Slice(produced, 4), outIm.Slice(produced, 4));
                produced += 4;
                _next += 4 * _decimation;
            }
            while (_next + _decimation < _fill)
            {
                Dot2(
                    _next - _taps + 1,
                    _next + _decimation - _taps + 1,
                    out outRe[produced],
                    out outIm[produced],
                    out outRe[produced + 1],
                    out outIm[produced + 1]
                );
                produced += 2;
                _next += 2 * _decimation;
            }
            if (_next < _fill)
            {
                Dot2(_next - _taps + 1, _next - _taps + 1, out outRe[produced], out outIm[produced], out _, out _);
                produced++;
                _next += _decimation;
            }
            // Keep the last taps - 1 samples as history.
            int drop = _fill - (_taps - 1);
            if (drop > 0)
            {
                _z.AsSpan(2 * drop, 2 * (_taps - 1)).CopyTo(_z);
                _fill -= drop;
                _next -= drop;
            }
        }
        return produced;
    }

    /// <summary>
    /// The half-band stage on the <paramref name="piece"/> shifted samples in _mix: splits them into
    /// E and O by the parity of their place, writes every output they complete into _z at _fill, and
    /// drops what no later output needs. Returns the outputs written. Eight outputs per vector where
    /// eight are ready, else one at a time with the same operations per component (single-rounding
    /// multiply-adds both ways), so an output does not depend on the block sizes.
    /// </summary>
    private int HalfBandStage(int piece)
    {
        Span<ulong> mix = System.Runtime.InteropServices.MemoryMarshal.Cast<float, ulong>(_mix.AsSpan(0, 2 * piece));
        Span<ulong> e = System.Runtime.InteropServices.MemoryMarshal.Cast<float, ulong>(_e.AsSpan());
        Span<ulong> o = System.Runtime.InteropServices.MemoryMarshal.Cast<float, ulong>(_o.AsSpan());
        int i = 0;
        if ((_t & 1) == 1 && piece > 0)
        {
            o[_oFill++] = mix[0];
            i = 1;
        }
        if (System.Runtime.Intrinsics.X86.Avx512F.IsSupported)
        {
            // Sixteen samples (as 64-bit I/Q pairs) to eight of E and eight of O per step.
            var evens = Vector512.Create(0UL, 2, 4, 6, 8, 10, 12, 14);
            var odds = Vector512.Create(1UL, 3, 5, 7, 9, 11, 13, 15);
            ref ulong mr = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(mix);
            ref ulong er = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(e);
            ref ulong or = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(o);
            for (; i + 16 <= piece; i += 16)
            {
                Vector512<ulong> a = Vector512.LoadUnsafe(ref mr, (nuint)i),
                    b = Vector512.LoadUnsafe(ref mr, (nuint)(i + 8));
                System.Runtime.Intrinsics.X86.Avx512F.PermuteVar8x64x2(a, evens, b).StoreUnsafe(ref er, (nuint)_eFill);
                System.Runtime.Intrinsics.X86.Avx512F.PermuteVar8x64x2(a, odds, b).StoreUnsafe(ref or, (nuint)_oFill);
                _eFill += 8;
                _oFill += 8;
            }
        }
        for (; i + 1 < piece; i += 2)
        {
            e[_eFill++] = mix[i];
            o[_oFill++] = mix[i + 1];
        }
        if (i < piece)
            e[_eFill++] = mix[i];
        _t += piece;

        int m2 = 2 * _hbM + 1,
            made = 0;
        ref float eRef = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_e);
        ref float oRef = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_o);
        ref float outRef = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * _fill
        );
        float[] g = _hb!;
        ReadOnlySpan<Vector512<float>> gv = _hbv;
        var half = Vector512.Create(0.5f);
        for (; !_wide && _hbNext + 3 + m2 < _oFill; _hbNext += 4, made += 4)
        {
            int m = _hbNext;
            Vector256<float> acc = half.GetLower() * Vector256.LoadUnsafe(ref eRef, (nuint)(2 * (m + _hbM + 1)));
            for (int k = 0; k <= _hbM; k++)
                acc = Vector256.FusedMultiplyAdd(
                    Vector256.Create(g[k]),
                    Vector256.LoadUnsafe(ref oRef, (nuint)(2 * (m + m2 - k)))
                        + Vector256.LoadUnsafe(ref oRef, (nuint)(2 * (m + k))),
                    acc
                );
            acc.StoreUnsafe(ref outRef, (nuint)(2 * made));
        }
        for (; _wide && _hbNext + 7 + m2 < _oFill; _hbNext += 8, made += 8)
        {
            int m = _hbNext;
            Vector512<float> acc = half * Vector512.LoadUnsafe(ref eRef, (nuint)(2 * (m + _hbM + 1)));
            for (int k = 0; k < gv.Length; k++)
                acc = Vector512.FusedMultiplyAdd(
                    gv[k],
                    Vector512.LoadUnsafe(ref oRef, (nuint)(2 * (m + m2 - k)))
                        + Vector512.LoadUnsafe(ref oRef, (nuint)(2 * (m + k))),
                    acc
                );
            acc.StoreUnsafe(ref outRef, (nuint)(2 * made));
        }
        for (; _hbNext + m2 < _oFill; _hbNext++, made++)
        {
            int m = _hbNext;
            for (int part = 0; part < 2; part++)
            {
                float acc = 0.5f * _e[2 * (m + _hbM + 1) + part];
                for (int k = 0; k <= _hbM; k++)
                    acc = MathF.FusedMultiplyAdd(g[k], _o[2 * (m + m2 - k) + part] + _o[2 * (m + k) + part], acc);
                Unsafe.Add(ref outRef, 2 * made + part) = acc;
            }
        }
        // Outputs from _hbNext on need E and O from index _hbNext on: move those to the front.
        int drop = _hbNext;
        if (drop > 0)
        {
            e[drop.._eFill].CopyTo(e);
            o[drop.._oFill].CopyTo(o);
            _eFill -= drop;
            _oFill -= drop;
            _hbNext = 0;
        }
        return made;
    }

    /// <summary>Shifts <paramref name="piece"/> samples (oscillator table index k0 onwards) into <paramref
    /// name="z"/>.</summary>
    private void Mix<T>(ReadOnlySpan<T> x, int k0, int piece, Span<float> z)
        where T : unmanaged
    {
        double cyc = _shiftCyclesPerSample * (_n - k0);
        double anchor = 2 * Math.PI * (cyc - Math.Floor(cyc));
        double ar = Math.Cos(anchor),
            ai = Math.Sin(anchor);
        ReadOnlySpan<double> t = _table.AsSpan(2 * k0, 2 * piece);
        int i = 0;
        if (_complexInput && _wide)
            i = MixWide(x, t, z, ar, ai, piece);
        if (_complexInput && System.Runtime.Intrinsics.X86.Avx.IsSupported)
        {
            i += MixAvx(x[(2 * i)..], t[(2 * i)..], z[(2 * i)..], ar, ai, piece - i);
        }
        for (; i < piece; i++)
        {
            double c = t[2 * i] * ar - t[2 * i + 1] * ai,
                s = t[2 * i] * ai + t[2 * i + 1] * ar;
            double xr = _complexInput ? At(x, 2 * i) : At(x, i),
                xi = _complexInput ? At(x, 2 * i + 1) : 0;
            if (!double.IsFinite(xr))
                xr = 0;
            if (!double.IsFinite(xi))
                xi = 0;
            z[2 * i] = (float)(xr * c - xi * s);
            z[2 * i + 1] = (float)(xr * s + xi * c);
        }
    }

    /// <summary>Value i of a double or float span, as a double.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static double At<T>(ReadOnlySpan<T> x, int i)
        where T : unmanaged =>
        typeof(T) == typeof(float)
            ? System.Runtime.InteropServices.MemoryMarshal.Cast<T, float>(x)[i]
            : System.Runtime.InteropServices.MemoryMarshal.Cast<T, double>(x)[i];

    /// <summary>
    /// <see cref="MixAvx"/> four complex samples per step on 512-bit vectors, with the same
    /// operations per value (the alternating subtract and add as a multiply-add by +/-1, which is
    /// exact), so the same results bit for bit. Returns the samples done.
    /// </summary>
    private static int MixWide<T>(
        ReadOnlySpan<T> x,
        ReadOnlySpan<double> t,
        Span<float> z,
        double ar,
        double ai,
        int piece
    )
        where T : unmanaged
    {
        var vr = Vector512.Create(ar);
        var vi = Vector512.Create(ai);
        var sign = Vector512.Create(-1.0, 1.0, -1.0, 1.0, -1.0, 1.0, -1.0, 1.0);
        var swap = Vector512.Create(1L, 0, 3, 2, 5, 4, 7, 6);
        var evens = Vector512.Create(0L, 0, 2, 2, 4, 4, 6, 6);
        var odds = Vector512.Create(1L, 1, 3, 3, 5, 5, 7, 7);
        ref T xs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(x);
        ref double ts = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(t);
        ref float zs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(z);
        int i = 0;
        for (; i + 4 <= piece; i += 4)
        {
            var tv = Vector512.LoadUnsafe(ref ts, (nuint)(2 * i));
            var osc = Vector512.FusedMultiplyAdd(Vector512.Shuffle(tv, swap) * vi, sign, tv * vr);
            var xv =
                typeof(T) == typeof(float)
                    ? System.Runtime.Intrinsics.X86.Avx512F.ConvertToVector512Double(
                        Vector256.LoadUnsafe(ref Unsafe.As<T, float>(ref xs), (nuint)(2 * i))
                    )
                    : Vector512.LoadUnsafe(ref Unsafe.As<T, double>(ref xs), (nuint)(2 * i));
            xv = Vector512.ConditionalSelect(
                Vector512.Equals(xv - xv, Vector512<double>.Zero),
                xv,
                Vector512<double>.Zero
            );
            var y = Vector512.FusedMultiplyAdd(
                Vector512.Shuffle(xv, swap) * Vector512.Shuffle(osc, odds),
                sign,
                xv * Vector512.Shuffle(osc, evens)
            );
            System.Runtime.Intrinsics.X86.Avx512F.ConvertToVector256Single(y).StoreUnsafe(ref zs, (nuint)(2 * i));
        }
        return i;
    }

    /// <summary>Two complex samples per step: osc = anchor x table, y = x osc, both as interleaved complex
    /// products.</summary>
    private static int MixAvx<T>(
        ReadOnlySpan<T> x,
        ReadOnlySpan<double> t,
        Span<float> z,
        double ar,
        double ai,
        int piece
    )
        where T : unmanaged
    {
        var vr = System.Runtime.Intrinsics.Vector256.Create(ar);
        var vi = System.Runtime.Intrinsics.Vector256.Create(ai);
        ref T xs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(x);
        ref double ts = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(t);
        ref float zs = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(z);
        int i = 0;
        for (; i + 2 <= piece; i += 2)
        {
            var tv = System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref ts, (nuint)(2 * i));
            // osc = t * a: [tr ar - ti ai, ti ar + tr ai] per complex lane.
            var osc = System.Runtime.Intrinsics.X86.Avx.AddSubtract(
                tv * vr,
                System.Runtime.Intrinsics.X86.Avx.Permute(tv, 0b0101) * vi
            );
            var xv =
                typeof(T) == typeof(float)
                    ? System.Runtime.Intrinsics.X86.Avx.ConvertToVector256Double(
                        System.Runtime.Intrinsics.Vector128.LoadUnsafe(ref Unsafe.As<T, float>(ref xs), (nuint)(2 * i))
                    )
                    : System.Runtime.Intrinsics.Vector256.LoadUnsafe(ref Unsafe.As<T, double>(ref xs), (nuint)(2 * i));
            // Non-finite components become 0 (x - x is 0 only for finite x).
            xv = System.Runtime.Intrinsics.Vector256.ConditionalSelect(
                System.Runtime.Intrinsics.Vector256.Equals(xv - xv, System.Runtime.Intrinsics.Vector256<double>.Zero),
                xv,
                System.Runtime.Intrinsics.Vector256<double>.Zero
            );
            var cre = System.Runtime.Intrinsics.X86.Avx.Permute(osc, 0b0000);
            var cim = System.Runtime.Intrinsics.X86.Avx.Permute(osc, 0b1111);
            var y = System.Runtime.Intrinsics.X86.Avx.AddSubtract(
                xv * cre,
                System.Runtime.Intrinsics.X86.Avx.Permute(xv, 0b0101) * cim
            );
            System.Runtime.Intrinsics.Vector128.StoreUnsafe(
                System.Runtime.Intrinsics.X86.Avx.ConvertToVector128Single(y),
                ref zs,
                (nuint)(2 * i)
            );
        }
        return i;
    }

    /// <summary>
    /// Filter outputs over the windows of _taps samples starting at indices <paramref name="s0"/> and
    /// <paramref name="s1"/> of _z: two outputs share each load of the taps.
    /// </summary>
    private void Dot2(int s0, int s1, out double re0, out double im0, out double re1, out double im1)
    {
        if (_wide)
        {
            // The same sums as Dot4Wide's, so that an output does not depend on which of the two computed it.
            ref float hw = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
            ref float zw = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z);
            ref float y0 = ref Unsafe.Add(ref zw, 2 * s0);
            ref float y1 = ref Unsafe.Add(ref zw, 2 * s1);
            Vector512<float> c0 = default,
                c1 = default;
            for (int k = 0; k < 2 * _taps; k += Vector512<float>.Count)
            {
                Vector512<float> hk = Vector512.LoadUnsafe(ref hw, (nuint)k);
                c0 = Vector512.FusedMultiplyAdd(hk, Vector512.LoadUnsafe(ref y0, (nuint)k), c0);
                c1 = Vector512.FusedMultiplyAdd(hk, Vector512.LoadUnsafe(ref y1, (nuint)k), c1);
            }
            (re0, im0) = SumPairs((c0.GetLower() + c0.GetUpper()).AsVector());
            (re1, im1) = SumPairs((c1.GetLower() + c1.GetUpper()).AsVector());
            return;
        }
        int len = 2 * _taps;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z);
        ref float z0 = ref Unsafe.Add(ref z, 2 * s0);
        ref float z1 = ref Unsafe.Add(ref z, 2 * s1);
        int w = Vector<float>.Count,
            j = 0;
        Vector<float> a0 = default,
            a1 = default,
            b0 = default,
            b1 = default;
        for (; j + 2 * w <= len; j += 2 * w)
        {
            Vector<float> h0 = LoadF(ref h, j),
                h1 = LoadF(ref h, j + w);
            a0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z0, j), a0);
            b0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z1, j), b0);
            a1 = Vector.FusedMultiplyAdd(h1, LoadF(ref z0, j + w), a1);
            b1 = Vector.FusedMultiplyAdd(h1, LoadF(ref z1, j + w), b1);
        }
        for (; j < len; j += w)
        {
            Vector<float> h0 = LoadF(ref h, j);
            a0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z0, j), a0);
            b0 = Vector.FusedMultiplyAdd(h0, LoadF(ref z1, j), b0);
        }
        (re0, im0) = SumPairs(a0 + a1);
        (re1, im1) = SumPairs(b0 + b1);
    }

    /// <summary>Whether <see cref="Dot4"/> runs on 512-bit vectors (AVX-512): eight complex taps per load, half the
    /// instructions.</summary>
    private readonly bool _wide;

    /// <summary>Four consecutive outputs, windows from <paramref name="s0"/> on, one decimation apart: four sums per
    /// load of the taps.</summary>
    private void Dot4(int s0, Span<double> re, Span<double> im)
    {
        if (_wide)
        {
            Dot4Wide(s0, re, im);
            return;
        }
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        ref float z1 = ref Unsafe.Add(ref z0, step);
        ref float z2 = ref Unsafe.Add(ref z1, step);
        ref float z3 = ref Unsafe.Add(ref z2, step);
        int w = Vector<float>.Count;
        // Two sums per output (eight independent chains) so that the FMA latency is hidden.
        Vector<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default,
            b0 = default,
            b1 = default,
            b2 = default,
            b3 = default;
        int j = 0;
        for (; j + 2 * w <= len; j += 2 * w)
        {
            Vector<float> hj = LoadF(ref h, j),
                hk = LoadF(ref h, j + w);
            a0 = Vector.FusedMultiplyAdd(hj, LoadF(ref z0, j), a0);
            a1 = Vector.FusedMultiplyAdd(hj, LoadF(ref z1, j), a1);
            a2 = Vector.FusedMultiplyAdd(hj, LoadF(ref z2, j), a2);
            a3 = Vector.FusedMultiplyAdd(hj, LoadF(ref z3, j), a3);
            b0 = Vector.FusedMultiplyAdd(hk, LoadF(ref z0, j + w), b0);
            b1 = Vector.FusedMultiplyAdd(hk, LoadF(ref z1, j + w), b1);
            b2 = Vector.FusedMultiplyAdd(hk, LoadF(ref z2, j + w), b2);
            b3 = Vector.FusedMultiplyAdd(hk, LoadF(ref z3, j + w), b3);
        }
        if (j < len)
        {
            Vector<float> hj = LoadF(ref h, j);
            a0 = Vector.FusedMultiplyAdd(hj, LoadF(ref z0, j), a0);
            a1 = Vector.FusedMultiplyAdd(hj, LoadF(ref z1, j), a1);
            a2 = Vector.FusedMultiplyAdd(hj, LoadF(ref z2, j), a2);
            a3 = Vector.FusedMultiplyAdd(hj, LoadF(ref z3, j), a3);
        }
        (re[0], im[0]) = SumPairs(a0 + b0);
        (re[1], im[1]) = SumPairs(a1 + b1);
        (re[2], im[2]) = SumPairs(a2 + b2);
        (re[3], im[3]) = SumPairs(a3 + b3);
    }

    /// <summary><see cref="Dot4"/> with 512-bit vectors; the taps are padded to whole 512-bit vectors.</summary>
    private void Dot4Wide(int s0, Span<double> re, Span<double> im)
    {
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        ref float z1 = ref Unsafe.Add(ref z0, step);
        ref float z2 = ref Unsafe.Add(ref z1, step);
        ref float z3 = ref Unsafe.Add(ref z2, step);
        int w = Vector512<float>.Count;
        Vector512<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default;
        for (int j = 0; j < len; j += w)
        {
            Vector512<float> hj = Vector512.LoadUnsafe(ref h, (nuint)j);
            a0 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z0, (nuint)j), a0);
            a1 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z1, (nuint)j), a1);
            a2 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z2, (nuint)j), a2);
            a3 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref z3, (nuint)j), a3);
        }
        (re[0], im[0]) = SumPairs((a0.GetLower() + a0.GetUpper()).AsVector());
        (re[1], im[1]) = SumPairs((a1.GetLower() + a1.GetUpper()).AsVector());
        (re[2], im[2]) = SumPairs((a2.GetLower() + a2.GetUpper()).AsVector());
        (re[3], im[3]) = SumPairs((a3.GetLower() + a3.GetUpper()).AsVector());
    }

    /// <summary>
    /// Eight consecutive outputs per load of the taps (fewer loads per multiply-add than
    /// <see cref="Dot4Wide"/>): each output's sum is formed exactly as there, so the same outputs.
    /// </summary>
    private void Dot8Wide(int s0, Span<double> re, Span<double> im)
    {
        int len = 2 * _taps,
            step = 2 * _decimation;
        ref float h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps2);
        ref float z0 = ref Unsafe.Add(
            ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_z),
            2 * s0
        );
        nuint d = (nuint)step;
        int w = Vector512<float>.Count;
        Vector512<float> a0 = default,
            a1 = default,
            a2 = default,
            a3 = default,
            a4 = default,
            a5 = default,
            a6 = default,
            a7 = default;
        for (int j = 0; j < len; j += w)
        {
            Vector512<float> hj = Vector512.LoadUnsafe(ref h, (nuint)j);
            ref float zj = ref Unsafe.Add(ref z0, j);
            a0 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj), a0);
            a1 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, d), a1);
            a2 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 2 * d), a2);
            a3 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 3 * d), a3);
            a4 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 4 * d), a4);
            a5 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 5 * d), a5);
            a6 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 6 * d), a6);
            a7 = Vector512.FusedMultiplyAdd(hj, Vector512.LoadUnsafe(ref zj, 7 * d), a7);
        }
        (re[0], im[0]) = SumPairs((a0.GetLower() + a0.GetUpper()).AsVector());
        (re[1], im[1]) = SumPairs((a1.GetLower() + a1.GetUpper()).AsVector());
        (re[2], im[2]) = SumPairs((a2.GetLower() + a2.GetUpper()).AsVector());
        (re[3], im[3]) = SumPairs((a3.GetLower() + a3.GetUpper()).AsVector());
        (re[4], im[4]) = SumPairs((a4.GetLower() + a4.GetUpper()).AsVector());
        (re[5], im[5]) = SumPairs((a5.GetLower() + a5.GetUpper()).AsVector());
        (re[6], im[6]) = SumPairs((a6.GetLower() + a6.GetUpper()).AsVector());
        (re[7], im[7]) = SumPairs((a7.GetLower() + a7.GetUpper()).AsVector());
    }

    /// <summary>The sums of the even (I) and the odd (Q) lanes, in double.</summary>
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static (double Re, double Im) SumPairs(Vector<float> v)
    {
        Vector.Widen(v, out Vector<double> lo, out Vector<double> hi);
        Vector<double> s = lo + hi;
        double re = 0,
            im = 0;
        for (int l = 0; l < Vector<double>.Count; l += 2)
        {
            re += s[l];
            im += s[l + 1];
        }
        return (re, im);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static Vector<float> LoadF(ref float origin, int index) =>
        Unsafe.ReadUnaligned<Vector<float>>(ref Unsafe.As<float, byte>(ref Unsafe.Add(ref origin, index)));
}

/// <summary>
/// A real FIR filter on a stream, a block at a time: y[n] = sum_k h[k] x[n - k], with zero
/// history before the first sample (the post-detection filters). Short filters run directly, SIMD
/// across outputs; from <see cref="FastFromTaps"/> taps on, by fast convolution (overlap-save,
/// Oppenheim and Schafer), two real segments per complex transform: the same outputs to rounding,
/// at a cost that hardly grows with the length. A plan with state.
/// </summary>
public sealed class BlockFir
{
    /// <summary>Taps from which the fast convolution is used.</summary>
    public const int FastFromTaps = 64;

    private readonly double[] _taps; // reversed: window oldest first
    private double[] _buf; // taps - 1 history samples, then the block
    private readonly FftPlan? _plan;

    // Fast convolution: the filter's spectrum in bit-reversed order (scaled by 1/N), where the
    // scrambled transform leaves each bit-reversed position's bin, the pair of input segments
    // interleaved, a window of ones, and the transform buffers.
    private readonly double[] _hRe = [],
        _hIm = [],
        _pair = [],
        _ones = [],
        _zr = [],
        _zi = [],
        _wr = [],
        _wi = [];

    /// <summary>Creates the filter from its taps.</summary>
    public BlockFir(double[] taps)
    {
        ArgumentOutOfRangeException.ThrowIfZero(taps.Length);
        _taps = [.. taps.Reverse()];
        _buf = new double[taps.Length - 1 + 4096];
        if (taps.Length >= FastFromTaps)
        {
            int n = (int)System.Numerics.BitOperations.RoundUpToPowerOf2((uint)(4 * taps.Length));
            _plan = new FftPlan(n);
            double[] hr = new double[n],
                hi = new double[n];
            taps.CopyTo(hr, 0);
            _plan.Forward(hr, hi);
            _hRe = new double[n];
            _hIm = new double[n];
            for (int q = 0; q < n; q++)
            {
                int k = _plan.BitReversed(q);
                // The inverse transform's 1/N folded into the filter's spectrum.
                _hRe[q] = hr[k] / n;
                _hIm[q] = hi[k] / n;
            }
            _pair = new double[2 * n];
            _ones = new double[n];
            Array.Fill(_ones, 1.0);
            _zr = new double[n];
            _zi = new double[n];
            _wr = new double[n];
            _wi = new double[n];
        }
    }

    /// <summary>Starts again with zero history, as if constructed.</summary>
    public void Reset() => Array.Clear(_buf);

    /// <summary>Filters a block; <paramref name="y"/> may be <paramref name="x"/> itself.</summary>
    public void Process(ReadOnlySpan<double> x, Span<double> y)
    {
        if (_plan is not null)
        {
            ProcessFast(x, y);
            return;
        }
        int t = _taps.Length,
            n = x.Length,
            hist = t - 1;
        if (_buf.Length < hist + n)
            Array.Resize(ref _buf, hist + n);
        x.CopyTo(_buf.AsSpan(hist));
        ref double b = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_buf);
        ref double h = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_taps);
        ref double o = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(y);
        int w = Vector<double>.Count,
            i = 0;
        // Eight vectors of outputs per sweep over the taps: independent sums keep the FMA units busy.
        for (; i + 8 * w <= n; i += 8 * w)
        {
            Vector<double> a0 = default,
                a1 = default,
                a2 = default,
                a3 = default,
                a4 = default,
                a5 = default,
                a6 = default,
                a7 = default;
            for (int k = 0; k < t; k++)
            {
                var hk = new Vector<double>(Unsafe.Add(ref h, k));
                ref double bk = ref Unsafe.Add(ref b, i + k);
                a0 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 0), a0);
                a1 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, w), a1);
                a2 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 2 * w), a2);
                a3 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 3 * w), a3);
                a4 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 4 * w), a4);
                a5 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 5 * w), a5);
                a6 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 6 * w), a6);
                a7 = Vector.FusedMultiplyAdd(hk, VectorMath.Load(ref bk, 7 * w), a7);
            }
            VectorMath.Store(a0, ref o, i);
            VectorMath.Store(a1, ref o, i + w);
            VectorMath.Store(a2, ref o, i + 2 * w);
            VectorMath.Store(a3, ref o, i + 3 * w);
            VectorMath.Store(a4, ref o, i + 4 * w);
            VectorMath.Store(a5, ref o, i + 5 * w);
            VectorMath.Store(a6, ref o, i + 6 * w);
            VectorMath.Store(a7, ref o, i + 7 * w);
        }
        for (; i + w <= n; i += w)
        {
            Vector<double> a0 = default;
            for (int k = 0; k < t; k++)
                a0 = Vector.FusedMultiplyAdd(
                    new Vector<double>(Unsafe.Add(ref h, k)),
                    VectorMath.Load(ref b, i + k),
                    a0
                );
            VectorMath.Store(a0, ref o, i);
        }
        for (; i < n; i++)
        {
            double s = 0;
            for (int k = 0; k < t; k++)
                s += Unsafe.Add(ref h, k) * Unsafe.Add(ref b, i + k);
            y[i] = s;
        }
        _buf.AsSpan(n, hist).CopyTo(_buf);
    }

    /// <summary>
    /// Overlap-save: the segment of N inputs from buffer index s yields the L = N - taps + 1 outputs
    /// from s on (the first taps - 1 values of the circular convolution are discarded); segments s
    /// and s + L share one complex transform as its real and imaginary parts (the filter is real).
    /// The forward transform leaves its bins scrambled; the product with the filter's spectrum is
    /// written in bit-reversed order, conjugated, and transformed back by decimation in time
    /// (IDFT(Z) = conj(DFT(conj Z)) / N): no permutation pass. A segment pair holding a non-finite
    /// value is computed by the convolution sum instead, so that the value spreads as it would there.
    /// </summary>
    private void ProcessFast(ReadOnlySpan<double> x, Span<double> y)
    {
        int t = _taps.Length,
            m = x.Length,
            hist = t - 1,
            n = _zr.Length,
            l = n - t + 1;
        if (_buf.Length < hist + m + 2 * n)
            Array.Resize(ref _buf, hist + m + 2 * n);
        x.CopyTo(_buf.AsSpan(hist));
        _buf.AsSpan(hist + m, 2 * n).Clear();
        FftPlan plan = _plan!;
        for (int start = 0; start < m; start += 2 * l)
        {
            VectorMath.Interleave(_buf.AsSpan(start, n), _buf.AsSpan(start + l, n), _pair);
            if (double.IsFinite(plan.ForwardWindowedScrambled(_pair, complex: true, _ones, _zr, _zi)))
            {
                plan.ConjugateProductToBitReversed(_zr, _zi, _hRe, _hIm, _wr, _wi);
                plan.ForwardFromBitReversed(_wr, _wi);
            }
            else
                DirectSegments(start, l);
            int first = Math.Min(l, m - start),
                second = Math.Max(0, Math.Min(l, m - start - l));
            _wr.AsSpan(hist, first).CopyTo(y.Slice(start, first));
            if (second > 0)
                VectorMath.Negate(_wi.AsSpan(hist, second), y.Slice(start + l, second));
        }
        _buf.AsSpan(m, hist).CopyTo(_buf);
    }

    /// <summary>
    /// A segment pair with a non-finite value: its outputs by the convolution sum (a transform
    /// would spread a NaN over the whole segment, and paired over its partner), into _wr and -_wi
    /// where the transform would have left them.
    /// </summary>
    private void DirectSegments(int start, int l)
    {
        int t = _taps.Length,
            hist = t - 1;
        for (int u = 0; u < l; u++)
        {
            double sa = 0,
                sb = 0;
            for (int k = 0; k < t; k++)
            {
                sa += _taps[k] * _buf[start + u + k];
                sb += _taps[k] * _buf[start + l + u + k];
            }
            _wr[hist + u] = sa;
            _wi[hist + u] = -sb;
        }
    }
}

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

/// <summary>
/// Band-limited interpolation at one pseudo-random instant in each sample interval, for peak
/// statistics: a 64-phase polyphase Kaiser-windowed sinc (16 taps per phase) evaluated, for input
/// n, at the phase a hash of n / 4 picks (see <see cref="PhaseOf"/>). A tone locked to the sample rate (6 samples a
/// period can read 13 % low) is then seen at instants spread uniformly over its period, so its percentiles are
/// those of the continuous signal; stationary noise is unchanged. One value per input rather than
/// L values per input of a fixed-factor interpolator: the same distribution at a fraction of the
/// histogram work. The phase depends only on the sample's index, so the values do not depend on
/// how the stream is cut into blocks or chunks. The first 17 inputs fill the history.
/// </summary>
public sealed class JitteredSampler
{
    /// <summary>Phases of the polyphase bank (the time grid within a sample interval).</summary>
    public const int Phases = 64;

    private const int Taps = 17;
    private readonly double[] _coef; // phase-major, each phase reversed (window oldest first)
    private double[] _buf; // Taps - 1 history samples, then the block

    /// <summary>Creates the sampler.</summary>
    public JitteredSampler()
    {
        int total = (Taps - 1) * Phases + 1;
        var h = new double[total];
        double beta = 0.1102 * (80 - 8.7);
        double i0b = MathNet.Numerics.SpecialFunctions.BesselI0(beta);
        int mid = (total - 1) / 2;
        for (int n = 0; n < total; n++)
        {
            double k = (n - mid) / (double)Phases;
            double sinc = k == 0 ? 1 : Math.Sin(Math.PI * k) / (Math.PI * k);
            double r = 2.0 * n / (total - 1) - 1;
            h[n] = sinc * MathNet.Numerics.SpecialFunctions.BesselI0(beta * Math.Sqrt(Math.Max(0, 1 - r * r))) / i0b;
        }
        _coef = new double[Phases * Taps];
        for (int j = 0; j < Phases; j++)
            for (int k = 0; k < Taps; k++)
            {
                int idx = k * Phases + j;
                _coef[j * Taps + Taps - 1 - k] = idx < total ? h[idx] : 0;
            }
        _buf = new double[Taps - 1 + 4096];
    }

    /// <summary>Inputs needed before the outputs are valid.</summary>
    public static int WarmUp => Taps;

    /// <summary>Starts again with zero history, as if constructed.</summary>
    public void Reset() => Array.Clear(_buf);

    /// <summary>
    /// The phase (0 to <see cref="Phases"/> - 1) used for input sample <paramref name="index"/>:
    /// SplitMix64's finaliser of index / 4. Four consecutive samples (aligned on the stream) share a
    /// phase, so that they are computed as one vector; the groups' phases are independent.
    /// </summary>
    public static int PhaseOf(long index)
    {
        ulong z = (ulong)(index >> 2) + 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        z ^= z >> 31;
        return (int)(z >> 58);
    }

    /// <summary>
    /// Takes a block of inputs whose first is stream sample <paramref name="firstIndex"/>; output i
    /// is the interpolated value at PhaseOf(firstIndex + i) / 64 of the interval that ends 8
    /// samples before input i.
    /// </summary>
    public void Process(ReadOnlySpan<double> x, long firstIndex, Span<double> output)
    {
        int n = x.Length,
            hist = Taps - 1;
        if (_buf.Length < hist + n)
            Array.Resize(ref _buf, hist + n);
        x.CopyTo(_buf.AsSpan(hist));
        ref double b = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_buf);
        ref double c = ref System.Runtime.InteropServices.MemoryMarshal.GetArrayDataReference(_coef);
        ref double o = ref System.Runtime.InteropServices.MemoryMarshal.GetReference(output);
        int i = 0;
        if (Vector<double>.Count == 4)
        {
            // Scalar up to the first group of four on the stream's grid, then whole groups as vectors.
            int head = (int)Math.Min(n, (4 - (firstIndex & 3)) & 3);
            Scalar(ref b, ref c, output, firstIndex, 0, head);
            for (i = head; i + 4 <= n; i += 4)
            {
                ref double h = ref Unsafe.Add(ref c, PhaseOf(firstIndex + i) * Taps);
                Vector<double> a0 = default,
                    a1 = default;
                int k = 0;
                for (; k + 1 < Taps; k += 2)
                {
                    a0 = Vector.FusedMultiplyAdd(
                        new Vector<double>(Unsafe.Add(ref h, k)),
                        VectorMath.Load(ref b, i + k),
                        a0
                    );
                    a1 = Vector.FusedMultiplyAdd(
                        new Vector<double>(Unsafe.Add(ref h, k + 1)),
                        VectorMath.Load(ref b, i + k + 1),
                        a1
                    );
                }
                a0 = Vector.FusedMultiplyAdd(
                    new Vector<double>(Unsafe.Add(ref h, k)),
                    VectorMath.Load(ref b, i + k),
                    a0
                );
                VectorMath.Store(a0 + a1, ref o, i);
            }
        }
        Scalar(ref b, ref c, output, firstIndex, i, n);
        _buf.AsSpan(n, hist).CopyTo(_buf);
    }

    /// <summary>The same sums as the vector path, lane by lane (even taps, odd taps, fused multiply-adds in the same
    /// order), so the values do not depend on the blocks.</summary>
    private static void Scalar(ref double b, ref double c, Span<double> output, long firstIndex, int from, int to)
    {
        for (int i = from; i < to; i++)
        {
            ref double h = ref Unsafe.Add(ref c, PhaseOf(firstIndex + i) * Taps);
            ref double w = ref Unsafe.Add(ref b, i);
            double a0 = 0,
                a1 = 0;
            int k = 0;
            for (; k + 1 < Taps; k += 2)
            {
                a0 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k), Unsafe.Add(ref w, k), a0);
                a1 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k + 1), Unsafe.Add(ref w, k + 1), a1);
            }
            a0 = Math.FusedMultiplyAdd(Unsafe.Add(ref h, k), Unsafe.Add(ref w, k), a0);
            output[i] = a0 + a1;
        }
    }
}
