using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SignalInspect.Tests;

/// <summary>The instruction sets some tests need, and why they are skipped without them.</summary>
internal static class Hardware
{
    public const string NoAvx2 = "this CPU has no AVX2: the single-precision Welch step is not used here";
    public const string NoAvx512 =
        "this CPU has no 512-bit vectors: the wide kernels are not used here, so there is nothing to compare";

    public static bool HasAvx2 => Avx2.IsSupported;
    public static bool HasWideVectors => Vector512.IsHardwareAccelerated;
}

/// <summary>A fact that is reported as skipped (not passed) on a CPU without AVX2.</summary>
public sealed class Avx2FactAttribute : FactAttribute
{
    public Avx2FactAttribute()
    {
        if (!Hardware.HasAvx2)
            Skip = Hardware.NoAvx2;
    }
}

/// <summary>A theory that is reported as skipped (not passed) on a CPU without AVX2.</summary>
public sealed class Avx2TheoryAttribute : TheoryAttribute
{
    public Avx2TheoryAttribute()
    {
        if (!Hardware.HasAvx2)
            Skip = Hardware.NoAvx2;
    }
}

/// <summary>A fact comparing the 512-bit kernels with the 256-bit ones: skipped where there are no 512-bit
/// vectors.</summary>
public sealed class WideVectorFactAttribute : FactAttribute
{
    public WideVectorFactAttribute()
    {
        if (!Hardware.HasWideVectors)
            Skip = Hardware.NoAvx512;
    }
}

/// <summary>A theory comparing the 512-bit kernels with the 256-bit ones: skipped where there are no 512-bit
/// vectors.</summary>
public sealed class WideVectorTheoryAttribute : TheoryAttribute
{
    public WideVectorTheoryAttribute()
    {
        if (!Hardware.HasWideVectors)
            Skip = Hardware.NoAvx512;
    }
}

/// <summary>A fact that needs a device file (e.g. /dev/full): reported as skipped where the system has none.</summary>
public sealed class DeviceFactAttribute : FactAttribute
{
    public DeviceFactAttribute(string device)
    {
        if (!File.Exists(device))
            Skip = $"this system has no {device}";
    }
}
