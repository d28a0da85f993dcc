using System.CommandLine;
using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Synthesis;

namespace SignalInspect.Cli;

/// <summary><c>signalinspect synth</c>: writes a capture of known parameters.</summary>
internal static class SynthCommand
{
    public static Command Create(TextWriter stdout, TextWriter stderr)
    {
        var output = new Argument<string>("output")
        {
            Description =
                "File to write. The ending picks the container: .wav (RF64 above 4 GiB), .sigmf (archive), "
                + ".sigmf-meta/.sigmf-data (pair), anything else raw.",
        };
        var kind = new Option<string>("--kind")
        {
            Description =
                "Signal: cw (unmodulated carrier), am, fm, pm, fsk (binary, continuous phase), ook (carrier keyed "
                + "on and off by random bits at --symbol-rate), pulse (a pulse train: --pulse-width, --pulse-period), "
                + "qam (16-QAM at --symbol-rate: envelope and phase both keyed) or noise.",
            DefaultValueFactory = _ => "cw",
            HelpName = "cw|am|fm|pm|fsk|ook|pulse|qam|noise",
        };
        kind.AcceptOnlyFromAmong("cw", "am", "fm", "pm", "fsk", "ook", "pulse", "qam", "noise");
        var rate = Units.SiOption("--sample-rate", "Sample rate in Hz.", 48_000, "HZ");
        var duration = Units.SiOption("--duration", "Duration in seconds.", 1.0, "S");
        var centre = Units.SiOption(
            "--center-frequency",
            "Centre frequency written to the metadata (SigMF core:frequency), in Hz."
        );
        var offset = Units.SiOption(
            "--offset",
            "Carrier offset from the centre in Hz (complex); the carrier frequency itself for --real.",
            0,
            "HZ"
        );
        var amplitude = new Option<double>("--amplitude")
        {
            Description = "Carrier amplitude in full-scale units (1.0 = full scale).",
            DefaultValueFactory = _ => 0.5,
        };
        var tone = Units.SiOption("--tone", "Modulating tone frequency in Hz (am, fm, pm).", 1000, "HZ");
        var depth = new Option<double>("--depth")
        {
            Description = "AM depth in percent (0 to 400; above 100 the envelope is cut off at zero: overmodulation).",
            DefaultValueFactory = _ => 50,
            HelpName = "PERCENT",
        };
        var deviation = Units.SiOption("--deviation", "FM peak deviation in Hz.", 2500, "HZ");
        var phase = new Option<double>("--phase-deviation")
        {
            Description = "PM peak phase deviation in radians.",
            DefaultValueFactory = _ => 1.0,
            HelpName = "RAD",
        };
        var shift = Units.SiOption("--shift", "FSK shift (distance between the two tones) in Hz.", 1000, "HZ");
        var symbolRate = Units.SiOption("--symbol-rate", "FSK symbol rate in baud.", 1200, "BD");
        var pulseWidth = Units.SiOption("--pulse-width", "Pulse width in seconds (pulse).", 0.001, "S");
        var pulsePeriod = Units.SiOption("--pulse-period", "Pulse period in seconds (pulse).", 0.004, "S");
        var pulseAm = new Option<double>("--pulse-am")
        {
            Description = "Pulse amplitude modulation depth in percent by --tone (pulse): A (1 + m cos(2 pi fm t_k)).",
            HelpName = "PERCENT",
        };
        var pulsePpm = Units.SiOption(
            "--pulse-ppm",
            "Pulse position modulation, the peak shift in seconds by --tone (pulse): t_k + D sin(2 pi fm t_k).",
            0,
            "S"
        );
        var drift = Units.SiOption("--drift", "Linear carrier drift in Hz per second.", 0, "HZ_PER_S");
        var addTone = new Option<string[]>("--add-tone")
        {
            Description =
                "One more modulating tone, HZ:AMOUNT (repeatable): the amount is a depth in percent (am), a peak "
                + "deviation in Hz (fm) or a peak phase in rad (pm); e.g. --add-tone 118.8:600 for a sub-audible tone.",
            HelpName = "HZ:AMOUNT",
            AllowMultipleArgumentsPerToken = false,
        };
        var spur = new Option<string[]>("--spur")
        {
            Description =
                "An unmodulated carrier beside the signal, OFFSET:DBC (repeatable): its offset from the signal's "
                + "carrier in Hz and its level in dB relative to it; e.g. --spur 21.5k:-12.",
            HelpName = "OFFSET:DBC",
        };
        var burst = new Option<string[]>("--burst")
        {
            Description =
                "One transmission, START:END[:OFFSET[:AMOUNT[:TONE]]] in seconds (repeatable): the carrier is keyed on "
                + "only inside the bursts (the noise stays between them), each with its own carrier offset in Hz, "
                + "amount (FM deviation in Hz, AM depth in percent, PM phase in rad) and tone in Hz when given (empty "
                + "fields keep the signal's: 0:1:::300 is a 300 Hz step); e.g. --burst 0.5:2.5 --burst 3.5:5:150:3000.",
            HelpName = "START:END[:OFFSET[:AMOUNT[:TONE]]]",
            AllowMultipleArgumentsPerToken = false,
        };
        var also = new Option<string[]>("--also")
        {
            Description =
                "Another emission in the same capture, KIND:OFFSET:DBC[:NAME=VALUE...] (repeatable): its kind (as "
                + "--kind), carrier offset in Hz, level in dB relative to the main carrier, then any of tone=HZ, "
                + "dev=HZ, depth=PERCENT, phase=RAD, shift=HZ, rate=BD and on=START-END[+START-END...] (keyed only "
                + "then, s). The noise (--snr) stays the main signal's; e.g. --also fsk:120k:-6:shift=2k:on=1-3.",
            HelpName = "KIND:OFFSET:DBC[:NAME=VALUE...]",
            AllowMultipleArgumentsPerToken = false,
        };
        var discriminator = Units.SiOption(
            "--discriminator",
            "Write an FM signal's discriminator audio instead of the signal: real audio, the deviation over HZ per "
                + "full scale (with --kind fm and --real; the noise only while keyed: a squelch between bursts).",
            "HZ"
        );
        var residualFm = Units.SiOption(
            "--residual-fm",
            "Residual FM: Gaussian frequency noise of HZ rms within 300-3000 Hz on the carrier (a transmitter's hum "
                + "and noise; complex output).",
            "HZ"
        );
        var codeSquelch = new Option<string?>("--code-squelch")
        {
            Description =
                "A digital code squelch word under the FM, CODE:DEV[:TURNOFF]: three octal digits with N (normal, the "
                + "default) or I (inverted), repeated at 134.4 bit/s from each key-up, each bit +/-DEV Hz "
                + "(2 ms raised-cosine edges); TURNOFF seconds of a 134.4 Hz turn-off tone replace it before each "
                + "key-down; e.g. "
                + "--code-squelch 023N:600.",
            HelpName = "CODE:DEV[:TURNOFF]",
        };
        var reverseBurst = new Option<string?>("--reverse-burst")
        {
            Description =
                "A reverse burst at each key-down, DEGREES:SECONDS: the added tones (--add-tone) shift their phase by "
                + "DEGREES for the last SECONDS of each burst (of the capture without bursts); e.g. --reverse-burst "
                + "180:0.18.",
            HelpName = "DEGREES:SECONDS",
        };
        var keyUp = new Option<string?>("--key-up")
        {
            Description =
                "A key-up transient, EXCURSION:TAU: at each burst's start (at 0 without bursts) the carrier starts "
                + "EXCURSION Hz away and settles exponentially with time constant TAU in seconds; e.g. --key-up "
                + "14k:0.003.",
            HelpName = "EXCURSION:TAU",
        };
        var noiseBand = Units.SiOption(
            "--noise-band",
            "A band-limited receiver: noise only within +/-HZ of the centre (its filter), at the density the SNR gives "
                + "inside; default noise over the whole band."
        );
        var image = new Option<double?>("--image")
        {
            Description = "An IQ image (the receiver's I/Q imbalance) this many dB below the signal, e.g. -28.",
            HelpName = "DBC",
        };
        var snr = new Option<double?>("--snr")
        {
            Description =
                "Signal-to-noise ratio in dB over the whole sampled bandwidth (signal mean power / noise mean power); "
                + "omit for no noise.",
            HelpName = "DB",
        };
        var seed = new Option<int>("--seed")
        {
            Description = "Seed of the noise and FSK data.",
            DefaultValueFactory = _ => 1,
        };
        var noDither = new Option<bool>("--no-dither")
        {
            Description =
                "Round an integer datatype's codes exactly. By default triangular noise of +/- 1 code is added "
                + "before rounding, as a converter's own noise does: without it a noiseless signal's rounding error "
                + "is a comb of spurs that reads as modulation.",
        };
        var real = new Option<bool>("--real")
        {
            Description = "Write a real signal (audio, a carrier at --offset Hz) instead of complex I/Q.",
        };
        var datatype = new Option<string?>("--datatype")
        {
            Description =
                "Sample datatype in SigMF words (default cf32_le, or rf32_le with --real); for WAV: ci16_le, ci24_le, "
                + "ci32_le, cf32_le, cf64_le, cu8 (and r... forms). A raw file's ending (.cu8, .cs16, .cf32) also "
                + "sets it.",
            HelpName = "WORD",
        };
        var time = new Option<string?>("--start-time")
        {
            Description = "Time of the first sample written to SigMF metadata (RFC 3339, e.g. 2026-05-04T10:00:00Z).",
            HelpName = "TIME",
        };
        var rf64 = new Option<bool>("--rf64")
        {
            Description = "Write RF64 even when the data is below 4 GiB (WAV only).",
        };
        var force = new Option<bool>("--force") { Description = "Replace an existing output file." };
        var cmd = new Command(
            "synth",
            "Write a capture of known parameters: carrier, AM, FM, PM or 2-FSK, with carrier offset, drift, white "
                + "noise at a given SNR and a seed. The signal formulas are in the README."
        )
        {
            output,
            kind,
            rate,
            duration,
            centre,
            offset,
            amplitude,
            tone,
            depth,
            deviation,
            phase,
            shift,
            symbolRate,
            pulseWidth,
            pulsePeriod,
            pulseAm,
            pulsePpm,
            drift,
            addTone,
            spur,
            burst,
            also,
            discriminator,
            residualFm,
            codeSquelch,
            reverseBurst,
            keyUp,
            image,
            noiseBand,
            snr,
            seed,
            real,
            datatype,
            noDither,
            time,
            rf64,
            force,
        };
        cmd.SetAction(r =>
        {
            string path = r.GetValue(output)!;
            bool isReal = r.GetValue(real);
            var spec = new SignalSpec
            {
                Kind = Enum.Parse<SignalKind>(r.GetValue(kind)!, ignoreCase: true),
                SampleRateHz = r.GetValue(rate),
                DurationS = r.GetValue(duration),
                IsComplex = !isReal,
                CenterFrequencyHz = r.GetValue(centre),
                CarrierOffsetHz = r.GetValue(offset),
                Amplitude = r.GetValue(amplitude),
                ModulatingFrequencyHz = r.GetValue(tone),
                AmDepth = r.GetValue(depth) / 100.0,
                PeakDeviationHz = r.GetValue(deviation),
                PeakPhaseRad = r.GetValue(phase),
                FskShiftHz = r.GetValue(shift),
                SymbolRateBd = r.GetValue(symbolRate),
                PulseWidthS = r.GetValue(pulseWidth),
                PulsePeriodS = r.GetValue(pulsePeriod),
                PulseAmDepth = r.GetValue(pulseAm) / 100,
                PulsePositionS = r.GetValue(pulsePpm),
                DriftHzPerS = r.GetValue(drift),
                SnrDb = r.GetValue(snr),
                Seed = r.GetValue(seed),
                ExtraTones =
                [
                    .. (r.GetValue(addTone) ?? []).Select(t =>
                    {
                        var (hz, amount) = Pair("--add-tone", t);
                        return new ExtraTone(hz, r.GetValue(kind) == "am" ? amount / 100 : amount);
                    }),
                ],
                Spurs = [.. (r.GetValue(spur) ?? []).Select(t => Pair("--spur", t)).Select(p => new Spur(p.A, p.B))],
                ImageDbc = r.GetValue(image),
                NoiseBandHz = r.GetValue(noiseBand),
                DiscriminatorHzPerFullScale = r.GetValue(discriminator),
                ResidualFmHz = r.GetValue(residualFm),
                CodeSquelch = r.GetValue(codeSquelch) is { } cq ? ParseCodeSquelch(cq) : null,
                ReverseBurst = r.GetValue(reverseBurst) is { } rb
                    ? Pair("--reverse-burst", rb) is var (deg, secs)
                        ? new ReverseBurstSpec(deg, secs)
                        : null
                    : null,
                Bursts = [.. (r.GetValue(burst) ?? []).Select(t => ParseBurst(t, r.GetValue(kind) == "am"))],
                KeyUp = r.GetValue(keyUp) is { } ku
                    ? Pair("--key-up", ku) is var (e, tau)
                        ? new KeyUpTransient(e, tau)
                        : null
                    : null,
            };
            spec = spec with
            {
                Others = [.. (r.GetValue(also) ?? []).Select((t, i) => ParseOther(t, spec, spec.Seed + 1 + i))],
            };
            SampleFormat format = ChooseFormat(path, r.GetValue(datatype), isReal);
            DateTimeOffset? start = null;
            if (r.GetValue(time) is { } ts)
            {
                if (
                    !DateTimeOffset.TryParse(
                        ts,
                        CultureInfo.InvariantCulture,
                        DateTimeStyles.AssumeUniversal | DateTimeStyles.AdjustToUniversal,
                        out DateTimeOffset t
                    )
                )
                    throw new UsageException(
                        $"--start-time: '{ts}' is not an RFC 3339 time such as 2026-05-04T10:00:00Z"
                    );
                start = t;
            }
            SynthesisResult result = Synthesizer.Write(
                spec,
                path,
                format,
                start,
                r.GetValue(force),
                r.GetValue(rf64),
                dither: !r.GetValue(noDither)
            );
            foreach (string p in result.Paths)
                stdout.WriteLine($"wrote {p}");
            string described = Synthesizer.Describe(spec, format, !r.GetValue(noDither));
            stdout.WriteLine($"{result.Samples} samples, {format.Name}, {described}");
            if (result.ClippedValues > 0)
                stderr.WriteLine(
                    $"signalinspect: warning: {result.ClippedValues} sample value(s) clipped at full scale (lower "
                        + "--amplitude or raise --snr)"
                );
            return ExitCodes.Success;
        });
        return cmd;
    }

