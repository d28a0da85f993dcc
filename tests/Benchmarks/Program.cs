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
CultureInfo.DefaultThreadCurrentCulture = CultureInfo.InvariantCulture;
string mode = args.Length > 0 ? args[0] : "fft";
bool smoke = args.Contains("--smoke");
switch (mode)
{
    case "fft": Fft(smoke); break;
    case "welch": Welch(args.Skip(1).FirstOrDefault(a => !a.StartsWith("--")), smoke); break;
    default: Console.Error.WriteLine("usage: fft | welch [CAPTURE] [--smoke]"); return 2;
}
return 0;

static void Fft(bool smoke)
{
    Console.WriteLine("| N | in-house (us) | MathNet (us) | MathNet / in-house |");
    Console.WriteLine("|---|---|---|---|");
    foreach (int n in smoke ? new[] { 1024 } : new[] { 1024, 4096, 65536, 3000 })
    {
        var rng = new Random(1);
        double[] re = [.. Enumerable.Range(0, n).Select(_ => rng.NextDouble())], im = new double[n];
        var c = re.Select(x => new Complex(x, 0)).ToArray();
        var plan = new FftPlan(n);
        int reps = smoke ? 50 : Math.Max(20, 40_000_000 / (n * 12));
        double ours = Time(reps, () => plan.Forward(re, im));
        double theirs = Time(reps, () => Fourier.Forward(c, FourierOptions.Matlab));
        Console.WriteLine($"| {n} | {ours * 1e6:0.00} | {theirs * 1e6:0.00} | {theirs / ours:0.00} |");
    }
    // The Welch inner step: windowed, fused-permutation transform of an interleaved IQ segment.
    const int m = 4096;
    var seg = new double[2 * m];
    new Random(2).NextBytes(new byte[1]);
    for (int i = 0; i < seg.Length; i++) seg[i] = Math.Sin(i * 0.37);
    var win = Window.Create(WindowKind.Hann, m).Coefficients.ToArray();
    double[] wr = new double[m], wi = new double[m];
    var p4096 = new FftPlan(m);
    double tw = Time(smoke ? 50 : 5000, () => p4096.ForwardWindowed(seg, true, win, wr, wi));
    Console.WriteLine($"ForwardWindowed 4096 complex: {tw * 1e6:0.00} us ({tw / m * 2e9:0.00} ns per input sample at 50 % overlap)");
}

static double Time(int reps, Action a)
{
    for (int i = 0; i < Math.Max(3, reps / 10); i++) a();
    var best = double.MaxValue;
    for (int round = 0; round < 5; round++)
    {
        var sw = Stopwatch.StartNew();
        for (int i = 0; i < reps; i++) a();
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
        Synthesizer.Write(new SignalSpec { Kind = SignalKind.Fm, SampleRateHz = 2.4e6, DurationS = seconds, PeakDeviationHz = 75e3, ModulatingFrequencyHz = 1e3, SnrDb = 40 },
                          path, SampleFormat.Parse("cf32_le"));
        Console.WriteLine($"made {path} in {sw.Elapsed.TotalSeconds:0.0} s");
    }
    CaptureSource src = CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 2.4e6 });
    Console.WriteLine($"capture: {src.Info.SampleCount} samples ({src.Info.DurationS:0.#} s), {new FileInfo(path).Length / 1e6:0} MB");
    // Warm the page cache and the JIT once.
    WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 4096 }, 0, Math.Min(src.Info.SampleCount, 2_400_000));
    using (var r = src.OpenReader()) { var buf = new double[1 << 18]; while (r.Read(buf) > 0) { } }
    Console.WriteLine("| stage | threads | wall (s) | MS/s |");
    Console.WriteLine("|---|---|---|---|");
    var read = Stopwatch.StartNew();
    using (var r = src.OpenReader()) { var buf = new double[1 << 18]; while (r.Read(buf) > 0) { } }
    Console.WriteLine($"| read + decode only | 1 | {read.Elapsed.TotalSeconds:0.00} | {src.Info.SampleCount / read.Elapsed.TotalSeconds / 1e6:0} |");
    foreach (int threads in new[] { 1, 2 })
    {
        var sw = Stopwatch.StartNew();
        SpectrumResult res = WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 4096, Window = WindowKind.Hann, OverlapFraction = 0.5, Threads = threads });
        double t = sw.Elapsed.TotalSeconds;
        Console.WriteLine($"| Welch FFT 4096 Hann 50 % | {threads} | {t:0.00} | {res.SamplesAnalysed / t / 1e6:0} |");
    }
}
