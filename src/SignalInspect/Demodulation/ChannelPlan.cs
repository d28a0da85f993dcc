using System.Globalization;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;

namespace SignalInspect.Demodulation;

/// <summary>
/// The channel around the signal that the demodulation pass keeps: the shift to 0 Hz, the channel
/// filter (flat over every part of the spectrum that stands out of the noise, to 60 dB below the
/// peak, so that the weak outer sidebands that shape the peaks of an angle-modulated signal pass; at
/// least 1.2 times the occupied bandwidth), the decimation, and the default post-detection low-pass.
/// </summary>
public sealed record ChannelPlan
{
    /// <summary>Stop-band attenuation of the channel filter and of its half-band first stage, dB.</summary>
    public const double StopbandDb = 80;

    /// <summary>Most taps of the channel low-pass.</summary>
    public const int MaxTaps = 4095;

    /// <summary>The channel reaches this many times the occupied bandwidth's farthest edge from the carrier.</summary>
    public const double OccupiedReach = 1.2;

    /// <summary>Parts of the spectrum this far below its peak (60 dB, as a power ratio) and 10 dB above the floor
    /// still widen the channel.</summary>
    public const double ReachBelowPeak = 1e-6,
        ReachAboveFloor = 10;

    /// <summary>Pass edge: the reach plus this many spectrum bins, and at least <see cref="MinPassBins"/>.</summary>
    public const double PassEdgeBins = 4,
        MinPassBins = 8;

    /// <summary>A channel filter is used when 1.25 x the pass edge stays below 0.9 of the usable band.</summary>
    public const double FilterRoom = 1.25,
        UsableShare = 0.9;

    /// <summary>The decimated rate is at least this many times the low-pass's stop edge (on the one side).</summary>
    public const double RateOverStopEdge = 2.5;

    /// <summary>Narrowest transition band, as a share of the pass edge, when another emission is near (a narrower one
    /// would need more than <see cref="MaxTaps"/> taps at wide rates).</summary>
    public const double MinTransitionShare = 0.2;

    /// <summary>Default post-detection cutoff as a share of the channel's width; never above
    /// <see cref="MaxPostLowPassShare"/> of the decimated rate.</summary>
    public const double PostLowPassShare = 0.9,
        MaxPostLowPassShare = 0.45;

    /// <summary>Input sample rate, Hz.</summary>
    public required double SampleRateHz { get; init; }

    /// <summary>Where the carrier sits on the capture's axis, Hz (shifted to 0 Hz).</summary>
    public required double CarrierHz { get; init; }

    /// <summary>Half-width of the channel the demodulator sees, Hz (the low-pass's cutoff, or the usable band
    /// without a filter).</summary>
    public required double HalfWidthHz { get; init; }

    /// <summary>Decimation factor (1 without a filter).</summary>
    public required int Decimation { get; init; }

    /// <summary>Rate after decimation, Hz.</summary>
    public double DecimatedRateHz => SampleRateHz / Decimation;

    /// <summary>Low-pass taps (at half the input rate when <see cref="HalfBand"/> is set); [1] without a
    /// filter.</summary>
    public required double[] Taps { get; init; }

    /// <summary>The half-band first stage's taps, or null for one stage.</summary>
    public double[]? HalfBand { get; init; }

    /// <summary>False when the signal fills the band and no channel filter is used.</summary>
    public required bool Filtered { get; init; }

    /// <summary>Post-detection low-pass cutoff, Hz (asked for, or the channel's width), at most 0.45 of the
    /// decimated rate.</summary>
    public required double PostLowPassHz { get; init; }

    /// <summary>True when another emission lies so near that the filter's stop band cannot start before it while
    /// passing the measured emission's occupied band.</summary>
    public bool Crowded { get; init; }

    /// <summary>The filter in words, for the method record.</summary>
    public required string Description { get; init; }

