using SignalInspect.Measure;

namespace SignalInspect.Tests.Measure;

/// <summary>47 CFR 2.201-2.202 and ITU Radio Regulations Appendix 1 [R]; vectors as in shared
/// testdata/REFERENCE-VALUES.md.</summary>
public class EmissionDesignatorTests
{
    // 47 CFR 2.202(b)(3): the bandwidth-code examples.
    [Theory]
    [InlineData(0.002, "H002")]
    [InlineData(0.1, "H100")]
    [InlineData(25.3, "25H3")]
    [InlineData(400, "400H")]
    [InlineData(2400, "2K40")]
    [InlineData(6000, "6K00")]
    [InlineData(12500, "12K5")]
    [InlineData(180400, "180K")]
    [InlineData(180500, "181K")]
    [InlineData(180700, "181K")]
    [InlineData(1250000, "1M25")]
    [InlineData(2000000, "2M00")]
    [InlineData(10000000, "10M0")]
    [InlineData(202000000, "202M")]
    [InlineData(5650000000, "5G65")]
    public void Bandwidth_codes_follow_2_202_b_3(double hz, string code) =>
        Assert.Equal(code, EmissionDesignator.BandwidthCode(hz));

    [Fact]
    public void Rounding_up_to_a_thousand_moves_to_the_next_letter() =>
        Assert.Equal("1K00", EmissionDesignator.BandwidthCode(999.7));

    // 47 CFR 2.202(g), worked examples of necessary bandwidth.
    [Theory]
    [InlineData(3000, 5000, "16K0F3E")] // FM telephony, Bn = 2M + 2DK, K = 1
    [InlineData(3000, 2500, "11K0F3E")]
    [InlineData(15000, 75000, "180KF3E")] // FM sound broadcasting
    public void FM_examples(double m, double d, string designator) =>
        Assert.Equal(
            designator,
            EmissionDesignator.Format(ModulationKind.Fm, EmissionDesignator.AngleModulationBandwidthHz(m, d))
        );

    [Theory]
    [InlineData(3000, "6K00A3E")] // AM telephony, Bn = 2M
    [InlineData(4000, "8K00A3E")] // AM sound broadcasting
    public void AM_examples(double m, string designator) =>
        Assert.Equal(designator, EmissionDesignator.Format(ModulationKind.Am, EmissionDesignator.AmBandwidthHz(m)));

    [Fact]
    public void FSK_examples()
    {
        // Frequency-shift telegraphy: B = 100 Bd, D = 85 Hz, K = 1.2 -> 304HF1B (the bandwidth part).
        Assert.Equal("304H", EmissionDesignator.BandwidthCode(EmissionDesignator.FskBandwidthHz(100, 170)));
        // Binary FSK data, 2.4 D + R: R = 1 Mbit/s, D = 0.75 MHz -> 2M80F1D.
        Assert.Equal(
            "2M80F1D",
            EmissionDesignator.Format(ModulationKind.Fsk, EmissionDesignator.FskBandwidthHz(1e6, 1.5e6))
        );
        // CW telegraphy Bn = B K, B = 20, K = 5 -> 100HA1A (the bandwidth part).
        Assert.Equal("100H", EmissionDesignator.BandwidthCode(20 * 5));
    }

    [Fact]
    public void Unmodulated_carrier_is_N0N_and_noise_has_none()
    {
        Assert.Equal("N0N", EmissionDesignator.Format(ModulationKind.Cw, null));
        Assert.Null(EmissionDesignator.Format(ModulationKind.Noise, 1000));
    }
}
