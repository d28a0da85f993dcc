using System.Diagnostics;
using SignalInspect.Diagnostics;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Demodulation;

/// <summary>
/// One pass over the capture: shift, channel filter, decimate, then envelope, phase and
/// instantaneous frequency, into running sums, histograms and line spectra. The decimated stream
/// is cut into chunks (<see cref="ChunkSchedule.ChunkLength"/>, the last ones smaller: <see
/// cref="ChunkSchedule.ChunkBounds"/>) that the worker threads take in turn; each chunk starts its reader early enough
/// that every filter has settled (a warm-up whose outputs are dropped), so a chunk's samples are those of one long run.
/// The chunks' sums are combined in chunk order, and the unwrapped phase is carried from chunk to chunk through its
/// value just before each chunk's first sample, so the results do not depend on the thread count.
/// Memory does not grow with the capture.
/// </summary>
internal static partial class DemodulationPass
{
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
        double[]? Offsets,
        BlockTrack Track,
        CarrierTrack? Detrend
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
        public BlockTrack.Head TrackHead;
    }

    /// <summary>Runs the pass; with <paramref name="fit"/> (intercept, slope of the phase, and the chunk offsets of an
    /// earlier pass) also the phase histogram about that line (for PM); with <paramref name="detrend"/> the
    /// instantaneous frequency is taken about that local carrier (a drifting carrier's deviation).</summary>
    public static PassResult Run(
        PassPlan p,
        (double Intercept, double Slope)? fit,
        double[]? offsets,
        CancellationToken cancel,
        StageTimer? timer = null,
        CarrierTrack? detrend = null
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
        long[] bounds = ChunkSchedule.ChunkBounds(
            expected,
            ChunkSchedule.ChunkOutputsForTests ?? ChunkSchedule.ChunkLength(expected, warm),
            warm
        );
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
            offsets,
            new BlockTrack(expected, p.Fsd),
            detrend
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
        timer?.Note(
            $"line spectra: {workers.Sum(w => w.LineTicks) * 1e3 / Stopwatch.Frequency:0.0} ms over {threads} "
                + $"threads, {merged.Env.Segments} segments of {s.DemodFft}, {chunks} chunks, {setsMade} partial sets"
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
            s.Track.Merge(k.TrackHead);
            off += k.PhaseAtNext;
        }
        r.Samples = used;
        r.Blocks = s.Track.Result();
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
}
