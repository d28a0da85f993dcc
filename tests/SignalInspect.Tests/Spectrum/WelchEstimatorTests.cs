using System.Globalization;
using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Spectrum;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Spectrum;

public class WelchEstimatorTests
{
    internal static (double[] F, double[] P) ReadCsv(string path)
    {
        var f = new List<double>();
        var p = new List<double>();
        foreach (string line in File.ReadLines(path).Skip(1))
        {
            string[] parts = line.Split(',');
            f.Add(double.Parse(parts[0], CultureInfo.InvariantCulture));
            p.Add(parts[1] == "-inf" ? double.NegativeInfinity : double.Parse(parts[1], CultureInfo.InvariantCulture));
        }
        return ([.. f], [.. p]);
    }

    public static TheoryData<string, string> ScipyCases()
    {
        var d = new TheoryData<string, string>();
        foreach (string kind in new[] { "complex", "real" })
            foreach (
                string c in new[]
                {
                "hann-256-128",
                "hamming-200-100",
                "blackmanharris-512-384",
                "flattop-256-0",
                "boxcar-128-64",
                "kaiser8.6-256-192",
                "hann-255-127",
                }
            )
                d.Add(kind, c);
        return d;
    }

    // Reference: scipy.signal.welch from Debian python3-scipy 1.10.1 (testdata/spectrum/make_welch_refs.py),
    // detrend=False, scaling='density', return_onesided = real input.
    [Theory]
    [MemberData(nameof(ScipyCases))]
    public void Density_equals_scipy_welch_within_1e_4_relative(string kind, string name)
    {
        string[] parts = name.Split('-');
        (WindowKind window, double beta) =
            parts[0].StartsWith("kaiser") ? (WindowKind.Kaiser, 8.6)
            : parts[0] == "boxcar" ? (WindowKind.Rectangular, 0)
            : Window.ParseName(parts[0]);
        int n = int.Parse(parts[1], CultureInfo.InvariantCulture),
            overlap = int.Parse(parts[2], CultureInfo.InvariantCulture);
        CaptureSource source =
            kind == "complex"
                ? CaptureSource.Open(
                    TestData.Path("spectrum", "in-complex.cf64"),
                    new ReaderOptions { Datatype = "cf64_le", SampleRateHz = 48000 }
                )
                : CaptureSource.Open(
                    TestData.Path("spectrum", "in-real.f64le"),
                    new ReaderOptions { Datatype = "rf64_le", SampleRateHz = 8000 }
                );
        var settings = new SpectrumSettings
        {
            FftSize = n,
            Window = window,
            KaiserBeta = beta,
            OverlapFraction = (double)overlap / n,
        };
        Assert.Equal(overlap, settings.OverlapSamples);
        PowerSpectrum psd = WelchEstimator.Estimate(source, settings).Mean;
        var (f, p) = ReadCsv(TestData.Path("spectrum", $"welch-{kind}-{name}.csv"));
        Assert.Equal(f.Length, psd.Count);
        for (int i = 0; i < f.Length; i++)
        {
            Near.Equal(f[i], psd.FrequenciesHz[i], 1e-9, $"frequency {i}");
            Near.Equal(p[i], psd.Values[i], 1e-4 * p[i], $"PSD at {f[i]} Hz");
        }
    }

