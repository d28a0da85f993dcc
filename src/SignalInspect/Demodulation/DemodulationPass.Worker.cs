using System.Diagnostics;
using System.Numerics;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Demodulation;

// DemodulationPass, part 2: one worker thread's buffers, rings and vector kernels; it runs chunks one after another.
internal static partial class DemodulationPass
{
    /// <summary>One thread's buffers and histograms; runs chunks one after another.</summary>
    private sealed class Worker
    {
        private readonly Setup _s;
        private bool _pendingTransition;
        private readonly double[] _input,
            _re,
            _im,
            _a,
            _x,
            _y,
            _dphi,
            _dev,
            _df,
            _pv,
            _ph,
            _ubuf,
            _ringA,
            _ringF,
            _ringT,
            _pending;
        private readonly LineSpectrum.Workspace _ws;
        private readonly ChannelDecimator _dec;
        private readonly BlockFir _comp,
            _lp;
        private readonly JitteredSampler? _upA,
            _upF,
            _upP;
        public readonly Histogram Envelope,
            Freq;
        public readonly Histogram? Phase;
        public readonly List<double> WaveA = [],
            WaveF = [];

        /// <summary>Time spent on line-spectrum segments (Stopwatch ticks), for the profile.</summary>
        public long LineTicks;

        public Worker(Setup s)
        {
            _s = s;
            PassPlan p = s.P;
            int vps = p.Complex ? 2 : 1;
            int maxOut = InputBlock / p.Decimation + 2;
            _input = new double[InputBlock * vps];
            _re = new double[maxOut + 1];
            _im = new double[maxOut + 1];
            _a = new double[maxOut];
            _x = new double[maxOut];
            _y = new double[maxOut];
            _dphi = new double[maxOut];
            _dev = new double[maxOut];
            _df = new double[maxOut];
            _pv = new double[maxOut];
            _ph = new double[maxOut];
            _ubuf = new double[maxOut];
            _ringA = new double[s.DemodFft];
            _ringF = new double[s.DemodFft];
            _ringT = new double[s.DemodFft];
            _pending = new double[s.DemodFft];
            _ws = new LineSpectrum.Workspace(s.DemodFft);
            _dec = new ChannelDecimator(p.Taps, p.Decimation, p.ShiftHz, p.Fs, p.Complex, p.HalfBand);
            // The phase difference of consecutive samples averages the frequency over one sample: a
            // response sin(pi f/fs)/(pi f/fs). This 3-tap filter, 1 + (wT)^2/24 for small wT, undoes it
            // (residual below 0.2 % up to fs/7.5; the decimation keeps the channel below that).
            _comp = new BlockFir([-1.0 / 24, 1 + 1.0 / 12, -1.0 / 24]);
            _lp = new BlockFir(s.LpTaps);
            // The envelope and the phase are as wide as the channel; the frequency passed the
            // post-detection low-pass. A stream sampled 30 times a period at its cutoff is taken as it is.
            _upA = s.JitterEnvelope ? new JitteredSampler() : null;
            _upF = s.JitterFrequency ? new JitteredSampler() : null;
            _upP = s.Fit is not null && s.JitterEnvelope ? new JitteredSampler() : null;
            Envelope = new Histogram(0, s.AmpRange, 1 << 16);
            Freq = new Histogram(-p.Fsd / 2, p.Fsd / 2, 1 << 18);
            Phase = s.Fit is null ? null : new Histogram(-64, 64, 1 << 20);
        }

