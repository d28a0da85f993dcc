using System.Numerics;
using SignalInspect.Synthesis;

namespace SignalInspect.Tests.Synthesis;

/// <summary>The synthesiser follows the formulas it documents (SignalSpec); later tests rely on it.</summary>
public class SignalGeneratorTests
{
    private static Complex[] Complexes(SignalSpec spec)
    {
        var v = new double[spec.SampleCount * 2];
        Assert.Equal(spec.SampleCount, new SignalGenerator(spec).Generate(v));
        return [.. Enumerable.Range(0, (int)spec.SampleCount).Select(n => new Complex(v[2 * n], v[2 * n + 1]))];
    }

    [Fact]
    public void Carrier_is_A_exp_j_2pi_f0_t()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Cw,
            SampleRateHz = 10000,
            DurationS = 0.2,
            CarrierOffsetHz = 1234.5,
            Amplitude = 0.3,
        };
        Complex[] z = Complexes(spec);
        for (int n = 0; n < z.Length; n++)
            Assert.True((z[n] - Complex.FromPolarCoordinates(0.3, 2 * Math.PI * 1234.5 * n / 10000)).Magnitude < 1e-12);
    }

    [Fact]
    public void FM_phase_is_D_over_fm_sin_2pi_fm_t()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 48000,
            DurationS = 0.1,
            CarrierOffsetHz = 300,
            PeakDeviationHz = 2500,
            ModulatingFrequencyHz = 1000,
        };
        Complex[] z = Complexes(spec);
        for (int n = 0; n < z.Length; n++)
        {
            double t = n / 48000.0;
            Complex want = Complex.FromPolarCoordinates(
                0.5,
                2 * Math.PI * 300 * t + 2.5 * Math.Sin(2 * Math.PI * 1000 * t)
            );
            Assert.True((z[n] - want).Magnitude < 1e-9);
        }
    }

    [Fact]
    public void AM_envelope_is_A_1_plus_m_cos()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Am,
            SampleRateHz = 8000,
            DurationS = 0.1,
            Amplitude = 0.4,
            AmDepth = 0.8,
            ModulatingFrequencyHz = 500,
        };
        Complex[] z = Complexes(spec);
        for (int n = 0; n < z.Length; n++)
            Assert.Equal(0.4 * (1 + 0.8 * Math.Cos(2 * Math.PI * 500 * n / 8000.0)), z[n].Magnitude, 12);
    }

    [Fact]
    public void FSK_steps_by_plus_or_minus_half_the_shift_with_continuous_phase()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fsk,
            SampleRateHz = 48000,
            DurationS = 0.1,
            CarrierOffsetHz = 200,
            FskShiftHz = 1000,
            SymbolRateBd = 1200,
        };
        Complex[] z = Complexes(spec);
        int[] seen = new int[2];
        for (int n = 0; n + 1 < z.Length; n++)
        {
            double f = (z[n + 1] * Complex.Conjugate(z[n])).Phase * 48000 / (2 * Math.PI);
            bool upper = Math.Abs(f - 700) < 1e-6,
                lower = Math.Abs(f + 300) < 1e-6;
            Assert.True(upper || lower, $"step {n}: {f} Hz");
            seen[upper ? 1 : 0]++;
        }
        Assert.True(seen[0] > 1000 && seen[1] > 1000);
    }

    [Fact]
    public void Noise_power_follows_the_SNR_over_the_sampled_bandwidth()
    {
        var clean = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 100000,
            DurationS = 2,
            PeakDeviationHz = 5000,
        };
        var noisy = clean with { SnrDb = 10, Seed = 42 };
        Complex[] a = Complexes(clean),
            b = Complexes(noisy);
        double noise = a.Zip(b, (x, y) => (y - x).Magnitude * (y - x).Magnitude).Average();
        double signal = a.Average(x => x.Magnitude * x.Magnitude);
        // 200 000 complex Gaussian draws: the power estimate has a relative spread of 1/sqrt(200000) = 0.22 %.
        Assert.Equal(10.0, 10 * Math.Log10(signal / noise), 1);
        Assert.InRange(signal / noise, 10 * 0.99, 10 * 1.01);
        Assert.Equal(0.25, signal, 12);
    }

    [Fact]
    public void Output_does_not_depend_on_block_size()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fsk,
            SampleRateHz = 24000,
            DurationS = 0.3,
            SnrDb = 20,
            Seed = 9,
        };
        var whole = new double[spec.SampleCount * 2];
        new SignalGenerator(spec).Generate(whole);
        var gen = new SignalGenerator(spec);
        var parts = new List<double>();
        var block = new double[2 * 77];
        int n;
        while ((n = gen.Generate(block)) > 0)
            parts.AddRange(block[..(2 * n)]);
        Assert.Equal(whole, parts);
    }

    [Theory]
    [InlineData(nameof(SignalSpec.Amplitude))]
    [InlineData(nameof(SignalSpec.SampleRateHz))]
    [InlineData(nameof(SignalSpec.CarrierOffsetHz))]
    [InlineData(nameof(SignalSpec.AmDepth))]
    public void Invalid_parameters_name_the_setting(string setting)
    {
        SignalSpec bad = setting switch
        {
            nameof(SignalSpec.Amplitude) => new SignalSpec { Amplitude = 1.5 },
            nameof(SignalSpec.SampleRateHz) => new SignalSpec { SampleRateHz = -1 },
            nameof(SignalSpec.CarrierOffsetHz) => new SignalSpec { SampleRateHz = 1000, CarrierOffsetHz = 600 },
            _ => new SignalSpec { Kind = SignalKind.Am, AmDepth = 5 },
        };
        var e = Assert.Throws<SettingException>(() => new SignalGenerator(bad));
        Assert.Equal(setting, e.Setting);
    }

    [Fact]
    public void Extra_FM_tones_add_their_deviations_to_the_instantaneous_frequency()
    {
        // A sub-audible tone under a test tone: f(t) = f0 + D cos(2 pi fm t) + D2 cos(2 pi f2 t), the phase
        // its integral (the formula of SignalSpec): checked sample by sample against the closed form.
        var spec = new SignalSpec
        {
            Kind = SignalKind.Fm,
            SampleRateHz = 48000,
            DurationS = 0.2,
            CarrierOffsetHz = 250,
            PeakDeviationHz = 1900,
            ModulatingFrequencyHz = 1000,
            ExtraTones = [new ExtraTone(118.8, 600)],
            Amplitude = 0.5,
        };
        Complex[] z = Complexes(spec);
        for (int n = 0; n < z.Length; n++)
        {
            double t = n / 48000.0;
            double phase =
                2 * Math.PI * 250 * t
                + 1900 / 1000.0 * Math.Sin(2 * Math.PI * 1000 * t)
                + 600 / 118.8 * Math.Sin(2 * Math.PI * 118.8 * t);
            Assert.True((z[n] - Complex.FromPolarCoordinates(0.5, phase)).Magnitude < 1e-9, $"sample {n}");
        }
    }

    [Fact]
    public void Overmodulated_AM_is_cut_off_at_zero_for_the_expected_share_of_the_cycle()
    {
        // a = A max(0, 1 + m cos wt): for m = 1.5 the envelope is zero while cos wt < -1/m, a share
        // 1 - acos(-1/m)/pi = 0.2677 of the time (closed form).
        var spec = new SignalSpec
        {
            Kind = SignalKind.Am,
            SampleRateHz = 48000,
            DurationS = 1,
            AmDepth = 1.5,
            ModulatingFrequencyHz = 997, // not a divisor of the rate, so the samples spread over the cycle
            Amplitude = 0.3,
        };
        Complex[] z = Complexes(spec);
        double zero = z.Count(c => c.Magnitude == 0) / (double)z.Length;
        Near.Equal(1 - Math.Acos(-1 / 1.5) / Math.PI, zero, 0.002, "share of time at zero");
        Near.Equal(0.3 * 2.5, z.Max(c => c.Magnitude), 1e-4, "peak envelope A (1 + m)");
    }

    [Fact]
    public void OOK_keys_the_carrier_fully_on_and_off_about_half_of_the_time()
    {
        var spec = new SignalSpec
        {
            Kind = SignalKind.Ook,
            SampleRateHz = 48000,
            DurationS = 1,
            SymbolRateBd = 100,
            Amplitude = 0.4,
            CarrierOffsetHz = 2000,
        };
        Complex[] z = Complexes(spec);
        Assert.All(z, c => Assert.True(c.Magnitude < 1e-12 || Math.Abs(c.Magnitude - 0.4) < 1e-12));
        double on = z.Count(c => c.Magnitude > 0.2) / (double)z.Length;
        Assert.InRange(on, 0.35, 0.65); // 100 random bits: a binomial share, 3 sigma = 0.15
        // Symbols last 480 samples: the carrier changes state only on symbol boundaries.
        for (int n = 1; n < z.Length; n++)
            if ((z[n].Magnitude > 0.2) != (z[n - 1].Magnitude > 0.2))
                Assert.Equal(0, n % 480);
    }

    [Fact]
    public void A_spur_and_an_IQ_image_stand_at_their_offsets_and_levels()
    {
        // Bin-centred carrier at +2000 Hz, a spur 12 dB down 1500 Hz above it and the IQ image 28 dB down at
        // -2000 Hz: the DFT bins read A, A 10^(-12/20) and A 10^(-28/20) (the definitions, rectangular window).
        var spec = new SignalSpec
        {
            Kind = SignalKind.Cw,
            SampleRateHz = 8000,
            DurationS = 1,
            CarrierOffsetHz = 2000,
            Amplitude = 0.5,
            Spurs = [new Spur(1500, -12)],
            ImageDbc = -28,
        };
        Complex[] z = Complexes(spec);
        double Bin(double hz) =>
            (
                z.Select((c, n) => c * Complex.FromPolarCoordinates(1, -2 * Math.PI * hz * n / 8000))
                    .Aggregate(Complex.Zero, (a, b) => a + b) / z.Length
            ).Magnitude;
        double carrier = Bin(2000);
        Near.Equal(0.5 * (1 + Math.Pow(10, -28 / 20.0) * 0), carrier, 1e-9, "carrier");
        Near.Equal(-12, 20 * Math.Log10(Bin(3500) / carrier), 0.01, "spur, dBc");
        // The image mirrors the carrier and the spur: conj(z) puts them at -2000 and -3500 Hz.
        Near.Equal(-28, 20 * Math.Log10(Bin(-2000) / carrier), 0.01, "image, dBc");
        Near.Equal(-40, 20 * Math.Log10(Bin(-3500) / carrier), 0.01, "the spur's image, dBc");
    }
}
