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

    /// <summary>Mean channel power |z|^2 per block of <see cref="BlockLength"/> decimated samples (NaN where no sample
    /// was counted): the power against time that finds transmissions.</summary>
    public double[] BlockPower = [];

    /// <summary>Decimated samples per block of <see cref="BlockPower"/>.</summary>
    public int BlockLength = 1;

    /// <summary>Unwrapped phase at the start of each chunk (see <see cref="DemodulationPass"/>), for a later pass over
    /// the same chunks.</summary>
    public double[] ChunkPhaseOffsets = [];

    /// <summary>Whether the peaks were read between samples: envelope and phase (channel bandwidth), instantaneous
    /// frequency (post-detection bandwidth).</summary>
    public bool JitterEnvelope,
        JitterFrequency;
}