        public ChunkSums RunChunk(int c, LineSet lines, CancellationToken cancel)
        {
            Setup s = _s;
            PassPlan p = s.P;
            int d = p.Decimation;
            long begin = c == 0 ? 0 : Math.Max(0, s.ChunkStart(c) - s.WarmUp);
            long end = s.ChunkEnd(c);
            long inFirst = begin * d,
                inEnd = c == s.Chunks - 1 ? p.Count : end * d;
            long ownIn = c == 0 ? 0 : s.ChunkStart(c) * d;
            long countStart = s.CountStart(c),
                feedStart = s.FeedStart(c),
                histStart = feedStart + JitteredSampler.WarmUp;
            long nextFeed = c + 1 < s.Chunks ? s.FeedStart(c + 1) - 1 : -1;
            double offset = s.Offsets is { } o ? o[c] : 0;

            // The filters start each chunk empty (their tables are built once per worker).
            ChannelDecimator dec = _dec;
            dec.Reset(inFirst);
            BlockFir comp = _comp,
                lp = _lp;
            comp.Reset();
            lp.Reset();
            OnePole? hp = p.HighPassHz is { } hz ? OnePole.HighPass(hz, p.Fsd) : null;
            OnePole? de = p.DeEmphasisUs is { } us ? OnePole.DeEmphasis(us * 1e-6, p.Fsd) : null;
            JitteredSampler? upA = _upA,
                upF = _upF,
                upP = _upP;
            upA?.Reset();
            upF?.Reset();
            upP?.Reset();
            if (c == 0)
            {
                WaveA.Clear();
                WaveF.Clear();
            }

            var k = new ChunkSums();
            _pendingTransition = false;
            double tMid = s.Expected / 2.0;
            double phase = 0,
                prevD = 0;
            double toHz = p.Fsd / (2 * Math.PI);
            long n = begin;
            int mask = s.DemodFft - 1,
                hop = s.Hop;
            using CaptureReader reader = p.Source.OpenReader(p.First + inFirst, inEnd - inFirst);
            long inPos = inFirst;
            int m;
            _re[0] = _im[0] = 0;
            while ((m = NextBlock(reader, dec, ownIn, ref inPos, k)) >= 0)
            {
                cancel.ThrowIfCancellationRequested();
                if (m == 0)
                    continue;
                // Envelope and phase step of every output; _re[0], _im[0] hold the previous sample.
                Span<double> re = _re.AsSpan(0, m + 1),
                    im = _im.AsSpan(0, m + 1);
                VectorMath.Magnitude(re[1..], im[1..], _a.AsSpan(0, m));
                CrossAndDot(re, im, _y.AsSpan(0, m), _x.AsSpan(0, m));
                VectorMath.Atan2(_y.AsSpan(0, m), _x.AsSpan(0, m), _dphi.AsSpan(0, m));
                if (n == 0)
                    _dphi[0] = 0;
                _re[0] = _re[m];
                _im[0] = _im[m];
                // Instantaneous frequency: the phase step in Hz, the sin(x)/x compensator, the optional
                // one-pole filters, the post-detection low-pass.
                Span<double> dev = _dev.AsSpan(0, m);
                VectorMath.Scale(_dphi.AsSpan(0, m), toHz, dev);
                comp.Process(dev, dev);
                if (hp is not null)
                    for (int i = 0; i < m; i++)
                        dev[i] = hp.Next(dev[i]);
                if (de is not null)
                    for (int i = 0; i < m; i++)
                        dev[i] = de.Next(dev[i]);
                lp.Process(dev, _df.AsSpan(0, m));
                if (s.Detrend is { } trend)
                    trend.Subtract(n, _df.AsSpan(0, m));

                // Unwrapped phase: a running sum (sequential), with the chunk's events at their samples.
                long n0 = n;
                for (int i = 0; i < m; i++, n++)
                {
                    phase += _dphi[i];
                    _ph[i] = phase;
                    if (n == nextFeed)
                        k.PhaseAtNext = phase;
                    if (c > 0 && n == feedStart - 1)
                        phase = 0;
                }
                if (s.Fit is not null)
                {
                    var (icpt, slope) = s.Fit.Value;
                    for (int i = (int)Math.Clamp(feedStart - n0, 0, m); i < m; i++)
                        _pv[i] = _ph[i] + offset - (icpt + slope * (n0 + i - tMid));
                }
                int i0 = (int)Math.Clamp(countStart - n0, 0, m);
                if (i0 > 0)
                    prevD = _df[i0 - 1];
                if (i0 < m)
                {
                    Sums(k, _a.AsSpan(i0, m - i0), _df.AsSpan(i0, m - i0), _ph.AsSpan(i0, m - i0), n0 + i0 - tMid);
                    s.Track.Add(n0 + i0, _a.AsSpan(i0, m - i0), _df.AsSpan(i0, m - i0), countStart, ref k.TrackHead);
                    // Transition stream |df[i] - df[i - 1]|.
                    _x[i0] = Math.Abs(_df[i0] - prevD);
                    VectorMath.AbsDifference(
                        _df.AsSpan(i0 + 1, m - i0 - 1),
                        _df.AsSpan(i0, m - i0 - 1),
                        _x.AsSpan(i0 + 1)
                    );
                    prevD = _df[m - 1];
                    if (c == 0 && WaveA.Count < WaveMax)
                    {
                        int take = Math.Min(WaveMax - WaveA.Count, m - i0);
                        for (int i = i0; i < i0 + take; i++)
                        {
                            WaveA.Add(_a[i]);
                            WaveF.Add(_df[i]);
                        }
                    }
                    k.Used += m - i0;
                    // The rings, up to each end of a line-spectrum segment [seg hop, seg hop + N) in turn.
                    // Segment seg covers the hops seg and seg + 1: only the hops of segments taken are copied.
                    for (int i = i0; i < m;)
                    {
                        long at = n0 + i;
                        int upto = (int)Math.Min(m, (at / hop + 1) * hop - n0); // just past the next hop boundary
                        if (Taken(at / hop) || Taken(at / hop - 1))
                        {
                            Ring(_ringA, _a.AsSpan(i, upto - i), at);
                            Ring(_ringF, _df.AsSpan(i, upto - i), at);
                            Ring(_ringT, _x.AsSpan(i, upto - i), at);
                        }
                        long filled = n0 + upto; // samples before this index are in the rings
                        if (filled % hop == 0 && Taken(filled / hop - 2) && filled / hop - 2 is long seg)
                        {
                            long t0 = Stopwatch.GetTimestamp();
                            AddSegment(lines.Env, _ringA, lines.Tone, _ringF, seg * hop);
                            AddTransition(lines.Trans, seg * hop);
                            LineTicks += Stopwatch.GetTimestamp() - t0;
                        }
                        i = upto;
                    }
                }
                // Peak statistics over the samples fed so far in this block.
                int f0 = (int)Math.Clamp(feedStart - n0, 0, m);
                if (f0 < m)
                {
                    int h0 = (int)Math.Clamp(histStart - n0 - f0, 0, m - f0);
                    AddPeaks(upA, _a.AsSpan(f0, m - f0), n0 + f0, h0, Envelope);
                    AddPeaks(upF, _df.AsSpan(f0, m - f0), n0 + f0, h0, Freq);
                    if (s.Fit is not null)
                        AddPeaks(upP, _pv.AsSpan(f0, m - f0), n0 + f0, h0, Phase!);
                }
            }
            if (_pendingTransition)
            {
                lines.Trans.AddSegment(_pending, _ws);
                _pendingTransition = false;
            }
            return k;

            // Whether line-spectrum segment seg (from sample seg hop) goes into this chunk's spectra.
            bool Taken(long seg) => seg >= 0 && seg * hop >= countStart && s.Selected(seg);
        }

