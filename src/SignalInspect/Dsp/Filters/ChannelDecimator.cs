using System.Numerics;
using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace SignalInspect.Dsp;

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
public sealed partial class ChannelDecimator
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

    /// <summary>Whether <see cref="Dot4"/> runs on 512-bit vectors (AVX-512): eight complex taps per load, half the
    /// instructions.</summary>
    private readonly bool _wide;
}
