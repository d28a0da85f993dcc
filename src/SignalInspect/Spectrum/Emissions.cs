using MathNet.Numerics.Distributions;

namespace SignalInspect.Spectrum;

/// <summary>One emission found in a spectrum: the bins it covers and what it holds.</summary>
/// <param name="FirstBin">Its lowest bin.</param>
/// <param name="LastBin">Its highest bin.</param>
/// <param name="LowHz">Lower edge on the spectrum's axis, Hz.</param>
/// <param name="HighHz">Upper edge, Hz.</param>
/// <param name="CentreHz">Power-weighted centre, Hz.</param>
/// <param name="PeakHz">Its strongest bin's frequency, Hz.</param>
/// <param name="Power">Power above the noise floor, the spectrum's unit times Hz.</param>
/// <param name="SnrDb">That power over the noise in its bins, dB.</param>
public sealed record Emission(
    int FirstBin,
    int LastBin,
    double LowHz,
    double HighHz,
    double CentreHz,
    double PeakHz,
    double Power,
    double SnrDb
)
{
    /// <summary>Width between its edges, Hz.</summary>
    public double WidthHz => HighHz - LowHz;
}

/// <summary>
/// Finds the emissions in a spectrum: the bins standing out of the noise floor (<see cref="NoiseFloor"/>)
/// by a detection threshold, joined into one emission when they touch within a gap, or when they stand
/// as a pair mirrored about an emission's centre (the sidebands of AM and of angle modulation are
/// symmetric; a spur or a neighbour is not). Emissions are returned strongest first.
/// </summary>
public static class EmissionFinder
{
    /// <summary>False-alarm probability per bin of the detection threshold (the chi-square quantile of a bin of
    /// pure noise: a constant-false-alarm-rate threshold).</summary>
    public const double FalseAlarm = 1e-4;

    /// <summary>Bins above the threshold closer than this are one region, Hz (the widest line spacing of voice
    /// modulation: 3 kHz audio), at least <see cref="MinGapBins"/> bins.</summary>
    public const double GapHz = 3500;

    /// <summary>Smallest gap that joins two regions, bins.</summary>
    public const int MinGapBins = 3;

    /// <summary>A region pairs with its mirror when their powers are within this factor (10 dB).</summary>
    public const double MirrorPowerRatio = 10;

    /// <summary>An emission holds at least this SNR in its own bins, dB.</summary>
    public const double MinSnrDb = 6;