        /// <summary>
        /// The transition stream's segments go in pairs through one complex transform: the first of a
        /// pair waits in _pending; one left at the chunk's end is added alone (see RunChunk).
        /// </summary>
        private void AddTransition(LineSpectrum trans, long start)
        {
            if (!_pendingTransition)
            {
                Unroll(_ringT, start, _pending);
                _pendingTransition = true;
                return;
            }
            LineSpectrum.AddRingSegments(trans, _pending, 0, trans, _ringT, (int)(start & (_ringT.Length - 1)), _ws);
            _pendingTransition = false;
        }

        /// <summary>
        /// Reads the next block of input (float32 captures as stored, others decoded to double),
        /// counts its full-scale components from the chunk's own first input
        /// <paramref name="ownIn"/> on, and runs it through the channel filter: the outputs land in
        /// _re, _im from index 1. Returns their number, or -1 at the end of the chunk's input.
        /// </summary>
        private int NextBlock(CaptureReader reader, ChannelDecimator dec, long ownIn, ref long inPos, ChunkSums k)
        {
            int vps = reader.ValuesPerSample,
                got;
            int skip = (int)Math.Clamp(ownIn - inPos, 0, int.MaxValue);
            if (reader.DeliversFloat32)
            {
                // As stored, a view of the file (no copy where it is mapped).
                ReadOnlySpan<float> f = reader.Float32View(reader.Position, InputBlock);
                if ((got = f.Length / vps) <= 0)
                    return -1;
                if (skip < got)
                    k.NearFullScale += CountFullScale(f[(skip * vps)..], reader.StoresFloat);
                inPos += got;
                return dec.Process(f, _re.AsSpan(1), _im.AsSpan(1));
            }
            if ((got = reader.Read(_input)) <= 0)
                return -1;
            if (skip < got)
                k.NearFullScale += CountFullScale(_input.AsSpan(skip * vps, (got - skip) * vps), reader.StoresFloat);
            inPos += got;
            return dec.Process(_input.AsSpan(0, got * vps), _re.AsSpan(1), _im.AsSpan(1));
        }

