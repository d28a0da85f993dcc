using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Demodulation;

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

    /// <summary>The channel against time in blocks of about 1 ms: power (transmissions), mean frequency (the carrier
    /// against time) and extremes.</summary>
    public BlockStats Blocks = BlockStats.Empty;

    /// <summary>Unwrapped phase at the start of each chunk (see <see cref="DemodulationPass"/>), for a later pass over
    /// the same chunks.</summary>
    public double[] ChunkPhaseOffsets = [];

    /// <summary>Whether the peaks were read between samples: envelope and phase (channel bandwidth), instantaneous
    /// frequency (post-detection bandwidth).</summary>
    public bool JitterEnvelope,
        JitterFrequency;
}
