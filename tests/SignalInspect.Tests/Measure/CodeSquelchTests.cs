using SignalInspect.Dsp;
using SignalInspect.Measure;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>
/// Digital code squelch (issue 26 item 2). The encoder is checked against published parity equations and the
/// standard code list (testdata/REFERENCE-VALUES.md, "Digital code squelch"); the decoder against synthesised
/// captures of every standard code at 20 dB SNR (the issue's acceptance).
/// </summary>
public class CodeSquelchTests
{
    /// <summary>The eleven parity bits of every one of the 512 codes against L. Richardson's parity equations ("DCS
    /// Explained", 1995; C1 the code's least significant bit, P1 the first parity bit sent), and the fixed bits 0, 0, 1
    /// after the nine code bits (n8lhg.com "PPPPPPPPPPP100DDDDDDDDD").</summary>
    [Fact]
    public void Every_word_has_the_published_parity()
    {
        for (int code = 0; code < 512; code++)
        {
            int w = DcsCode.Word(code);
            int C(int i) => code >> (i - 1) & 1;
            int Sum(params int[] i) => i.Sum(C) % 2;
            int Not(params int[] i) => 1 - Sum(i);
            int[] expected =
            [
                Sum(1, 2, 3, 4, 5, 8),
                Not(2, 3, 4, 5, 6, 9),
                Sum(1, 2, 6, 7, 8),
                Not(2, 3, 7, 8, 9),
                Not(1, 2, 5, 9),
                Not(1, 4, 5, 6, 8),
                Sum(1, 3, 4, 6, 7, 8, 9),
                Sum(2, 4, 5, 7, 8, 9),
                Sum(3, 5, 6, 8, 9),
                Not(4, 6, 7, 9),
                Not(1, 2, 3, 4, 7),
            ];
            Assert.Equal(code, w & 0x1FF);
            Assert.Equal(0b100, w >> 9 & 0b111);
            for (int p = 0; p < 11; p++)
                Assert.True(expected[p] == (w >> (12 + p) & 1), $"code {code:x}: parity bit P{p + 1}");
        }
    }

    /// <summary>The 83 standard codes (TIA-603-E list): no two are rotations of one another in the same polarity
    /// (the list exists "to prevent falsing due to alignment collisions"); and, from memory, 023 normal is the same
    /// signal as 340 and 766 normal and 047 inverted [mem].</summary>
    [Fact]
    public void Standard_codes_do_not_collide_and_aliases_are_rotations()
    {
        Assert.Equal(83, DcsCode.StandardCodes.Count);
        var classes = DcsCode.StandardCodes.Select(c => DcsCode.Class(DcsCode.Word(c))).ToList();
        Assert.Equal(83, classes.Distinct().Count());
        var same = DcsCode.SameSignal(DcsCode.Word(0x13)).Select(x => DcsCode.Name(x.Code, x.Inverted)).ToList();
        Assert.Equal("023N", same[0]);
        Assert.Contains("340N", same);
        Assert.Contains("766N", same);
        Assert.Contains("047I", same);
    }

    /// <summary>Block means of an NRZ word (the decoder's input, 1 ms blocks) with white noise: read back at any
    /// alignment and either polarity.</summary>
    [Theory]
    [InlineData(0x13, false, 0.37)]
    [InlineData(0x1EC, true, 0.0)]
    [InlineData(0xA5, false, 0.9)]
    public void Block_means_of_a_word_decode(int code, bool inverted, double startBits)
    {
        double blockS = 0.001;
        int word = DcsCode.Word(code, inverted);
        var rnd = new Random(3);
        double[] f = new double[3000];
        for (int b = 0; b < f.Length; b++)
        {
            // Each block's mean over 16 sub-samples of the NRZ level, +/- 600 Hz, plus noise.
            double sum = 0;
            for (int j = 0; j < 16; j++)
            {
                double t = (b + (j + 0.5) / 16) * blockS;
                long k = (long)Math.Floor(t * DcsCode.BitRateHz + startBits);
                sum += (word >> (int)(k % 23) & 1) != 0 ? 600 : -600;
            }
            f[b] = 25 + sum / 16 + 150 * (rnd.NextDouble() - 0.5);
        }
        var blocks = new SignalInspect.Demodulation.BlockStats(
            16,
            new double[f.Length],
            f,
            f,
            f,
            f,
            f,
            new int[f.Length]
        );
        DigitalCode? d = DcsDecoder.Decode(blocks, blockS, 0, []);
        Assert.NotNull(d);
        Assert.Contains(DcsCode.Name(code, inverted), d.SameSignal.Prepend(d.Name));
    }
}

