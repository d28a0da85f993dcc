using System.Globalization;
using SignalInspect.Capture;

namespace SignalInspect.Synthesis;

/// <summary>What <see cref="Synthesizer.Write"/> produced.</summary>
/// <param name="Paths">Files written.</param>
/// <param name="Samples">Samples written.</param>
/// <param name="ClippedValues">Components clamped to the integer code range.</param>
public sealed record SynthesisResult(IReadOnlyList<string> Paths, long Samples, long ClippedValues);

/// <summary>Writes a synthesised capture of known parameters, streaming in blocks.</summary>
public static class Synthesizer
{
    private const int BlockSamples = 1 << 16;

    /// <summary>A one-line description of the spec, written into SigMF metadata.</summary>
    public static string Describe(SignalSpec s)
    {
        CultureInfo c = CultureInfo.InvariantCulture;
        string mod = s.Kind switch
        {
            SignalKind.Am => string.Format(c, "AM depth {0:0.####} by {1:R} Hz", s.AmDepth, s.ModulatingFrequencyHz),
            SignalKind.Fm => string.Format(
                c,
                "FM peak deviation {0:R} Hz by {1:R} Hz",
                s.PeakDeviationHz,
                s.ModulatingFrequencyHz
            ),
            SignalKind.Pm => string.Format(
                c,
                "PM peak phase {0:R} rad by {1:R} Hz",
                s.PeakPhaseRad,
                s.ModulatingFrequencyHz
            ),
            SignalKind.Fsk => string.Format(c, "2-FSK shift {0:R} Hz at {1:R} Bd", s.FskShiftHz, s.SymbolRateBd),
            SignalKind.Ook => string.Format(c, "on-off keying at {0:R} Bd", s.SymbolRateBd),
            SignalKind.Qam => string.Format(c, "16-QAM at {0:R} Bd, rectangular pulses", s.SymbolRateBd),
            SignalKind.Pulse => string.Format(
                c,
                "pulses of {0:R} s every {1:R} s, amplitude modulated {2:R} %, position modulated {3:R} s by {4:R} Hz",
                s.PulseWidthS,
                s.PulsePeriodS,
                100 * s.PulseAmDepth,
                s.PulsePositionS,
                s.ModulatingFrequencyHz
            ),
            SignalKind.Noise => "noise only",
            _ => "unmodulated carrier",
        };
        foreach (ExtraTone t in s.ExtraTones)
            mod += string.Format(c, " plus {0:R} by {1:R} Hz", t.Amount, t.FrequencyHz);
        foreach (Spur sp in s.Spurs)
            mod += string.Format(c, ", a carrier at {0:R} Hz from it, {1:R} dBc", sp.OffsetHz, sp.LevelDbc);
        foreach (Burst b in s.Bursts)
            mod += string.Format(
                c,
                ", keyed {0:R}-{1:R} s{2}{3}",
                b.StartS,
                b.EndS,
                b.OffsetHz is { } bo ? string.Format(c, " at {0:R} Hz", bo) : "",
                (b.Amount is { } ba ? string.Format(c, " amount {0:R}", ba) : "")
                    + (b.ToneHz is { } bt ? string.Format(c, " tone {0:R} Hz", bt) : "")
            );
        if (s.ImageDbc is { } image)
            mod += string.Format(c, ", an IQ image at {0:R} dBc", image);
        if (s.NoiseBandHz is { } nb)
            mod += string.Format(c, ", noise within +/-{0:R} Hz only (a band-limited receiver)", nb);
        if (s.ResidualFmHz is { } rfm)
            mod += string.Format(c, ", residual FM {0:R} Hz rms in 300-3000 Hz", rfm);
        if (s.DiscriminatorHzPerFullScale is { } dk)
            mod += string.Format(c, ", written as discriminator audio at {0:R} Hz per full scale", dk);
        foreach (SignalSpec o in s.Others)
            mod += "; beside it " + Describe(o).Replace("synthesised: ", "").Replace(", no noise", "");
        string snr = s.SnrDb is { } db ? string.Format(c, ", SNR {0:R} dB", db) : ", no noise";
        string drift = s.DriftHzPerS != 0 ? string.Format(c, ", drift {0:R} Hz/s", s.DriftHzPerS) : string.Empty;
        return string.Format(
            c,
            "synthesised: {0}, carrier offset {1:R} Hz, amplitude {2:R}{3}{4}, seed {5}",
            mod,
            s.CarrierOffsetHz,
            s.Amplitude,
            snr,
            drift,
            s.Seed
        );
    }

    /// <summary>The description of <paramref name="s"/> written as <paramref name="format"/>, its dither
    /// named.</summary>
    public static string Describe(SignalSpec s, SampleFormat format, bool dither) =>
        Describe(s) + (dither && !format.IsFloat ? ", TPDF dither of +/- 1 code" : "");

    /// <summary>
    /// Generates <paramref name="spec"/> and writes it. With <paramref name="dither"/>, an integer datatype's
    /// codes are rounded after adding triangular (TPDF) noise of +/- 1 code: a converter's own noise does this in
    /// a real receiver, and without it the rounding error of a noiseless periodic signal is itself periodic, a
    /// comb of spurs across the band (an 8-bit FM tone shows some hundred lines 50 dB down) that a measurement
    /// reads as modulation. TPDF makes the error's mean and variance independent of the signal (common practice
    /// in audio requantisation; the noise adds q^2 / 6 to the rounding's q^2 / 12).
    /// </summary>
    /// <exception cref="SettingException">The spec is invalid (named by its property).</exception>
    /// <exception cref="CaptureException">The output cannot be written as asked.</exception>
    public static SynthesisResult Write(
        SignalSpec spec,
        string path,
        SampleFormat format,
        DateTimeOffset? startTime = null,
        bool overwrite = false,
        bool forceRf64 = false,
        CaptureContainer? container = null,
        bool dither = false
    )
    {
        if (format.IsComplex != spec.IsComplex)
            throw new CaptureException(
                $"datatype {format.Name} is {(format.IsComplex ? "complex" : "real")} "
                    + $"but the signal is {(spec.IsComplex ? "complex" : "real")}"
            );
        var gen = new SignalGenerator(spec);
        var meta = new CaptureMetadata
        {
            SampleRateHz = spec.SampleRateHz,
            CenterFrequencyHz = spec.CenterFrequencyHz,
            StartTime = startTime,
            Description = Describe(spec, format, dither),
        };
        using var writer = new CaptureWriter(
            path,
            container ?? CaptureFormats.ContainerForWriting(path),
            format,
            meta,
            spec.SampleCount,
            overwrite,
            forceRf64
        );
        var block = new double[BlockSamples * gen.ValuesPerSample];
        int n;
        // Its own stream (not the signal's noise), so that the signal is the same with and without it.
        Random? tpdf = dither && !format.IsFloat ? new Random(unchecked(spec.Seed * 31 + 7)) : null;
        double code = 1 / format.CodeFullScale;
        while ((n = gen.Generate(block)) > 0)
        {
            if (tpdf is not null)
                for (int i = 0; i < n * gen.ValuesPerSample; i++)
                    block[i] += (tpdf.NextDouble() - tpdf.NextDouble()) * code;
            writer.Write(block.AsSpan(0, n * gen.ValuesPerSample));
        }
        writer.Complete();
        return new SynthesisResult(writer.OutputPaths, spec.SampleCount, writer.ClippedValues);
    }
}