    /// <summary>True when a real signal's carrier sits too close to 0 Hz or to half the rate for its
    /// bandwidth: the analytic signal keeps some of the mirror image.</summary>
    public required bool MirrorKept { get; init; }

    /// <summary>
    /// Designs the channel for a carrier at <paramref name="carrierHz"/> whose occupied bandwidth runs
    /// from <paramref name="lowerEdgeHz"/> to <paramref name="upperEdgeHz"/> above a noise floor of
    /// <paramref name="noiseFloorDensity"/> in <paramref name="psd"/>.
    /// </summary>
    /// <param name="psd">The capture's mean spectrum (density per Hz).</param>
    /// <param name="complex">Complex (IQ) input; real input keeps the analytic signal's band.</param>
    /// <param name="carrierHz">The carrier on the capture's axis, Hz.</param>
    /// <param name="lowerEdgeHz">Lower edge of the occupied bandwidth, Hz.</param>
    /// <param name="upperEdgeHz">Upper edge of the occupied bandwidth, Hz.</param>
    /// <param name="noiseFloorDensity">Noise density of the spectrum (its unit).</param>
    /// <param name="postLowPassHz">Post-detection low-pass asked for, Hz; null for the channel's width (so that every
    /// modulating frequency the channel holds passes, and FSK's frequency steps keep their flat tops).</param>
    /// <param name="others">Other emissions (lower, upper edge on the capture's axis, Hz): the filter's stop band
    /// starts before the nearest one where the measured emission's occupied band allows (a carrier 10 kHz away
    /// would otherwise pass the transition band and beat with the measured one).</param>
    public static ChannelPlan Design(
        PowerSpectrum psd,
        bool complex,
        double carrierHz,
        double lowerEdgeHz,
        double upperEdgeHz,
        double noiseFloorDensity,
        double? postLowPassHz,
        IReadOnlyList<(double LowHz, double HighHz)>? others = null
    )
    {
        double fs = psd.SampleRateHz;
        double bin = psd.BinWidthHz;
        double coarse = carrierHz;
        double reach = Math.Max(Math.Max(upperEdgeHz - coarse, coarse - lowerEdgeHz), 0) * OccupiedReach;
        reach = Math.Max(reach, SpectralReach(psd, coarse, noiseFloorDensity));
        double passEdge = Math.Max(reach + PassEdgeBins * bin, MinPassBins * bin);
        // A post-detection band asked for is kept by the channel too (a carrier's residual FM up to 3 kHz needs a
        // channel of +/-3 kHz, wider than the carrier's own line).
        if (postLowPassHz is { } asked)
            passEdge = Math.Max(passEdge, asked);
        double nyquist = fs / 2;
        double usable = complex ? nyquist : Math.Min(coarse, nyquist - coarse);
        bool filter = FilterRoom * passEdge < UsableShare * usable;
        double transition = filter ? Math.Min(0.5 * passEdge, UsableShare * usable - passEdge) : 0;
        bool crowded = false;
        if (filter && others is { Count: > 0 })
        {
            // The nearest other emission's near edge bounds the stop edge; the pass band keeps the occupied band.
            double room = others.Min(o =>
                o.LowHz > coarse ? o.LowHz - coarse
                : o.HighHz < coarse ? coarse - o.HighHz
                : 0
            );
            double occupied = Math.Max(
                Math.Max(upperEdgeHz - coarse, coarse - lowerEdgeHz) * OccupiedReach + PassEdgeBins * bin,
                MinPassBins * bin
            );
            if (passEdge + transition > room)
            {
                passEdge = Math.Max(occupied, Math.Min(passEdge, room / (1 + MinTransitionShare)));
                transition = Math.Min(
                    Math.Max(room - passEdge, MinTransitionShare * passEdge),
                    Math.Min(0.5 * passEdge, UsableShare * usable - passEdge)
                );
                crowded = passEdge + transition > room;
            }
        }
        double half = passEdge + transition / 2;
        int decimation = filter ? Math.Max(1, (int)Math.Floor(fs / (RateOverStopEdge * (half + transition / 2)))) : 1;
        double fsd = fs / decimation;
        // An even decimation of 4 or more starts with a half-band stage (flat to the low-pass's stop
        // edge, 80 dB down where the halved rate folds onto it): the same band kept, the long
        // low-pass then runs at half the rate.
        double stopEdge = passEdge + transition;
        bool twoStage = filter && decimation % 2 == 0 && decimation >= 4 && stopEdge < fs / 4;
        double[]? halfBand = twoStage ? FirDesign.HalfBand(stopEdge, fs, StopbandDb) : null;
        double[] taps = filter
            ? FirDesign.LowPass(half, twoStage ? fs / 2 : fs, transition, StopbandDb, MaxTaps)
            : [1.0];
        if (!filter)
            half = usable;
        CultureInfo c = CultureInfo.InvariantCulture;
        string description =
            !filter ? string.Create(c, $"shift {-coarse:0.###} Hz, no channel filter (the signal fills the band)")
            : twoStage
                ? string.Create(
                    c,
                    $"shift {-coarse:0.###} Hz, half-band to {fs / 2:0.###} Hz ({halfBand!.Length} taps,"
                )
                    + string.Create(c, $" 80 dB from {fs / 2 - stopEdge:0.#} Hz), Kaiser-windowed sinc low-pass")
                    + string.Create(c, $" {half:0.#} Hz ({taps.Length} taps, 80 dB), decimation {decimation}")
                    + string.Create(c, $" to {fsd:0.###} Hz")
            : string.Create(c, $"shift {-coarse:0.###} Hz, Kaiser-windowed sinc low-pass {half:0.#} Hz")
                + string.Create(c, $" ({taps.Length} taps, 80 dB), decimation {decimation} to {fsd:0.###} Hz");
        // Default post-detection bandwidth: the channel's, so that every modulating frequency the
        // occupied bandwidth allows passes (a fixed 15 kHz would halve a 15 kHz broadcast tone).
        double postLp = postLowPassHz ?? PostLowPassShare * Math.Min(half, fsd / 2);
        postLp = Math.Min(postLp, MaxPostLowPassShare * fsd);
        return new ChannelPlan
        {
            SampleRateHz = fs,
            CarrierHz = coarse,
            HalfWidthHz = half,
            Decimation = decimation,
            Taps = taps,
            HalfBand = halfBand,
            Filtered = filter,
            PostLowPassHz = postLp,
            Description = description,
            MirrorKept = !complex && !filter,
            Crowded = crowded,
        };
    }

