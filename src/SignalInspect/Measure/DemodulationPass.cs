using System.Diagnostics;
using System.Numerics;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using SignalInspect.Capture;
using SignalInspect.Dsp;

namespace SignalInspect.Measure;

/// <summary>What one demodulation pass does: the window, the channel filter, the rates and the post-detection
/// filters.</summary>
/// <remarks>With <see cref="HalfBand"/> the channel filter is two stages: the half-band at Fs, then <see cref="Taps"/>
/// at Fs / 2.</remarks>
internal sealed record PassPlan(
    CaptureSource Source,
    long First,
    long Count,
    double[] Taps,
    int Decimation,
    double ShiftHz,
    double Fs,
    double Fsd,
    double ChannelHalfWidthHz,
    double PostLowPassHz,
    double? HighPassHz,
    double? DeEmphasisUs,
    bool Complex,
    int Threads,
    double[]? HalfBand = null
)
{
    /// <summary>Input samples one channel-filter output depends on (the filter's length at the input rate).</summary>
    public int ChannelSpan => ChannelDecimator.InputSpan(Taps, HalfBand);
}

/// <summary>The running statistics of a demodulation pass.</summary>
internal sealed class PassResult
{
    public long Samples;
    public double Slope,
        Intercept,
        SlopeVariance,
        PhaseResidualVariance;
    public double EnvelopeMean,
        FreqMean,
        FreqRms;
    public long NearFullScale;
    public required Histogram Envelope,
        Freq;
    public Histogram? Phase;
    public required LineSpectrum EnvelopeSpectrum,
        ToneSpectrum,
        TransitionSpectrum;
    public double[] WaveEnvelope = [],
        WaveFreq = [];

    /// <summary>Unwrapped phase at the start of each chunk (see <see cref="DemodulationPass"/>), for a later pass over
    /// the same chunks.</summary>
    public double[] ChunkPhaseOffsets = [];

    /// <summary>Whether the peaks were read between samples: envelope and phase (channel bandwidth), instantaneous
    /// frequency (post-detection bandwidth).</summary>
    public bool JitterEnvelope,
        JitterFrequency;
}

/// <summary>
/// One pass over the capture: shift, channel filter, decimate, then envelope, phase and
/// instantaneous frequency, into running sums, histograms and line spectra. The decimated stream
/// is cut into chunks (<see cref="ChunkLength"/>, the last ones smaller: <see cref="ChunkBounds"/>) that the worker
/// threads take in turn; each chunk starts its reader early enough that every filter has settled (a warm-up whose
/// outputs are dropped), so a chunk's samples are those of one long run. The chunks' sums are
/// combined in chunk order, and the unwrapped phase is carried from chunk to chunk through its
/// value just before each chunk's first sample, so the results do not depend on the thread count.
/// Memory does not grow with the capture.
/// </summary>
internal static class DemodulationPass
{
    /// <summary>Decimated samples per chunk, at most and at least (see <see cref="ChunkLength"/>).</summary>
    internal const int MaxChunk = 1 << 20,
        MinChunk = 1 << 16;

    /// <summary>
    /// Decimated samples per chunk for a stream of <paramref name="expected"/> samples whose chunks
    /// each run <paramref name="warmUp"/> samples before their own: the power of two at or below a
    /// sixteenth of the stream (so that two threads finish together: with five chunks one thread
    /// would do three), from <see cref="MinChunk"/> to <see cref="MaxChunk"/>, and at least eight warm-ups long.
    /// It depends on the stream only, never on the thread count.
    /// </summary>
    internal static int ChunkLength(long expected, int warmUp)
    {
        int len = MinChunk;
        while (len < MaxChunk && (2L * len <= expected / 16 || len < 8L * warmUp))
            len *= 2;
        return len;
    }