    private static SampleFormat ChooseFormat(string path, string? datatype, bool isReal)
    {
        if (datatype is not null)
        {
            string word = datatype.Trim();
            // WAV may hold 24-bit integers, which SigMF has no word for.
            if (word is "ci24_le" or "ri24_le")
                return new SampleFormat(word[0] == 'c', ComponentEncoding.Int24, false, 0);
            if (!SampleFormat.TryParse(word, out SampleFormat f, out string error))
                throw new UsageException("--datatype: " + error);
            return f;
        }
        if (
            CaptureFormats.ContainerForWriting(path) == CaptureContainer.Raw
            && CaptureFormats.DatatypeOfEnding(path) is { } byName
        )
            return SampleFormat.Parse(byName);
        return SampleFormat.Parse(isReal ? "rf32_le" : "cf32_le");
    }

    /// <summary>Parses "A:B", each a number with an optional SI suffix.</summary>
    private static Burst ParseBurst(string text, bool am)
    {
        string[] p = text.Split(':');
        var v = new double[p.Length];
        if (
            p.Length is >= 2 and <= 5
            && p.Select((x, i) => x.Length == 0 || Units.TryParseSi(x, out v[i])).All(ok => ok)
        )
            return new Burst(
                v[0],
                v[1],
                p.Length > 2 && p[2].Length > 0 ? v[2] : null,
                p.Length > 3 && p[3].Length > 0 ? (am ? v[3] / 100 : v[3]) : null,
                p.Length > 4 && p[4].Length > 0 ? v[4] : null
            );
        throw new UsageException(
            $"--burst: '{text}' is not START:END[:OFFSET[:AMOUNT[:TONE]]] (e.g. 0.5:2.5 or 3:5:150:3000 or 0:1:::300)"
        );
    }