    /// <summary>
    /// How far from <paramref name="centreHz"/> the spectrum stays above both 60 dB below its peak and
    /// 10 dB above the noise floor (the farthest such bin, on either side).
    /// </summary>
    private static double SpectralReach(PowerSpectrum psd, double centreHz, double floor)
    {
        ReadOnlySpan<double> v = psd.Values;
        double threshold = Math.Max(v[psd.PeakIndex()] * ReachBelowPeak, floor * ReachAboveFloor);
        double reach = 0;
        for (int i = 0; i < v.Length; i++)
            if (v[i] > threshold)
                reach = Math.Max(reach, Math.Abs(psd.FrequenciesHz[i] - centreHz));
        return reach;
    }

    /// <summary>The demodulation pass over samples [<paramref name="first"/>, first + count) of
    /// <paramref name="source"/> through this channel.</summary>
    internal PassPlan ForPass(
        Capture.CaptureSource source,
        long first,
        long count,
        double? postHighPassHz,
        double? deEmphasisUs,
        int threads
    ) =>
        new(
            source,
            first,
            count,
            Taps,
            Decimation,
            -CarrierHz,
            SampleRateHz,
            DecimatedRateHz,
            HalfWidthHz,
            PostLowPassHz,
            postHighPassHz,
            deEmphasisUs,
            source.Info.IsComplex,
            threads,
            HalfBand
        );
}