        /// <summary>Copies a run of samples into a ring of the segment length at their sample indices.</summary>
        private static void Ring(double[] ring, ReadOnlySpan<double> x, long first)
        {
            int len = ring.Length,
                at = (int)(first & (len - 1));
            while (x.Length > 0)
            {
                int piece = Math.Min(x.Length, len - at);
                x[..piece].CopyTo(ring.AsSpan(at));
                x = x[piece..];
                at = 0;
            }
        }

        /// <summary>
        /// The chunk's running sums over a run of counted samples: weights w = a^2 with the times
        /// t (from <paramref name="t0"/> on, one per sample) and the phase, for the weighted
        /// regression of the phase; the envelope and the deviation for their means and the rms.
        /// </summary>
        private static void Sums(
            ChunkSums k,
            ReadOnlySpan<double> a,
            ReadOnlySpan<double> df,
            ReadOnlySpan<double> ph,
            double t0
        )
        {
            int n = a.Length,
                w = Vector<double>.Count,
                i = 0;
            Vector<double> sw = default,
                swt = default,
                swtt = default,
                swp = default,
                swtp = default,
                swpp = default,
                sa = default,
                sd = default,
                sdd = default;
            Span<double> ramp = stackalloc double[w];
            for (int l = 0; l < w; l++)
                ramp[l] = l;
            var tv = new Vector<double>(t0) + new Vector<double>(ramp);
            var step = new Vector<double>(w);
            for (; i + w <= n; i += w, tv += step)
            {
                var av = new Vector<double>(a.Slice(i, w));
                var dv = new Vector<double>(df.Slice(i, w));
                var pv = new Vector<double>(ph.Slice(i, w));
                Vector<double> wv = av * av,
                    wt = wv * tv,
                    wp = wv * pv;
                sw += wv;
                swt += wt;
                swtt += wt * tv;
                swp += wp;
                swtp += wp * tv;
                swpp += wp * pv;
                sa += av;
                sd += dv;
                sdd += dv * dv;
            }
            double Sw = Vector.Sum(sw),
                Swt = Vector.Sum(swt),
                Swtt = Vector.Sum(swtt),
                Swp = Vector.Sum(swp),
                Swtp = Vector.Sum(swtp),
                Swpp = Vector.Sum(swpp);
            double Sa = Vector.Sum(sa),
                Sd = Vector.Sum(sd),
                Sdd = Vector.Sum(sdd);
            for (; i < n; i++)
            {
                double t = t0 + i,
                    wi = a[i] * a[i];
                Sw += wi;
                Swt += wi * t;
                Swtt += wi * t * t;
                Swp += wi * ph[i];
                Swtp += wi * t * ph[i];
                Swpp += wi * ph[i] * ph[i];
                Sa += a[i];
                Sd += df[i];
                Sdd += df[i] * df[i];
            }
            k.Sw += Sw;
            k.Swt += Swt;
            k.Swtt += Swtt;
            k.Swp += Swp;
            k.Swtp += Swtp;
            k.Swpp += Swpp;
            k.Sa += Sa;
            k.Sd += Sd;
            k.Sdd += Sdd;
        }

        /// <summary>
        /// Feeds a block (its first sample is stream sample <paramref name="first"/>) to a jittered
        /// sampler, or takes the samples as they are without one; the values of inputs from
        /// <paramref name="from"/> on go to the histogram.
        /// </summary>
        private void AddPeaks(JitteredSampler? up, ReadOnlySpan<double> x, long first, int from, Histogram h)
        {
            int len = x.Length;
            if (up is null)
            {
                if (from < len)
                    h.Add(x[from..]);
                return;
            }
            up.Process(x, first, _ubuf.AsSpan(0, len));
            if (from < len)
                h.Add(_ubuf.AsSpan(from, len - from));
        }

        /// <summary>Two streams' segments from <paramref name="start"/> in one transform, read straight out of their
        /// rings.</summary>
        private void AddSegment(LineSpectrum a, double[] ringA, LineSpectrum b, double[] ringB, long start)
        {
            int s0 = (int)(start & (ringA.Length - 1));
            LineSpectrum.AddRingSegments(a, ringA, s0, b, ringB, s0, _ws);
        }

        private static void Unroll(double[] ring, long start, double[] into)
        {
            int nfft = ring.Length,
                s0 = (int)(start & (nfft - 1));
            ring.AsSpan(s0).CopyTo(into);
            ring.AsSpan(0, s0).CopyTo(into.AsSpan(nfft - s0));
        }
    }