/// <summary>Every standard code word from a synthesised capture (issue 26 acceptance).</summary>
public class CodeSquelchCaptureTests
{
    /// <summary>Each of the 83 standard codes (every third one inverted) under FM by a 1 kHz test tone at 1.5 kHz
    /// deviation, the word at 500 Hz, 20 dB SNR in the occupied band: the code read is the one sent, or for an
    /// inverted word one the same signal on the air (a rotation of it).</summary>
    [Fact]
    public void Every_standard_code_is_read_at_20_dB()
    {
        using var tmp = new TempDir();
        var failures = new List<string>();
        for (int i = 0; i < DcsCode.StandardCodes.Count; i++)
        {
            int code = DcsCode.StandardCodes[i];
            bool inverted = i % 3 == 2;
            var spec = new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 24_000,
                DurationS = 1.2,
                PeakDeviationHz = 1500,
                // 20 dB in the occupied band (about 5 kHz of the 24 kHz sampled): synth's SNR is over the whole band.
                SnrDb = 20 - 10 * Math.Log10(24_000 / 5_000.0),
                Seed = 100 + i,
                CodeSquelch = new CodeSquelchSpec(code, inverted, 500),
            };
            AnalysisResult r = Measuring.Analyze(tmp, spec);
            if (r.ChannelSnrDb > 21.5)
                failures.Add($"SNR in the band {r.ChannelSnrDb:0.#} dB, not 20");
            DigitalCode? d = r.Audio?.Code;
            string sent = DcsCode.Name(code, inverted);
            if (d is null || !(inverted ? d.SameSignal.Prepend(d.Name).Contains(sent) : d.Name == sent))
                failures.Add($"{sent} read as {d?.Name ?? "nothing"}");
            else if (r.Audio!.SubAudible is not null)
                failures.Add($"{sent}: also a sub-audible tone");
        }
        Assert.True(failures.Count == 0, string.Join("; ", failures));
    }

    /// <summary>No word is read from what holds none: a sub-audible tone (the lowest, one near half the bit rate, one
    /// at the bit rate and the highest of the EIA list) under a 1 kHz test tone, two voice-band tones, an
    /// unmodulated carrier; the tone is still found.</summary>
    [Theory]
    [InlineData(67.0)]
    [InlineData(69.3)]
    [InlineData(136.5)]
    [InlineData(250.3)]
    [InlineData(0.0)]
    public void No_word_is_read_where_none_was_sent(double subAudibleHz)
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = subAudibleHz > 0 ? SignalKind.Fm : SignalKind.Cw,
            SampleRateHz = 24_000,
            DurationS = 3,
            PeakDeviationHz = 1500,
            SnrDb = 20,
            ExtraTones = subAudibleHz > 0 ? [new ExtraTone(subAudibleHz, 500), new ExtraTone(1730, 900)] : [],
        };
        AnalysisResult r = Measuring.Analyze(tmp, spec);
        Assert.Null(r.Audio?.Code);
        if (subAudibleHz > 0)
            Near.Equal(subAudibleHz, r.Audio!.SubAudible!.FrequencyHz.Value, 0.1, "sub-audible tone");
    }

    /// <summary>Two calls sending 155N, each ending with the turn-off code (a 134.4 Hz tone,
    /// testdata/REFERENCE-VALUES.md) for its last 200 ms, or without: the code is read and the turn-off code found in
    /// each call, its length to the window's end (10 ms before key-down) within 20 ms; none without.</summary>
    [Theory]
    [InlineData(0.2)]
    [InlineData(0.0)]
    public void The_turn_off_code_is_found_at_key_down(double turnOffS)
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 24_000,
            DurationS = 4,
            PeakDeviationHz = 1500,
            SnrDb = 25,
            Bursts = [new Burst(0.3, 1.8), new Burst(2.3, 3.8)],
            CodeSquelch = new CodeSquelchSpec(0x6D, false, 600, turnOffS),
        };
        AnalysisResult r = Measuring.Analyze(tmp, spec);
        Assert.Equal(2, r.Transmissions.Count);
        foreach (Transmission t in r.Transmissions)
        {
            DigitalCode code = t.Result!.Audio!.Code!;
            Assert.Equal("155N", code.Name);
            if (turnOffS == 0)
                Assert.Null(code.TurnOffS);
            else
                Near.Equal(turnOffS - TransmissionFinder.SteadyBeforeKeyDownS, code.TurnOffS!.Value, 0.02, "turn-off");
        }
    }

    /// <summary>Two calls with silence between them, each sending 754I from its key-up: read over both.</summary>
    [Fact]
    public void A_word_is_read_across_calls()
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 24_000,
            DurationS = 4,
            PeakDeviationHz = 2000,
            SnrDb = 25,
            Bursts = [new Burst(0.3, 1.6), new Burst(2.2, 3.7)],
            CodeSquelch = new CodeSquelchSpec(0x1EC, true, 650),
        };
        AnalysisResult r = Measuring.Analyze(tmp, spec);
        Assert.Equal(2, r.Transmissions.Count);
        foreach (Transmission t in r.Transmissions)
            Assert.Contains("754I", t.Result!.Audio!.Code!.SameSignal.Prepend(t.Result.Audio.Code.Name));
    }

    /// <summary>023N has 11 ones and 12 zeros: at 600 Hz the word moves the mean frequency by -600 / 23 = -26.1 Hz
    /// (construction); the carrier offset reads that mean, and a warning says so.</summary>
    [Fact]
    public void An_unbalanced_word_moves_the_mean_frequency_and_is_warned_of()
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 48_000,
            DurationS = 3,
            PeakDeviationHz = 2000,
            SnrDb = 30,
            CodeSquelch = new CodeSquelchSpec(0x13, false, 600),
        };
        AnalysisResult r = Measuring.Analyze(tmp, spec);
        Assert.Equal(-1, r.Audio!.Code!.Balance);
        Near.Equal(-600.0 / 23, r.Carrier!.OffsetHz, 1.5, "carrier offset (the mean frequency)");
        Assert.Contains(r.Warnings, w => w.Contains("11 ones and 12 zeros") && w.Contains("023N"));
        // The peak deviation about that mean: 2000 + 600 + 26.1 Hz (construction). A tone under a word's many lines
        // reads its raw percentile high by about the noise's rms (58 Hz here): the stated U must cover it.
        double truth = 2600 + 600.0 / 23,
            expanded = 2 * r.Fm!.PeakDeviationHz.StandardUncertainty;
        Assert.True(
            Math.Abs(r.Fm.PeakDeviationHz.Value - truth) <= expanded,
            $"peak deviation {r.Fm.PeakDeviationHz.Value:0.#} +/- {expanded:0.#} Hz does not cover {truth:0.#} Hz"
        );
    }
}