    /// <summary>The emissions of <paramref name="psd"/> (density scaling) above a floor of
    /// <paramref name="floor"/>, strongest first.</summary>
    public static IReadOnlyList<Emission> Find(PowerSpectrum psd, double floor)
    {
        ReadOnlySpan<double> v = psd.Values;
        int n = v.Length;
        if (!(floor > 0) || n < 8)
            return [];
        double nu = NoiseFloor.EquivalentDof(psd);
        double threshold = floor * ChiSquared.InvCDF(nu, 1 - FalseAlarm) / nu;
        int gap = Math.Max(MinGapBins, (int)Math.Round(GapHz / psd.BinWidthHz));
        // Regions: runs of bins above the threshold, gaps up to `gap` bridged. A lone bin barely above it is
        // the threshold's own false alarm (one in 1 / FalseAlarm bins of noise), not a part of an emission.
        var regions = new List<(int A, int B)>();
        int start = -1,
            last = -1;
        for (int i = 0; i < n; i++)
        {
            if (v[i] <= threshold)
                continue;
            bool lone = (i == 0 || v[i - 1] <= threshold) && (i == n - 1 || v[i + 1] <= threshold);
            if (lone && v[i] < 2 * threshold)
                continue;
            if (start >= 0 && i - last > gap)
            {
                regions.Add((start, last));
                start = -1;
            }
            if (start < 0)
                start = i;
            last = i;
        }
        if (start >= 0)
            regions.Add((start, last));
        var groups = regions.Select(r => new List<(int A, int B)> { r }).ToList();
        // Mirrored pairs join the group they are symmetric about: the strongest group first.
        bool joined = true;
        while (joined)
        {
            joined = false;
            groups.Sort((x, y) => Power(psd, y, floor).CompareTo(Power(psd, x, floor)));
            for (int g = 0; g < groups.Count && !joined; g++)
            {
                double c = Centre(psd, groups[g], floor);
                for (int a = 0; a < groups.Count && !joined; a++)
                    for (int b = a + 1; b < groups.Count && !joined; b++)
                    {
                        if (a == g || b == g)
                            continue;
                        if (!Mirrored(psd, groups[a], groups[b], c, floor))
                            continue;
                        groups[g].AddRange(groups[a]);
                        groups[g].AddRange(groups[b]);
                        groups.RemoveAt(b);
                        groups.RemoveAt(a);
                        joined = true;
                    }
            }
        }
        var emissions = new List<Emission>();
        foreach (var group in groups)
        {
            int first = group.Min(r => r.A),
                lastBin = group.Max(r => r.B);
            double power = Power(psd, group, floor);
            int bins = 0;
            foreach (var (a, b) in group)
                for (int i = a; i <= b; i++)
                    if (v[i] > threshold)
                        bins++;
            double snr = 10 * Math.Log10(Math.Max(power, 1e-300) / (floor * bins * psd.BinWidthHz));
            if (snr < MinSnrDb)
                continue;
            int peak = first;
            foreach (var (a, b) in group)
                for (int i = a; i <= b; i++)
                    if (v[i] > v[peak])
                        peak = i;
            double half = psd.BinWidthHz / 2;
            emissions.Add(
                new Emission(
                    first,
                    lastBin,
                    psd.FrequenciesHz[first] - half,
                    psd.FrequenciesHz[lastBin] + half,
                    Centre(psd, group, floor),
                    psd.FrequenciesHz[peak],
                    power,
                    snr
                )
            );
        }
        return [.. emissions.OrderByDescending(e => e.Power)];
    }

    /// <summary>Two groups mirrored about <paramref name="centreHz"/>: their centres within a few bins (or half
    /// their width) of symmetric, their powers within <see cref="MirrorPowerRatio"/>.</summary>
    private static bool Mirrored(
        PowerSpectrum psd,
        List<(int A, int B)> x,
        List<(int A, int B)> y,
        double centreHz,
        double floor
    )
    {
        double cx = Centre(psd, x, floor) - centreHz,
            cy = Centre(psd, y, floor) - centreHz;
        if (Math.Sign(cx) == Math.Sign(cy))
            return false;
        double widths = Width(psd, x) + Width(psd, y);
        if (Math.Abs(cx + cy) > Math.Max(4 * psd.BinWidthHz, 0.25 * widths))
            return false;
        double px = Power(psd, x, floor),
            py = Power(psd, y, floor);
        return px > 0 && py > 0 && Math.Max(px, py) <= MirrorPowerRatio * Math.Min(px, py);
    }

    private static double Width(PowerSpectrum psd, List<(int A, int B)> g) =>
        g.Sum(r => r.B - r.A + 1) * psd.BinWidthHz;

    private static double Power(PowerSpectrum psd, List<(int A, int B)> g, double floor)
    {
        double p = 0;
        foreach (var (a, b) in g)
            for (int i = a; i <= b; i++)
                p += Math.Max(0, psd.Values[i] - floor);
        return p * psd.BinWidthHz;
    }

    private static double Centre(PowerSpectrum psd, List<(int A, int B)> g, double floor)
    {
        double num = 0,
            den = 0;
        foreach (var (a, b) in g)
            for (int i = a; i <= b; i++)
            {
                double w = Math.Max(0, psd.Values[i] - floor);
                num += w * psd.FrequenciesHz[i];
                den += w;
            }
        return den > 0 ? num / den : psd.FrequenciesHz[g[0].A];
    }
}