    /// <summary>y[i] = Im(z[i+1] conj z[i]), x[i] = Re(z[i+1] conj z[i]) over consecutive samples.</summary>
    private static void CrossAndDot(ReadOnlySpan<double> re, ReadOnlySpan<double> im, Span<double> y, Span<double> x)
    {
        int m = y.Length,
            w = Vector<double>.Count,
            i = 0;
        ref double r = ref MemoryMarshal.GetReference(re);
        ref double q = ref MemoryMarshal.GetReference(im);
        ref double yo = ref MemoryMarshal.GetReference(y);
        ref double xo = ref MemoryMarshal.GetReference(x);
        for (; i + w <= m; i += w)
        {
            Vector<double> pr = VectorMath.Load(ref r, i),
                pi = VectorMath.Load(ref q, i);
            Vector<double> zr = VectorMath.Load(ref r, i + 1),
                zi = VectorMath.Load(ref q, i + 1);
            VectorMath.Store(zi * pr - zr * pi, ref yo, i);
            VectorMath.Store(zr * pr + zi * pi, ref xo, i);
        }
        for (; i < m; i++)
        {
            y[i] = im[i + 1] * re[i] - re[i + 1] * im[i];
            x[i] = re[i + 1] * re[i] + im[i + 1] * im[i];
        }
    }

    /// <summary>The smallest float at or above <see cref="FullScaleCode"/>: |v| &gt;= it exactly when (double)|v| &gt;=
    /// the code.</summary>
    private static readonly float FullScaleCodeF =
        (float)FullScaleCode >= FullScaleCode ? (float)FullScaleCode : MathF.BitIncrement((float)FullScaleCode);

    /// <summary>Sample components at full scale (|v| at or above the top code), NaN not counted. Floats may exceed
    /// 1 without clipping (a capture not scaled to +/-1): for them only values from the top code up to 1 itself
    /// count (the second count runs only when the first found any).</summary>
    private static long CountFullScale(ReadOnlySpan<double> v, bool isFloat)
    {
        long n = CountAtOrAbove(v, FullScaleCode);
        return isFloat && n > 0 ? n - CountAtOrAbove(v, Math.BitIncrement(1.0)) : n;
    }

    /// <summary>The same count of single-precision components (as of them widened).</summary>
    private static long CountFullScale(ReadOnlySpan<float> v, bool isFloat)
    {
        long n = CountAtOrAbove(v, FullScaleCodeF);
        return isFloat && n > 0 ? n - CountAtOrAbove(v, MathF.BitIncrement(1f)) : n;
    }

    /// <summary>
    /// Components with |v| &gt;= <paramref name="limit"/>, NaN not counted. The per-lane counts are
    /// kept in T: exact, as a block holds far fewer than 2^24 values.
    /// </summary>
    internal static long CountAtOrAbove<T>(ReadOnlySpan<T> v, T limit)
        where T : unmanaged, INumber<T>
    {
        long count = 0;
        if (Simd.Wide)
        {
            // On 512-bit vectors as far as they go (the loop reads every component of the capture once more).
            var wl = Vector512.Create(limit);
            Vector512<T> wacc = Vector512<T>.Zero;
            ReadOnlySpan<Vector512<T>> wv = MemoryMarshal.Cast<T, Vector512<T>>(v);
            foreach (Vector512<T> x in wv)
                wacc += Vector512.ConditionalSelect(
                    Vector512.GreaterThanOrEqual(Vector512.Abs(x), wl),
                    Vector512<T>.One,
                    Vector512<T>.Zero
                );
            count = long.CreateTruncating(Vector512.Sum(wacc));
            v = v[(wv.Length * Vector512<T>.Count)..];
        }
        var lim = new Vector<T>(limit);
        Vector<T> acc = Vector<T>.Zero;
        ReadOnlySpan<Vector<T>> vv = MemoryMarshal.Cast<T, Vector<T>>(v);
        foreach (Vector<T> x in vv)
            acc += Vector.ConditionalSelect(
                Vector.GreaterThanOrEqual(Vector.Abs(x), lim),
                Vector<T>.One,
                Vector<T>.Zero
            );
        count += long.CreateTruncating(Vector.Sum(acc));
        for (int i = vv.Length * Vector<T>.Count; i < v.Length; i++)
            if (T.Abs(v[i]) >= limit)
                count++;
        return count;
    }
}