    /// <summary>
    /// Where the chunks start, and the stream's end: <paramref name="length"/> samples per chunk
    /// (<see cref="ChunkLength"/>), except over the last two to three chunk lengths, which are cut
    /// into quarters (at least <see cref="MinChunk"/> and eight warm-ups long) so that the threads
    /// finish close together: at the end one thread waits for at most a quarter chunk, not a whole
    /// one (a 60 s capture's chunks take about 80 ms each on one thread). A stream of at most 1.5
    /// lengths is one chunk. Like the length, it depends on the stream only, never on the thread count.
    /// </summary>
    internal static long[] ChunkBounds(long expected, int length, int warmUp)
    {
        if (expected <= length * 3L / 2)
            return [0, expected];
        int quarter = Math.Max(Math.Max(length / 4, MinChunk), 8 * warmUp);
        if (quarter >= length)
            quarter = length;
        long tailStart = Math.Max(0, (expected - 2L * length) / length * length);
        var bounds = new List<long>();
        for (long at = 0; at < tailStart; at += length)
            bounds.Add(at);
        for (long at = tailStart; at < expected; at += quarter)
            bounds.Add(at);
        bounds.Add(expected);
        return [.. bounds];
    }

    /// <summary>Tests only: a smaller chunk, so that short captures run through several chunks (for the calling flow
    /// only, not for tests running beside it).</summary>
    internal static int? ChunkOutputsForTests
    {
        get => ChunkOverride.Value;
        set => ChunkOverride.Value = value;
    }

    private static readonly AsyncLocal<int?> ChunkOverride = new();

    /// <summary>Line-spectrum segments per stream, at most; spread evenly over the capture.</summary>
    internal const int MaxLineSegments = 64;

    private const int InputBlock = 16384;
    private const int WaveMax = 16384;

    /// <summary>A sample component this close to full scale counts as clipped (the top code of a 16-bit capture is
    /// 0.99997).</summary>
    private const double FullScaleCode = 0.9999;

    /// <summary>
    /// Whether a stream needs its peaks read between samples (<see cref="JitteredSampler"/>): when it
    /// has fewer than 30 samples per period of the highest frequency it holds (the channel filter's
    /// width for the envelope and the phase, the post-detection low-pass for the frequency). At 30 a
    /// sampled sine's peak reads at most 1 - cos(pi/30) = 0.55 % low, and typically far less.
    /// </summary>
    public static bool NeedsJitter(double cutoffHz, double fsd) => 30 * Math.Min(cutoffHz, fsd / 2) > fsd;

    private sealed record Setup(
        PassPlan P,
        double[] LpTaps,
        long Expected,
        int Settle,
        int DemodFft,
        double AmpRange,
        long[] Bounds,
        int WarmUp,
        bool JitterEnvelope,
        bool JitterFrequency,
        long FirstSegment,
        long SegmentCandidates,
        (double Intercept, double Slope)? Fit,
        double[]? Offsets
    )
    {
        public int Hop => DemodFft / 2;
        public int Chunks => Bounds.Length - 1;

        public long ChunkStart(int c) => Bounds[c];

        public long ChunkEnd(int c) => Bounds[c + 1];

        /// <summary>First sample counted in the statistics.</summary>
        public long CountStart(int c) => c == 0 ? Settle : ChunkStart(c);

        /// <summary>First sample fed to the interpolators (they need <see cref="JitteredSampler.WarmUp"/> before their
        /// outputs count).</summary>
        public long FeedStart(int c) => c == 0 ? Settle : ChunkStart(c) - JitteredSampler.WarmUp;

        public bool Selected(long s)
        {
            long k = s - FirstSegment;
            if (k < 0 || k >= SegmentCandidates)
                return false;
            if (SegmentCandidates <= MaxLineSegments)
                return true;
            return k * MaxLineSegments / SegmentCandidates != (k - 1) * MaxLineSegments / SegmentCandidates || k == 0;
        }
    }

    /// <summary>One chunk's sums, its unwrapped phase measured from its own start, and the phase where the next chunk
    /// starts.</summary>
    private sealed class ChunkSums
    {
        public long Used,
            NearFullScale;
        public double Sw,
            Swt,
            Swtt,
            Swp,
            Swtp,
            Swpp,
            Sa,
            Sd,
            Sdd;
        public double PhaseAtNext;
    }