    // The same scipy references for the complex input stored as cf32 (each value rounded to float,
    // a change of at most 6e-8 of it): power-of-two sizes take the single-precision transform
    // (FftPlan.ForwardPowerScrambledSingle), the others the double one; both within 1e-4 of scipy.
    [Theory]
    [InlineData("hann-256-128")]
    [InlineData("blackmanharris-512-384")]
    [InlineData("flattop-256-0")]
    [InlineData("boxcar-128-64")]
    [InlineData("kaiser8.6-256-192")]
    [InlineData("hann-255-127")]
    public void Density_of_a_cf32_copy_equals_scipy_welch_within_1e_4_relative(string name)
    {
        using var tmp = new TempDir();
        string path = tmp.File("in-complex.cf32");
        double[] values = System
            .Runtime.InteropServices.MemoryMarshal.Cast<byte, double>(
                File.ReadAllBytes(TestData.Path("spectrum", "in-complex.cf64"))
            )
            .ToArray();
        File.WriteAllBytes(
            path,
            System
                .Runtime.InteropServices.MemoryMarshal.AsBytes(values.Select(v => (float)v).ToArray().AsSpan())
                .ToArray()
        );
        string[] parts = name.Split('-');
        (WindowKind window, double beta) =
            parts[0].StartsWith("kaiser") ? (WindowKind.Kaiser, 8.6)
            : parts[0] == "boxcar" ? (WindowKind.Rectangular, 0)
            : Window.ParseName(parts[0]);
        int n = int.Parse(parts[1], CultureInfo.InvariantCulture),
            overlap = int.Parse(parts[2], CultureInfo.InvariantCulture);
        CaptureSource source = CaptureSource.Open(
            path,
            new ReaderOptions { Datatype = "cf32_le", SampleRateHz = 48000 }
        );
        var settings = new SpectrumSettings
        {
            FftSize = n,
            Window = window,
            KaiserBeta = beta,
            OverlapFraction = (double)overlap / n,
        };
        PowerSpectrum psd = WelchEstimator.Estimate(source, settings).Mean;
        var (f, p) = ReadCsv(TestData.Path("spectrum", $"welch-complex-{name}.csv"));
        Assert.Equal(f.Length, psd.Count);
        for (int i = 0; i < f.Length; i++)
            Near.Equal(p[i], psd.Values[i], 1e-4 * p[i], $"PSD at {f[i]} Hz");
    }

    private static CaptureSource Synth(TempDir tmp, SignalSpec spec, string datatype = "cf64_le")
    {
        string path = tmp.File($"s{Guid.NewGuid():N}.sigmf");
        Synthesizer.Write(spec, path, SampleFormat.Parse(datatype));
        return CaptureSource.Open(path);
    }

