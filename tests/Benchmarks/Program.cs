using System.Diagnostics;
using System.Globalization;
using System.Numerics;
using MathNet.Numerics.IntegralTransforms;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;
using SignalInspect.Synthesis;

// A plain benchmark harness, run by hand (see RESULTS.md). Each mode compares alternatives as
// ratios within one run, since the machine is shared and absolute times wander.
//   fft                      in-house FftPlan against MathNet.Numerics' FFT
//   welch [CAPTURE] [--smoke] Welch stage throughput on a 60 s, 2.4 MS/s cf32 capture (made if absent)
//   kernels [--smoke]        the demodulation pass's kernels, ns per input or decimated sample
//   coverage [SEEDS]         Monte Carlo coverage of the stated uncertainties (docs/COVERAGE.md)
CultureInfo.DefaultThreadCurrentCulture = CultureInfo.InvariantCulture;
string mode = args.Length > 0 ? args[0] : "fft";
bool smoke = args.Contains("--smoke");
switch (mode)
{
    case "fft":
        Fft(smoke);
        break;
    case "welch":
        Welch(args.Skip(1).FirstOrDefault(a => !a.StartsWith("--")), smoke);
        break;
    case "kernels":
        Kernels(smoke);
        break;
    case "coverage":
        Console.Write(Coverage.Run(args.Length > 1 ? int.Parse(args[1], CultureInfo.InvariantCulture) : 40));
        break;
    default:
        Console.Error.WriteLine("usage: fft | welch [CAPTURE] [--smoke] | kernels [--smoke] | coverage [SEEDS]");
        return 2;
}
return 0;

static void Fft(bool smoke)
{
    Console.WriteLine("| N | in-house (us) | MathNet (us) | MathNet / in-house |");
    Console.WriteLine("|---|---|---|---|");
    foreach (int n in smoke ? new[] { 1024 } : new[] { 1024, 4096, 65536, 3000 })
    {
        var rng = new Random(1);
        double[] re = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble())],
            im = new double[n];
        var c = re.Select(x => new Complex(x, 0)).ToArray();
        var plan = new FftPlan(n);
        int reps = smoke ? 50 : Math.Max(20, 40_000_000 / (n * 12));
        double ours = Time(reps, () => plan.Forward(re, im));
        double theirs = Time(reps, () => Fourier.Forward(c, FourierOptions.Matlab));
        Console.WriteLine($"| {n} | {ours * 1e6:0.00} | {theirs * 1e6:0.00} | {theirs / ours:0.00} |");
    }
    // The Welch inner step: windowed, fused-permutation transform of an interleaved IQ segment.
    const int m = 4096;
    var (seg, win, wr, wi, p4096) = Segment(m, WindowKind.Hann, 0.37);
    double tw = Time(smoke ? 50 : 5000, () => p4096.ForwardWindowed(seg, true, win, wr, wi));
    Console.WriteLine(
        $"ForwardWindowed 4096 complex: {tw * 1e6:0.00} us ({tw / m * 2e9:0.00} ns per input sample at 50 % overlap)"
    );
    double[] ps = new double[m],
        pm = new double[m],
        pr = new double[m];
    double tp = Time(smoke ? 50 : 5000, () => p4096.ForwardPowerScrambled(seg, true, win, wr, wi, ps, pm, pr, false));
    Console.WriteLine(
        $"ForwardPowerScrambled 4096 complex (the Welch inner step with its sums): {tp * 1e6:0.00} us "
            + $"({tp / m * 2e9:0.00} ns per input sample at 50 % overlap)"
    );
    // The line-spectrum step: a pair of real 65 536-point segments in one windowed, scrambled transform.
    var (pair, bh, br, bi, p65536) = Segment(65536, WindowKind.BlackmanHarris, 0.011);
    double tb = Time(smoke ? 5 : 400, () => p65536.ForwardWindowedScrambled(pair, true, bh, br, bi));
    Console.WriteLine($"ForwardWindowedScrambled 65536 complex (the line-spectrum step): {tb * 1e6:0.00} us");
}

// An interleaved segment of n complex points (a sine of step w radians), its window, output buffers and plan.
static (double[] Segment, double[] Window, double[] Re, double[] Im, FftPlan Plan) Segment(
    int n,
    WindowKind kind,
    double w
)
{
    var seg = new double[2 * n];
    for (int i = 0; i < seg.Length; i++)
        seg[i] = Math.Sin(i * w);
    return (seg, Window.Create(kind, n).Coefficients.ToArray(), new double[n], new double[n], new FftPlan(n));
}

static double Time(int reps, Action a)
{
    for (int i = 0; i < Math.Max(3, reps / 10); i++)
        a();
    var best = double.MaxValue;
    for (int round = 0; round < 5; round++)
    {
        var sw = Stopwatch.StartNew();
        for (int i = 0; i < reps; i++)
            a();
        best = Math.Min(best, sw.Elapsed.TotalSeconds / reps);
    }
    return best;
}

