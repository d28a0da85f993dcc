using SignalInspect.Capture;
using SignalInspect.Dsp;
using SignalInspect.Measure;
using SignalInspect.Spectrum;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Measure;

/// <summary>Checks against published values and bounds (sources named at each check).</summary>
public class ReferenceTests
{
    /// <summary>Cramer-Rao bound for the frequency of one complex tone in white noise (Rife and Boorstyn 1974), cycles
    /// per sample.</summary>
    internal static double CrbStdCyclesPerSample(double snr, int n) =>
        Math.Sqrt(6 / (snr * n * ((double)n * n - 1))) / (2 * Math.PI);

    [Fact]
    public void The_bound_formula_gives_the_reference_value()
    {
        // testdata/REFERENCE-VALUES.md [D]: N = 1024, SNR 10 dB -> std(f) >= 3.762e-6 cycles/sample.
        Near.Equal(3.762e-6, CrbStdCyclesPerSample(10, 1024), 0.0005e-6);
    }

    [Fact]
    public void Carrier_estimate_spread_is_within_a_small_factor_of_the_Cramer_Rao_bound()
    {
        // 40 seeded trials of an unmodulated carrier, N = 8192, SNR 20 dB (A^2 / sigma^2, as the bound defines it).
        const int n = 8192,
            trials = 40;
        const double fs = 8192,
            f0 = 1000.3;
        using var tmp = new TempDir();
        var errors = new List<double>();
        for (int seed = 1; seed <= trials; seed++)
        {
            var spec = new SignalSpec
            {
                Kind = SignalKind.Cw,
                SampleRateHz = fs,
                DurationS = n / fs,
                CarrierOffsetHz = f0,
                Amplitude = 0.5,
                SnrDb = 20,
                Seed = seed,
            };
            string path = tmp.File($"crb{seed}.cf64");
            Synthesizer.Write(spec, path, SampleFormat.Parse("cf64_le"));
            AnalysisResult r = Analyzer.Analyze(
                CaptureSource.Open(path, new ReaderOptions { SampleRateHz = fs }),
                new AnalysisOptions { Expect = ModulationKind.Cw }
            );
            errors.Add(r.Carrier!.OffsetHz - f0);
        }
        double mean = errors.Average();
        double std = Math.Sqrt(errors.Sum(e => (e - mean) * (e - mean)) / (trials - 1));
        double bound = CrbStdCyclesPerSample(100, n) * fs;
        // With 40 trials the sample std is within about +/- 25 % of the true one (2 sigma).
        Assert.True(std < 2.0 * bound, $"spread {std:G3} Hz against the bound {bound:G3} Hz");
        Assert.True(std > 0.6 * bound, $"spread {std:G3} Hz cannot beat the bound {bound:G3} Hz by this much");
        Assert.True(Math.Abs(mean) < 3 * bound, $"bias {mean:G3} Hz");
    }

    private static PowerSpectrum Spectrum(TempDir tmp, SignalSpec spec, WindowKind window, int fft)
    {
        string path = tmp.File($"s{Guid.NewGuid():N}.cf64");
        Synthesizer.Write(spec, path, SampleFormat.Parse("cf64_le"));
        return WelchEstimator
            .Estimate(
                CaptureSource.Open(path, new ReaderOptions { SampleRateHz = spec.SampleRateHz }),
                new SpectrumSettings { FftSize = fft, Window = window }
            )
            .Mean.In(SpectrumScaling.PowerPerBin);
    }

    private static double LineDb(PowerSpectrum p, double hz)
    {
        int k = (int)Math.Round((hz - p.FrequenciesHz[0]) / p.BinWidthHz);
        double s = 0;
        for (int i = k - 6; i <= k + 6; i++)
            s += p.Values[i];
        return 10 * Math.Log10(s);
    }