/// <summary>The reverse burst at key-down (issue 26 item 2): a 180 degree phase reversal of the sub-audible tone
/// (a radio maker's manual: "a 180-degree phase reversal ... when the push-to-talk switch is released") and the
/// 120 degree variant some radios offer, testdata/REFERENCE-VALUES.md.</summary>
public class ReverseBurstTests
{
    /// <summary>Two calls with 131.8 Hz at 500 Hz under a 1 kHz tone, the burst in the last 180 or 150 ms of each:
    /// shift within 15 degrees, duration (to the window's end, 10 ms before key-down) within the stated resolution
    /// and 10 ms; none without a burst.</summary>
    [Theory]
    [InlineData(180.0, 0.18)]
    [InlineData(120.0, 0.15)]
    [InlineData(0.0, 0.0)]
    public void The_burst_is_found_in_each_call(double degrees, double seconds)
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 24_000,
            DurationS = 4,
            PeakDeviationHz = 1500,
            SnrDb = 25,
            ExtraTones = [new ExtraTone(131.8, 500)],
            Bursts = [new Burst(0.3, 1.8), new Burst(2.3, 3.8)],
            ReverseBurst = degrees > 0 ? new ReverseBurstSpec(degrees, seconds) : null,
        };
        AnalysisResult r = Measuring.Analyze(tmp, spec);
        Assert.Equal(2, r.Transmissions.Count);
        foreach (Transmission t in r.Transmissions)
        {
            ReverseBurstResult? rb = t.Result!.Audio!.ReverseBurst;
            if (degrees == 0)
            {
                Assert.Null(rb);
                continue;
            }
            Assert.NotNull(rb);
            Near.Equal(degrees, rb.ShiftDeg, 15, "phase shift");
            double expected = seconds - TransmissionFinder.SteadyBeforeKeyDownS;
            Near.Equal(expected, rb.DurationS, rb.ResolutionS + 0.01, "burst duration to the window's end");
        }
        // The carrier's phase stays continuous through the shift: the peak deviation is the tones' sum.
        Near.Equal(2000, r.Fm!.PeakDeviationHz.Value, 0.05 * 2000, "peak deviation");
    }

    /// <summary>Discriminator audio (a receiver's FM output, 5 kHz per full scale) holding two calls: the code word
    /// and its turn-off code, or a tone's reverse burst, are read from the audio as from an I/Q capture.</summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void Discriminator_audio_gives_the_word_or_the_burst(bool word)
    {
        using var tmp = new TempDir();
        string path = tmp.File("calls.wav");
        string[] signalling = word
            ? ["--code-squelch", "754I:650:0.18"]
            : ["--add-tone", "131.8:500", "--reverse-burst", "180:0.18"];
        string[] synth =
        [
            "synth",
            path,
            "--real",
            "--kind",
            "fm",
            "--discriminator",
            "5k",
            "--deviation",
            "1.9k",
            "--snr",
            "35",
            "--duration",
            "5",
            "--burst",
            "0.5:2.5",
            "--burst",
            "3:4.8",
            .. signalling,
        ];
        Assert.Equal(0, CliRunner.Run(synth).Code);
        var (code, json, err) = CliRunner.Run("analyze", path, "--discriminator", "5k", "--json", "-");
        Assert.True(code == 0, err);
        using var doc = System.Text.Json.JsonDocument.Parse(json);
        var audio = doc.RootElement.GetProperty("audio");
        if (word)
        {
            var c = audio.GetProperty("codeSquelch");
            var names = c.GetProperty("sameSignal")
                .EnumerateArray()
                .Select(x => x.GetString())
                .Append(c.GetProperty("code").GetString());
            Assert.Contains("754I", names);
            Near.Equal(0.17, c.GetProperty("turnOffS").GetDouble(), 0.02, "turn-off code");
        }
        else
        {
            var rb = audio.GetProperty("reverseBurst");
            Near.Equal(180, rb.GetProperty("shiftDeg").GetDouble(), 15, "reverse burst");
        }
    }
}