static void Welch(string? capture, bool smoke)
{
    double seconds = smoke ? 0.5 : 60;
    string path = capture ?? Path.Combine(Path.GetTempPath(), smoke ? "si-bench-smoke.cf32" : "si-bench-60s-2.4M.cf32");
    if (!File.Exists(path))
    {
        var sw = Stopwatch.StartNew();
        Synthesizer.Write(
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 2.4e6,
                DurationS = seconds,
                PeakDeviationHz = 75e3,
                ModulatingFrequencyHz = 1e3,
                SnrDb = 40,
            },
            path,
            SampleFormat.Parse("cf32_le")
        );
        Console.WriteLine($"made {path} in {sw.Elapsed.TotalSeconds:0.0} s");
    }
    CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 2.4e6 });
    Console.WriteLine(
        $"capture: {src.Info.SampleCount} samples ({src.Info.DurationS:0.#} s), {new FileInfo(path).Length / 1e6:0} MB"
    );
    // Warm the page cache and the JIT once.
    WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 4096 }, 0, Math.Min(src.Info.SampleCount, 2_400_000));
    using (var r = src.OpenReader())
    {
        var buf = new double[1 << 18];
        while (r.Read(buf) > 0)
        { }
    }
    Console.WriteLine("| stage | threads | wall (s) | MS/s |");
    Console.WriteLine("|---|---|---|---|");
    var read = Stopwatch.StartNew();
    using (var r = src.OpenReader())
    {
        var buf = new double[1 << 18];
        while (r.Read(buf) > 0)
        { }
    }
    Console.WriteLine(
        $"| read + decode only | 1 | {read.Elapsed.TotalSeconds:0.00} | "
            + $"{src.Info.SampleCount / read.Elapsed.TotalSeconds / 1e6:0} |"
    );
    foreach (int threads in new[] { 1, 2 })
    {
        var sw = Stopwatch.StartNew();
        SpectrumResult res = WelchEstimator.Estimate(
            src,
            new SpectrumSettings
            {
                FftSize = 4096,
                Window = WindowKind.Hann,
                OverlapFraction = 0.5,
                Threads = threads,
            }
        );
        double t = sw.Elapsed.TotalSeconds;
        Console.WriteLine($"| Welch FFT 4096 Hann 50 % | {threads} | {t:0.00} | {res.SamplesAnalysed / t / 1e6:0} |");
    }
}