    [Theory]
    // The first zeros of J0 (Abramowitz and Stegun, Table 9.5 [D; mem]): the carrier line vanishes.
    [InlineData(2.404825558)]
    [InlineData(5.520078110)]
    public void FM_carrier_vanishes_at_the_zeros_of_J0(double beta)
    {
        using var tmp = new TempDir();
        const double fm = 1000;
        var nulled = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 64000,
            DurationS = 1,
            PeakDeviationHz = beta * fm,
            ModulatingFrequencyHz = fm,
            CarrierOffsetHz = 0,
        };
        var near = nulled with { PeakDeviationHz = (beta - 0.3) * fm };
        PowerSpectrum a = Spectrum(tmp, nulled, WindowKind.BlackmanHarris, 8192);
        PowerSpectrum b = Spectrum(tmp, near, WindowKind.BlackmanHarris, 8192);
        double firstSideband = LineDb(a, fm);
        Assert.True(
            LineDb(a, 0) < firstSideband - 50,
            $"carrier {LineDb(a, 0):0.0} dB, first sideband {firstSideband:0.0} dB"
        );
        Assert.True(LineDb(b, 0) > LineDb(b, fm) - 30, "0.3 away from the zero the carrier is back");
    }

    [Theory]
    // Single-tone AM: each sideband at 20 log10(m/2) dBc [D]: m = 1 -> -6.02, 0.5 -> -12.04, 0.1 -> -26.02.
    [InlineData(1.0, -6.02)]
    [InlineData(0.5, -12.04)]
    [InlineData(0.1, -26.02)]
    public void AM_sidebands_sit_at_20_log_m_over_2_dBc(double m, double dbc)
    {
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Am,
            SampleRateHz = 32768,
            DurationS = 1,
            Amplitude = 0.4,
            AmDepth = m,
            ModulatingFrequencyHz = 2048,
            CarrierOffsetHz = 0,
        };
        PowerSpectrum p = Spectrum(tmp, spec, WindowKind.FlatTop, 4096);
        Near.Equal(dbc, LineDb(p, 2048) - LineDb(p, 0), 0.01, "upper sideband");
        Near.Equal(dbc, LineDb(p, -2048) - LineDb(p, 0), 0.01, "lower sideband");
    }

    [Fact]
    public void AM_occupied_bandwidth_collapses_to_the_carrier_below_m_0_142()
    {
        // Each sideband carries (m^2/4)/(1 + m^2/2) of the power [D]: below m = 0.142134 the 0.5 %
        // on each side is found inside the carrier line.
        using var tmp = new TempDir();
        AnalysisResult deep = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Am,
                SampleRateHz = 48000,
                DurationS = 1,
                AmDepth = 0.3,
                ModulatingFrequencyHz = 2000,
            }
        );
        AnalysisResult shallow = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Am,
                SampleRateHz = 48000,
                DurationS = 1,
                AmDepth = 0.1,
                ModulatingFrequencyHz = 2000,
            }
        );
        Near.Equal(4000, deep.Bandwidth.OccupiedHz, 2 * deep.Method.RbwHz, "m = 0.3: 2 fm");
        Assert.True(
            shallow.Bandwidth.OccupiedHz < 4 * shallow.Method.RbwHz,
            $"m = 0.1: {shallow.Bandwidth.OccupiedHz} Hz"
        );
    }

    [Fact]
    public void Occupied_bandwidth_of_flat_noise_is_99_percent_of_its_width()
    {
        // A flat PSD of width W has OBW99 = 0.99 W [D]. Complex white noise fills the whole band fs.
        using var tmp = new TempDir();
        string path = tmp.File("n.cf64");
        Synthesizer.Write(
            new SignalSpec
            {
                Kind = SignalKind.Noise,
                SampleRateHz = 100000,
                DurationS = 2,
                Amplitude = 0.3,
            },
            path,
            SampleFormat.Parse("cf64_le")
        );
        PowerSpectrum p = WelchEstimator
            .Estimate(
                CaptureSource.Open(path, new ReaderOptions { SampleRateHz = 100000 }),
                new SpectrumSettings { FftSize = 1024 }
            )
            .Mean;
        BandwidthResult b = BandwidthMeasurement.Measure(p, 0.01, 26, NoiseFloorTreatment.Keep);
        Near.Equal(99000, b.OccupiedHz, 0.005 * 99000, "OBW");
    }
}

/// <summary>Numbers of the analysis that the other tests did not pin to an outside value.</summary>
public class UnpinnedNumberTests
{
    [Fact]
    public void X_dB_bandwidth_follows_the_AM_sideband_level()
    {
        // Single-tone AM, m = 0.5: sidebands at 20 log10(m/2) = -12.04 dBc [D]. So the 26 dB
        // bandwidth spans both sidebands (2 fm plus the window's main lobe), and the 10 dB bandwidth
        // holds only the carrier line (SM.443 Annex 2 definition: outermost points x dB down).
        using var tmp = new TempDir();
        var spec = new SignalSpec
        {
            Kind = SignalKind.Am,
            SampleRateHz = 48000,
            DurationS = 1,
            AmDepth = 0.5,
            ModulatingFrequencyHz = 2000,
            SnrDb = 50,
        };
        AnalysisResult x26 = Measuring.Analyze(tmp, spec);
        AnalysisResult x10 = Measuring.Analyze(tmp, spec, new AnalysisOptions { Xdb = 10 });
        double rbw = x26.Method.RbwHz;
        Near.Equal(4000, x26.Bandwidth.XdbHz, 2 * rbw, "26 dB bandwidth");
        Assert.True(x10.Bandwidth.XdbHz < 3 * rbw, $"10 dB bandwidth {x10.Bandwidth.XdbHz} Hz");
    }

    [Fact]
    public void Channel_SNR_follows_the_band_ratio()
    {
        // synth's SNR is over the whole sampled band (README); inside an occupied bandwidth B the
        // noise is B / fs of it, so SNR_B = SNR + 10 log10(fs / B) [D]. The reading runs about 1 dB
        // high (the noise floor is the 10th percentile of the averaged PSD bins, below their mean);
        // hence the 1.5 dB tolerance.
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fm,
                SampleRateHz = 48000,
                DurationS = 1.5,
                PeakDeviationHz = 2500,
                SnrDb = 25,
                Seed = 8,
            }
        );
        double expected = 25 + 10 * Math.Log10(48000 / r.Bandwidth.OccupiedHz);
        Near.Equal(expected, r.ChannelSnrDb, 1.5, "SNR in the occupied bandwidth");
    }

    [Fact]
    public void FSK_index_is_shift_over_rate()
    {
        // h = 2D / R = shift / symbol rate (common practice): 1000 Hz at 1200 Bd -> 0.833.
        using var tmp = new TempDir();
        AnalysisResult r = Measuring.Analyze(
            tmp,
            new SignalSpec
            {
                Kind = SignalKind.Fsk,
                SampleRateHz = 48000,
                DurationS = 1.5,
                FskShiftHz = 1000,
                SymbolRateBd = 1200,
                SnrDb = 30,
            }
        );
        Near.Equal(1000.0 / 1200, r.Fsk!.ModulationIndex!.Value, 0.02, "h");
    }
}