    /// <summary>Parses one --also emission: KIND:OFFSET:DBC[:NAME=VALUE...], on the main spec's rate and
    /// duration.</summary>
    private static SignalSpec ParseOther(string text, SignalSpec main, int seed)
    {
        string[] p = text.Split(':');
        string usage = $"--also: '{text}' is not KIND:OFFSET:DBC[:NAME=VALUE...] (e.g. fsk:120k:-6:shift=2k:on=1-3)";
        if (
            p.Length < 3
            || !Enum.TryParse(p[0], ignoreCase: true, out SignalKind kind)
            || !Units.TryParseSi(p[1], out double offset)
            || !Units.TryParseSi(p[2], out double dbc)
        )
            throw new UsageException(usage);
        var o = main with
        {
            Kind = kind,
            CarrierOffsetHz = offset,
            Amplitude = main.Amplitude * Math.Pow(10, dbc / 20),
            ExtraTones = [],
            Spurs = [],
            ImageDbc = null,
            Bursts = [],
            KeyUp = null,
            DriftHzPerS = 0,
            Seed = seed,
            Others = [],
        };
        foreach (string nv in p.Skip(3))
        {
            string[] kv = nv.Split('=', 2);
            if (kv.Length != 2)
                throw new UsageException(usage);
            if (kv[0] == "on")
            {
                o = o with { Bursts = [.. kv[1].Split('+').Select(b => ParseBurst(b.Replace('-', ':'), false))] };
                continue;
            }
            if (!Units.TryParseSi(kv[1], out double v))
                throw new UsageException(usage);
            o = kv[0] switch
            {
                "tone" => o with { ModulatingFrequencyHz = v },
                "dev" => o with { PeakDeviationHz = v },
                "depth" => o with { AmDepth = v / 100 },
                "phase" => o with { PeakPhaseRad = v },
                "shift" => o with { FskShiftHz = v },
                "rate" => o with { SymbolRateBd = v },
                _ => throw new UsageException(
                    $"--also: '{kv[0]}' is not one of tone, dev, depth, phase, shift, rate, on"
                ),
            };
        }
        return o;
    }

    private static CodeSquelchSpec ParseCodeSquelch(string text)
    {
        string[] p = text.Split(':');
        double turnOff = 0;
        if (
            p.Length is 2 or 3
            && DcsCode.Parse(p[0]) is var (code, inverted)
            && Units.TryParseSi(p[1], out double dev)
            && (p.Length == 2 || Units.TryParseSi(p[2], out turnOff))
        )
            return new CodeSquelchSpec(code, inverted, dev, turnOff);
        throw new UsageException(
            $"--code-squelch: '{text}' is not CODE:DEV[:TURNOFF] with three octal digits and N or I (e.g. 023N:600)"
        );
    }

    private static (double A, double B) Pair(string option, string text)
    {
        string[] p = text.Split(':');
        if (p.Length == 2 && Units.TryParseSi(p[0], out double a) && Units.TryParseSi(p[1], out double b))
            return (a, b);
        throw new UsageException($"{option}: '{text}' is not two numbers as A:B (e.g. 118.8:600)");
    }
}