static void Kernels(bool smoke)
{
    // The settings analyze picks for the 2.4 MS/s FM benchmark capture: 255-tap channel filter,
    // decimation 6 to 400 kS/s, a 163-tap post-detection low-pass, the jittered peak sampler.
    const double fs = 2.4e6;
    const int d = 6;
    int n = smoke ? 1 << 16 : 1 << 22;
    var rng = new Random(5);
    var iq = new double[2 * 65536];
    for (int i = 0; i < iq.Length; i++)
        iq[i] = rng.NextDouble() - 0.5;
    double[] taps = FirDesign.LowPass(118763, fs, 59000, 80, 4095);
    var dec = new ChannelDecimator(taps, d, -12545.8, fs, true);
    var re = new double[65536 / d + 2];
    var im = new double[65536 / d + 2];
    int blocks = n / 65536;
    double tDec = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            dec.Process(iq, re, im);
    });
    Console.WriteLine(
        $"| channel decimator ({taps.Length} taps, /{d}) | {tDec / (blocks * 65536.0) * 1e9:0.00} ns per input sample |"
    );
    // The two stages analyze uses for it now: half-band to 1.2 MS/s, then the low-pass at that rate, /3.
    double[] hb = FirDesign.HalfBand(142.5e3, fs, 80),
        taps2 = FirDesign.LowPass(118763, fs / 2, 59000, 80, 4095);
    var dec2 = new ChannelDecimator(taps2, d, -12545.8, fs, true, hb);
    double tDec2 = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            dec2.Process(iq, re, im);
    });
    Console.WriteLine(
        $"| channel decimator, two stages (half-band {hb.Length} taps, then {taps2.Length} taps at half the rate, "
            + $"/{d} in all) | {tDec2 / (blocks * 65536.0) * 1e9:0.00} ns per input sample |"
    );
    var mixOnly = new ChannelDecimator(taps, 60000, -12545.8, fs, true);
    double tMix = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            mixOnly.Process(iq, re, im);
    });
    Console.WriteLine(
        $"| of which shifting (decimation 60000: no outputs to speak of) | {tMix / (blocks * 65536.0) * 1e9:0.00} ns "
            + "per input sample |"
    );
    int m = 65536 / d;
    var y = new double[m];
    var x = new double[m];
    var o = new double[m];
    for (int i = 0; i < m; i++)
    {
        y[i] = rng.NextDouble() - 0.5;
        x[i] = rng.NextDouble() - 0.5;
    }
    double tAtan = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            VectorMath.Atan2(y, x, o);
    });
    double tAtanScalar = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            for (int i = 0; i < m; i++)
                o[i] = Math.Atan2(y[i], x[i]);
    });
    Console.WriteLine(
        $"| atan2, vector / Math.Atan2 | {tAtan / (blocks * m) * 1e9:0.00} / {tAtanScalar / (blocks * m) * 1e9:0.00} "
            + "ns per decimated sample |"
    );
    double[] lpTaps = FirDesign.LowPass(106887, fs / d, 10689, 70, 1023);
    var lp = new BlockFir(lpTaps);
    double tLp = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            lp.Process(y, o);
    });
    Console.WriteLine(
        $"| post-detection low-pass ({lpTaps.Length} taps, fast convolution) | {tLp / (blocks * m) * 1e9:0.00} ns per "
            + "decimated sample |"
    );
    double[] lp15 = FirDesign.LowPass(15000, fs / d, 1500, 70, 1023);
    var lpNarrow = new BlockFir(lp15);
    double tLp15 = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            lpNarrow.Process(y, o);
    });
    Console.WriteLine(
        $"| post-detection low-pass 15 kHz ({lp15.Length} taps, fast convolution) | {tLp15 / (blocks * m) * 1e9:0.00} "
            + "ns per decimated sample |"
    );
    var up = new JitteredSampler();
    var ub = new double[m];
    double tUp = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            up.Process(y, b * (long)m, ub);
    });
    Console.WriteLine(
        $"| jittered sampler (64-phase interpolation at one instant per sample) | {tUp / (blocks * m) * 1e9:0.00} ns "
            + "per decimated sample |"
    );
    var h = new SignalInspect.Dsp.Histogram(-0.5, 0.5, 1 << 18);
    double tHist = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            h.Add(ub);
    });
    Console.WriteLine(
        $"| histogram of the sampled values | {tHist / (blocks * m) * 1e9:0.00} ns per decimated sample |"
    );
    // The envelope of an FM signal: nearly every value in the same few bins, the case where
    // increments of one counter queue behind each other.
    var flat = new double[m];
    for (int i = 0; i < m; i++)
        flat[i] = 0.3 + 1e-6 * (rng.NextDouble() - 0.5);
    var hEnv = new SignalInspect.Dsp.Histogram(0, 1, 1 << 16);
    double tFlat = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            hEnv.Add(flat);
    });
    // An FM tone's instantaneous frequency: a sine, neighbouring samples in different bins.
    var sine = new double[m];
    for (int i = 0; i < m; i++)
        sine[i] = 75e3 * Math.Sin(2 * Math.PI * 1000 * i / (fs / d));
    var hF = new SignalInspect.Dsp.Histogram(-fs / d / 2, fs / d / 2, 1 << 18);
    double tSine = Time(3, () =>
    {
        for (int b = 0; b < blocks; b++)
            hF.Add(sine);
    });
    Console.WriteLine(
        "| histogram of a nearly constant value (an FM envelope); of a sine (an FM tone's frequency) | "
            + $"{tFlat / (blocks * m) * 1e9:0.00}; {tSine / (blocks * m) * 1e9:0.00} ns per decimated sample |"
    );
    // Line spectra: a pair of 65 536-point segments (the envelope and the frequency) in one
    // transform, read out of the rings as the demodulation pass adds them, and copied out first.
    const int ln = 65536;
    double[] la = [.. Enumerable.Range(0, ln).Select(i => 0.8 + 1e-3 * (rng.NextDouble() - 0.5))];
    double[] lf = [.. Enumerable.Range(0, ln).Select(i => 75e3 * Math.Sin(2 * Math.PI * 1000 * i / (fs / d)))];
    int pairs = smoke ? 2 : 64;
    string LinePair(bool rings)
    {
        var ws = new SignalInspect.Spectrum.LineSpectrum.Workspace(ln);
        SignalInspect.Spectrum.LineSpectrum sa = new(ln, fs / d),
            sb = new(ln, fs / d);
        double t = Time(3, () =>
        {
            for (int p = 0; p < pairs; p++)
                if (rings)
                    SignalInspect.Spectrum.LineSpectrum.AddRingSegments(sa, la, ln / 2, sb, lf, ln / 2, ws);
                else
                    SignalInspect.Spectrum.LineSpectrum.AddSegments(
                        sa,
                        la.AsSpan(ln / 2),
                        la.AsSpan(0, ln / 2),
                        sb,
                        lf.AsSpan(ln / 2),
                        lf.AsSpan(0, ln / 2),
                        ws
                    );
        });
        return $"{t / pairs * 1e3:0.000}";
    }
    Console.WriteLine(
        $"| line spectra: a pair of {ln}-point segments in one transform, read out of the rings / copied out first | "
            + $"{LinePair(true)} / {LinePair(false)} ms per pair |"
    );
    // The peak deviation's noise correction at the end of an analysis (both excursions, side by side).
    double tPeak = Time(3, () => SignalInspect.Measure.SinePeak.FromPercentiles(75110, 75095, 250));
    Console.WriteLine(
        $"| noise-corrected tone peaks (sine plus Gaussian noise, both excursions) | {tPeak * 1e3:0.00} ms |"
    );
}