    /// <summary>Runs the pass; with <paramref name="fit"/> (intercept, slope of the phase, and the chunk offsets of an
    /// earlier pass) also the phase histogram about that line (for PM).</summary>
    public static PassResult Run(
        PassPlan p,
        (double Intercept, double Slope)? fit,
        double[]? offsets,
        CancellationToken cancel
    )
    {
        double[] lpTaps =
            p.PostLowPassHz < 0.45 * p.Fsd
                ? FirDesign.LowPass(p.PostLowPassHz, p.Fsd, Math.Max(0.1 * p.PostLowPassHz, 2 * p.Fsd / 4095), 70, 1023)
                : [1.0];
        long expected = p.Count / p.Decimation;
        int lpDelay = (lpTaps.Length - 1) / 2;
        int iir =
            (p.HighPassHz is null ? 0 : (int)Math.Min(expected / 4, 3 * p.Fsd / p.HighPassHz.Value))
            + (p.DeEmphasisUs is null ? 0 : (int)Math.Min(expected / 4, 5 * p.DeEmphasisUs.Value * 1e-6 * p.Fsd));
        int settle = (p.ChannelSpan - 1) / 2 / p.Decimation + 2 + lpDelay * 2 + iir;
        settle = (int)Math.Min(settle, expected / 4);
        int demodFft = 256;
        while (demodFft < 65536 && p.Fsd / demodFft > 1.0 && 4L * demodFft * 2 <= expected)
            demodFft *= 2;
        // Decimated samples run before a chunk so that every filter holds only real input: the
        // channel filter, the 3-tap compensator, the low-pass, the interpolators and the one-pole filters.
        int warm =
            (p.ChannelSpan + p.Decimation - 1) / p.Decimation + lpTaps.Length + 3 + JitteredSampler.WarmUp + iir + 8;
        long[] bounds = ChunkBounds(expected, ChunkOutputsForTests ?? ChunkLength(expected, warm), warm);
        int chunks = bounds.Length - 1;
        int hop = demodFft / 2;
        long firstSeg = (settle + hop - 1) / hop;
        long lastSeg = (expected - demodFft) / hop;
        var s = new Setup(
            p,
            lpTaps,
            expected,
            settle,
            demodFft,
            p.Complex ? 1.5 : 0.75,
            bounds,
            warm,
            NeedsJitter(p.ChannelHalfWidthHz, p.Fsd),
            NeedsJitter(p.PostLowPassHz, p.Fsd),
            firstSeg,
            Math.Max(0, lastSeg - firstSeg + 1),
            fit,
            offsets
        );

        var sums = new ChunkSums[chunks];
        int threads = Math.Max(1, Math.Min(p.Threads, chunks));
        var workers = new Worker[threads];
        var merged = NewLines(s);
        // Line spectra are combined strictly in chunk order (sums of doubles depend on order).
        int setsMade = 0;
        var lineSets = new InOrder<LineSet>(
            () =>
            {
                Interlocked.Increment(ref setsMade);
                return NewLines(s);
            },
            ready =>
            {
                merged.Env.Take(ready.Env);
                merged.Tone.Take(ready.Tone);
                merged.Trans.Take(ready.Trans);
            }
        );
        int nextChunk = -1;
        double[] waveA = [],
            waveF = [];
        Parallel.For(
            0,
            threads,
            new ParallelOptions { MaxDegreeOfParallelism = threads, CancellationToken = cancel },
            w =>
            {
                var worker = workers[w] = new Worker(s);
                int c;
                while ((c = Interlocked.Increment(ref nextChunk)) < chunks)
                {
                    cancel.ThrowIfCancellationRequested();
                    LineSet lines = lineSets.Rent();
                    sums[c] = worker.RunChunk(c, lines, cancel);
                    if (c == 0)
                        (waveA, waveF) = (worker.WaveA.ToArray(), worker.WaveF.ToArray());
                    lineSets.Complete(c, lines);
                }
            }
        );

        var r = new PassResult
        {
            Envelope = workers[0].Envelope,
            Freq = workers[0].Freq,
            Phase = workers[0].Phase,
            EnvelopeSpectrum = merged.Env,
            ToneSpectrum = merged.Tone,
            TransitionSpectrum = merged.Trans,
            WaveEnvelope = waveA,
            WaveFreq = waveF,
            ChunkPhaseOffsets = new double[chunks],
            JitterEnvelope = s.JitterEnvelope,
            JitterFrequency = s.JitterFrequency,
        };
        for (int w = 1; w < threads; w++)
        {
            r.Envelope.Add(workers[w].Envelope);
            r.Freq.Add(workers[w].Freq);
            if (r.Phase is not null)
                r.Phase.Add(workers[w].Phase!);
        }
        Profile.Note(
            $"line spectra: {workers.Sum(w => w.LineTicks) * 1e3 / Stopwatch.Frequency:0.0} ms over {threads} threads, {merged.Env.Segments} segments of {s.DemodFft}, {chunks} chunks, {setsMade} partial sets"
        );
        // Chunk sums in order, each chunk's phase moved to the capture's unwrapped phase.
        double sw = 0,
            swt = 0,
            swtt = 0,
            swp = 0,
            swtp = 0,
            swpp = 0,
            sa = 0,
            sd = 0,
            sdd = 0,
            off = 0;
        long used = 0;
        for (int c = 0; c < chunks; c++)
        {
            ChunkSums k = sums[c];
            r.ChunkPhaseOffsets[c] = off;
            sw += k.Sw;
            swt += k.Swt;
            swtt += k.Swtt;
            swp += k.Swp + off * k.Sw;
            swtp += k.Swtp + off * k.Swt;
            swpp += k.Swpp + 2 * off * k.Swp + off * off * k.Sw;
            sa += k.Sa;
            sd += k.Sd;
            sdd += k.Sdd;
            used += k.Used;
            r.NearFullScale += k.NearFullScale;
            off += k.PhaseAtNext;
        }
        r.Samples = used;
        if (used > 0 && sw > 0)
        {
            double mt = swt / sw,
                mp = swp / sw;
            double stt = swtt / sw - mt * mt,
                stp = swtp / sw - mt * mp,
                spp = swpp / sw - mp * mp;
            r.Slope = stt > 0 ? stp / stt : 0;
            r.Intercept = mp - r.Slope * mt;
            r.PhaseResidualVariance = Math.Max(0, spp - r.Slope * stp);
            // Standard error of a weighted slope with the residual variance as the noise variance.
            r.SlopeVariance = stt > 0 ? r.PhaseResidualVariance / (stt * used) : 0;
            r.EnvelopeMean = sa / used;
            r.FreqMean = sd / used;
            r.FreqRms = Math.Sqrt(Math.Max(0, sdd / used - r.FreqMean * r.FreqMean));
        }
        return r;
    }

    private sealed record LineSet(LineSpectrum Env, LineSpectrum Tone, LineSpectrum Trans);

    private static LineSet NewLines(Setup s) =>
        new(
            new LineSpectrum(s.DemodFft, s.P.Fsd),
            new LineSpectrum(s.DemodFft, s.P.Fsd),
            new LineSpectrum(s.DemodFft, s.P.Fsd)
        );

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
                    k.NearFullScale += CountFullScale(f[(skip * vps)..]);
                inPos += got;
                return dec.Process(f, _re.AsSpan(1), _im.AsSpan(1));
            }
            if ((got = reader.Read(_input)) <= 0)
                return -1;
            if (skip < got)
                k.NearFullScale += CountFullScale(_input.AsSpan(skip * vps, (got - skip) * vps));
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

    /// <summary>Sample components at full scale (|v| at or above the top code), NaN not counted.</summary>
    private static long CountFullScale(ReadOnlySpan<double> v) => CountAtOrAbove(v, FullScaleCode);

    /// <summary>The same count of single-precision components (as of them widened).</summary>
    private static long CountFullScale(ReadOnlySpan<float> v) => CountAtOrAbove(v, FullScaleCodeF);

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