    // Identity of the 'spectrum' scaling [testdata/REFERENCE-VALUES.md: scipy source, D]: a real tone of
    // amplitude A reads A^2/2 at its bin for every window (tone on a bin centre).
    [Theory]
    [InlineData(WindowKind.Rectangular)]
    [InlineData(WindowKind.Hann)]
    [InlineData(WindowKind.Hamming)]
    [InlineData(WindowKind.BlackmanHarris)]
    [InlineData(WindowKind.FlatTop)]
    [InlineData(WindowKind.Kaiser)]
    public void A_real_tone_of_amplitude_A_reads_A2_over_2_in_power_scaling(WindowKind window)
    {
        using var tmp = new TempDir();
        const double fs = 8192,
            a = 0.6;
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                IsComplex = false,
                SampleRateHz = fs,
                DurationS = 2,
                CarrierOffsetHz = 1024,
                Amplitude = a,
            },
            "rf64_le"
        );
        PowerSpectrum p = WelchEstimator
            .Estimate(src, new SpectrumSettings { FftSize = 1024, Window = window })
            .Mean.In(SpectrumScaling.PowerPerBin);
        // Exact but for the leakage of the tone's negative-frequency image 256 bins away, which the
        // far sidelobes of every window here keep below 1e-6 of the reading.
        Near.Equal(a * a / 2, p.Values[p.PeakIndex()], 1e-6 * a * a / 2, window.ToString());
        Assert.Equal(1024, p.FrequenciesHz[p.PeakIndex()]);
    }

    [Fact]
    public void A_complex_tone_reads_A2_and_flat_top_stays_within_0_01_dB_between_bins()
    {
        using var tmp = new TempDir();
        const double fs = 48000,
            a = 0.5;
        double bin = fs / 1024;
        for (double frac = 0; frac <= 0.5001; frac += 0.05)
        {
            CaptureSource src = Synth(
                tmp,
                new SignalSpec
                {
                    SampleRateHz = fs,
                    DurationS = 0.5,
                    CarrierOffsetHz = (100 + frac) * bin,
                    Amplitude = a,
                }
            );
            PowerSpectrum p = WelchEstimator
                .Estimate(src, new SpectrumSettings { FftSize = 1024, Window = WindowKind.FlatTop })
                .Mean.In(SpectrumScaling.PowerPerBin);
            double peakDb = p.Db(p.PeakIndex());
            Near.Equal(10 * Math.Log10(a * a), peakDb, 0.01, $"tone {frac:0.00} bin off centre");
        }
    }

    [Fact]
    public void Complex_white_noise_of_variance_s2_reads_s2_over_fs()
    {
        using var tmp = new TempDir();
        // Noise only, amplitude 0.3: variance s^2 = 0.09 (SignalSpec: noise of the signal's power).
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Noise,
                SampleRateHz = 100000,
                DurationS = 4,
                Amplitude = 0.3,
                Seed = 5,
            }
        );
        foreach (WindowKind w in Enum.GetValues<WindowKind>())
        {
            PowerSpectrum p = WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 512, Window = w }).Mean;
            double mean = 0;
            foreach (double v in p.Values)
                mean += v;
            mean /= p.Count;
            // 400000 samples: the bin-averaged estimate is within a fraction of a percent of the truth.
            Near.Equal(0.09 / 100000, mean, 0.01 * 0.09 / 100000, w.ToString());
        }
    }

    [Fact]
    public void Parseval_rectangular_window_without_overlap_gives_the_mean_power()
    {
        using var tmp = new TempDir();
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 48000,
                DurationS = 1,
                SnrDb = 10,
                Seed = 2,
            }
        );
        PowerSpectrum p = WelchEstimator
            .Estimate(
                src,
                new SpectrumSettings
                {
                    FftSize = 1000,
                    Window = WindowKind.Rectangular,
                    OverlapFraction = 0,
                }
            )
            .Mean;
        double[] x = TestData.ReadAll(src);
        double power = 0;
        for (int i = 0; i < x.Length; i++)
            power += x[i] * x[i];
        power /= x.Length / 2;
        Near.Equal(power, p.TotalPower(), 1e-12 * power);
    }

    [Fact]
    public void Two_or_three_threads_give_exactly_the_result_of_one()
    {
        using var tmp = new TempDir();
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fsk,
                SampleRateHz = 96000,
                DurationS = 3,
                SnrDb = 20,
                Seed = 4,
            }
        );
        var s = new SpectrumSettings { FftSize = 2048, SpectrogramRows = 50 };
        SpectrumResult one = WelchEstimator.Estimate(src, s with { Threads = 1 });
        SpectrumResult two = WelchEstimator.Estimate(src, s with { Threads = 2 });
        SpectrumResult three = WelchEstimator.Estimate(src, s with { Threads = 3 });
        Assert.Equal(2, two.Threads);
        // The rows' sums join the mean in row order whichever thread made them: identical bits.
        Assert.Equal(one.Mean.Values.ToArray(), two.Mean.Values.ToArray());
        Assert.Equal(one.Mean.Values.ToArray(), three.Mean.Values.ToArray());
        for (int i = 0; i < one.Mean.Count; i++)
            Assert.Equal(one.MaxHold.Values[i], two.MaxHold.Values[i]);
        for (int r = 0; r < one.Spectrogram!.Rows; r++)
            for (int c = 0; c < one.Spectrogram.Columns; c += 97)
                Assert.Equal(one.Spectrogram.Value(r, c), two.Spectrogram!.Value(r, c));
    }

    [Theory]
    [InlineData(2048, 1)]
    [InlineData(2048, 2)]
    [InlineData(1000, 2)] // the plain transform
    public void Without_the_spectrogram_the_spectra_are_the_same_bits(int fft, int threads)
    {
        // Internal consistency (no outside reference): leaving the map out must not touch the
        // spectra, since the rows stay the units of work and of the ordered sum.
        using var tmp = new TempDir();
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 96000,
                DurationS = 2,
                SnrDb = 30,
                Seed = 9,
            }
        );
        var s = new SpectrumSettings
        {
            FftSize = fft,
            SpectrogramRows = 40,
            Threads = threads,
        };
        SpectrumResult with = WelchEstimator.Estimate(src, s);
        SpectrumResult without = WelchEstimator.Estimate(src, s with { KeepSpectrogram = false });
        Assert.NotNull(with.Spectrogram);
        Assert.Null(without.Spectrogram);
        Assert.Equal(with.Mean.Values.ToArray(), without.Mean.Values.ToArray());
        Assert.Equal(with.MaxHold.Values.ToArray(), without.MaxHold.Values.ToArray());
        Assert.Equal(with.Mean.Segments, without.Mean.Segments);
    }

    [Theory]
    [InlineData(480)] // the plain transform
    [InlineData(512)] // the scrambled one, whose mean rows are read from the row sums
    public void Spectrogram_rows_are_bounded_and_average_to_the_mean_spectrum(int fft)
    {
        using var tmp = new TempDir();
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 48000 * fft / 480.0,
                DurationS = 10,
                SnrDb = 20,
            }
        );
        var s = new SpectrumSettings
        {
            FftSize = fft,
            OverlapFraction = 0,
            SpectrogramRows = 100,
        };
        SpectrumResult r = WelchEstimator.Estimate(src, s);
        Assert.Equal(1000, r.Mean.Segments);
        Assert.Equal(100, r.Spectrogram!.Rows);
        Assert.Equal(10, r.Spectrogram.SegmentsPerRow);
        Near.Equal(0.05, r.Spectrogram.RowTimesS[0], 1e-12, "first row centre");
        for (int c = 0; c < r.Spectrogram.Columns; c += 37)
        {
            double avg = Enumerable.Range(0, 100).Average(row => r.Spectrogram.Value(row, c));
            Near.Equal(r.Mean.Values[c], avg, 1e-9 * r.Mean.Values[c]);
            Assert.True(r.MaxHold.Values[c] >= r.Mean.Values[c]);
        }
    }

    [Fact]
    public void DC_suppression_removes_a_receiver_spike_and_says_how_many_bins()
    {
        using var tmp = new TempDir();
        // A carrier at 0 Hz offset stands in for a DC spike, over noise.
        CaptureSource src = Synth(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Cw,
                SampleRateHz = 48000,
                DurationS = 1,
                CarrierOffsetHz = 0,
                Amplitude = 0.1,
                SnrDb = 0,
            }
        );
        SpectrumResult plain = WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 1024 });
        SpectrumResult clean = WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 1024, SuppressDc = true });
        Assert.Equal(5, clean.DcBinsSuppressed); // Hann: main lobe +/-2 bins around 0 Hz
        int dc = 512;
        Assert.True(plain.Mean.Db(dc) - clean.Mean.Db(dc) > 20);
        Assert.Equal(plain.Mean.Values[dc + 10], clean.Mean.Values[dc + 10]);
    }

    [Fact]
    public void A_capture_shorter_than_one_segment_is_refused()
    {
        using var tmp = new TempDir();
        CaptureSource src = Synth(tmp, new SignalSpec { SampleRateHz = 1000, DurationS = 0.1 });
        var e = Assert.Throws<SettingException>(() =>
            WelchEstimator.Estimate(src, new SpectrumSettings { FftSize = 256 })
        );
        Assert.Contains("fewer than one FFT segment of 256", e.Message);
    }

    [Fact]
    public void Non_finite_samples_are_taken_as_zero_and_counted()
    {
        using var tmp = new TempDir();
        string path = tmp.File("nan.cf32");
        var x = new float[2 * 4096];
        for (int i = 0; i < 4096; i++)
            x[2 * i] = (float)Math.Cos(0.3 * i);
        x[2 * 1000] = float.NaN;
        x[2 * 3000 + 1] = float.PositiveInfinity;
        File.WriteAllBytes(path, System.Runtime.InteropServices.MemoryMarshal.AsBytes(x.AsSpan()).ToArray());
        SpectrumResult r = WelchEstimator.Estimate(
            CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 1000 }),
            new SpectrumSettings { FftSize = 512, OverlapFraction = 0 }
        );
        Assert.Equal(2, r.NonFiniteSegments);
        foreach (double v in r.Mean.Values)
            Assert.True(double.IsFinite(v));
    }

    [Theory]
    [InlineData(100.0, 48000.0, WindowKind.Hann, 512)] // 1.5 x 48000 / 100 = 720: log2 9.49 -> 512
    [InlineData(10.0, 2.4e6, WindowKind.Hann, 262144)] // 360000 -> 2^18
    [InlineData(600.0, 48000.0, WindowKind.FlatTop, 256)] // 3.77 x 80 = 302: log2 8.24 -> 256
    public void A_requested_RBW_picks_the_nearest_power_of_two(double rbw, double fs, WindowKind window, int n)
    {
        Assert.Equal(n, SpectrumSettings.FftSizeForRbw(rbw, fs, window));
    }
}
