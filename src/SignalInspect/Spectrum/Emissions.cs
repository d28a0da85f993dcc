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

    /// <summary>Strong lines inside it with no mirror about its centre (frequency on the spectrum's axis, power in
    /// the unit of <see cref="Power"/>): a spur or another carrier within the emission, which no channel filter
    /// takes out.</summary>
    public IReadOnlyList<(double Hz, double Power)> UnmirroredLines { get; init; } = [];
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

    /// <summary>A bin's mirror may miss the other region by half this many bins (a line's main lobe).</summary>
    public const int MirrorWidthBins = 4;

    /// <summary>Two mirrored regions: at least this share of each one's bins mirror into the other.</summary>
    public const double MirrorShare = 0.6;

    /// <summary>An emission holds at least this SNR in its own bins, dB.</summary>
    public const double MinSnrDb = 6;

    /// <summary>The emissions of <paramref name="psd"/> (density scaling) above a floor of
    /// <paramref name="floor"/>, strongest first.</summary>
    public static IReadOnlyList<Emission> Find(PowerSpectrum psd, double floor)
    {
        double nu = NoiseFloor.EquivalentDof(psd);
        return Find(psd, floor, floor * ChiSquared.InvCDF(nu, 1 - FalseAlarm) / nu, MinSnrDb);
    }

    /// <summary>The emissions of <paramref name="psd"/> whose bins stand above <paramref name="threshold"/> (the
    /// caller's detection threshold, e.g. for a max-hold of spectrogram rows), with the noise's mean level
    /// <paramref name="floor"/> in that spectrum and at least <paramref name="minSnrDb"/> in their own bins,
    /// strongest first.</summary>
    public static IReadOnlyList<Emission> Find(PowerSpectrum psd, double floor, double threshold, double minSnrDb)
    {
        ReadOnlySpan<double> v = psd.Values;
        int n = v.Length;
        if (!(floor > 0) || n < 8)
            return [];
        int gap = Math.Max(MinGapBins, (int)Math.Round(GapHz / psd.BinWidthHz));
        // Runs of bins above the threshold (gaps of MinGapBins bridged: one line's main lobe), then regions: runs
        // closer than `gap`. A lone bin barely above the threshold is its own false alarm (one in 1 / FalseAlarm
        // bins of noise), not a part of an emission.
        var runs = new List<(int A, int B)>();
        int start = -1,
            last = -1;
        for (int i = 0; i < n; i++)
        {
            if (v[i] <= threshold)
                continue;
            bool lone = (i == 0 || v[i - 1] <= threshold) && (i == n - 1 || v[i + 1] <= threshold);
            if (lone && v[i] < 2 * threshold)
                continue;
            if (start >= 0 && i - last > MinGapBins)
            {
                runs.Add((start, last));
                start = -1;
            }
            if (start < 0)
                start = i;
            last = i;
        }
        if (start >= 0)
            runs.Add((start, last));
        var groups = new List<List<(int A, int B)>>();
        foreach (var run in runs)
        {
            if (groups.Count > 0 && run.A - groups[^1][^1].B <= gap)
                groups[^1].Add(run);
            else
                groups.Add([run]);
        }
        groups = [.. groups.SelectMany(g => PeelUnmirrored(psd, g, floor))];
        // Mirrored pairs join the group they are symmetric about: the strongest group first.
        bool joined = true;
        while (joined)
        {
            joined = false;
            groups.Sort((x, y) => Power(psd, y, floor).CompareTo(Power(psd, x, floor)));
            for (int g = 0; g < groups.Count && !joined; g++)
            {
                // Only an emission in its own right anchors sidebands (a few bins of noise over the threshold with
                // two emissions placed symmetrically about them do not make one emission of the three).
                if (Snr(psd, groups[g], floor, threshold) < minSnrDb)
                    continue;
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
            double snr = Snr(psd, group, floor, threshold);
            if (snr < minSnrDb)
                continue;
            int peak = first;
            foreach (var (a, b) in group)
                for (int i = a; i <= b; i++)
                    if (v[i] > v[peak])
                        peak = i;
            double half = psd.BinWidthHz / 2;
            double centre = Centre(psd, group, floor);
            var inside = new List<(double, double)>();
            if (group.Count > 2)
            {
                double c = SymmetryCentre(psd, group, floor);
                foreach (var run in group)
                {
                    bool holdsCentre = psd.FrequenciesHz[run.A] <= c && psd.FrequenciesHz[run.B] >= c;
                    if (!holdsCentre && Unmirrored(psd, run, c, floor, power))
                        inside.Add((Centre(psd, [run], floor), Power(psd, [run], floor)));
                }
            }
            emissions.Add(
                new Emission(
                    first,
                    lastBin,
                    psd.FrequenciesHz[first] - half,
                    psd.FrequenciesHz[lastBin] + half,
                    centre,
                    psd.FrequenciesHz[peak],
                    power,
                    snr
                )
                {
                    UnmirroredLines = inside,
                }
            );
        }
        return [.. emissions.OrderByDescending(e => e.Power)];
    }

    /// <summary>A line must stand this far over the floor (peak density, 20 dB) to be taken off a region as another
    /// emission: weaker outer lines of a modulated carrier may lose their mirror to the noise.</summary>
    public const double PeelOverFloor = 100;

    /// <summary>
    /// A region's outermost lines without a mirror about the region's centre of symmetry (a modulated
    /// carrier's sidebands are mirrored: lines of equal power either side; a spur or a neighbour's edge within
    /// <see cref="GapHz"/> is not) are taken off as another emission, from each side until a mirrored line is
    /// reached. A line is taken off when it stands <see cref="PeelOverFloor"/> over the floor and the power at its
    /// mirror is less than 1 / <see cref="MirrorPowerRatio"/> of its own.
    /// </summary>
    private static IEnumerable<List<(int A, int B)>> PeelUnmirrored(
        PowerSpectrum psd,
        List<(int A, int B)> region,
        double floor
    )
    {
        var core = new List<(int A, int B)>(region);
        var low = new List<(int A, int B)>();
        var high = new List<(int A, int B)>();
        double centre = core.Count > 1 ? SymmetryCentre(psd, core, floor) : 0,
            total = Power(psd, region, floor);
        bool peeled = true;
        while (peeled && core.Count > 1)
        {
            peeled = false;
            foreach (bool upper in new[] { true, false })
            {
                if (core.Count < 2)
                    break;
                (int A, int B) run = upper ? core[^1] : core[0];
                var rest = upper ? core.GetRange(0, core.Count - 1) : core.GetRange(1, core.Count - 1);
                bool holdsCentre = psd.FrequenciesHz[run.A] <= centre && psd.FrequenciesHz[run.B] >= centre;
                if (holdsCentre || !Unmirrored(psd, run, centre, floor, total))
                    continue;
                (upper ? high : low).Add(run);
                core = rest;
                peeled = true;
            }
        }
        yield return core;
        if (low.Count > 0)
            yield return low;
        if (high.Count > 0)
            yield return high;
    }

    private static bool Unmirrored(
        PowerSpectrum psd,
        (int A, int B) run,
        double centreHz,
        double floor,
        double groupPower
    )
    {
        ReadOnlySpan<double> v = psd.Values;
        double peak = 0;
        for (int i = run.A; i <= run.B; i++)
            peak = Math.Max(peak, v[i]);
        double power = Power(psd, [run], floor);
        return peak >= PeelOverFloor * floor
            && power >= RelevantShare * groupPower
            && MirrorPowerRatio * MirrorPower(psd, run, centreHz, floor) < power;
    }

    /// <summary>A line weaker than this share of its region's power (60 dB down) is left where it is: a carrier that
    /// weak moves an FM reading by less than a thousandth of its distance (the rounding spurs of an undithered
    /// 16-bit recording, 105-112 dB down, were named as spurs).</summary>
    public const double RelevantShare = 1e-6;

    /// <summary>Lines whose centres and midpoints are tried as a group's centre of symmetry.</summary>
    public const int SymmetryCandidates = 24;

    /// <summary>Power above the floor in the bins of <paramref name="run"/> reflected about
    /// <paramref name="centreHz"/>, widened by two bins either side (the centre's own uncertainty).</summary>
    private static double MirrorPower(PowerSpectrum psd, (int A, int B) run, double centreHz, double floor)
    {
        ReadOnlySpan<double> v = psd.Values;
        double f0 = 2 * centreHz - psd.FrequenciesHz[run.B],
            f1 = 2 * centreHz - psd.FrequenciesHz[run.A];
        if (f1 < psd.FrequenciesHz[0] || f0 > psd.FrequenciesHz[^1])
            return 0;
        int a = Math.Max(0, psd.BinOf(f0) - 2),
            b = Math.Min(v.Length - 1, psd.BinOf(f1) + 2);
        double mirror = 0;
        for (int i = a; i <= b; i++)
            mirror += Math.Max(0, v[i] - floor);
        return mirror * psd.BinWidthHz;
    }

    /// <summary>The centre about which a group's lines are most nearly mirrored: among the lines' own centres and
    /// the midpoints of every pair, the one that leaves the most power with a mirror (the sum over lines of the
    /// lesser of a line's power and its mirror's). A spur inside the group moves the power centroid; it does not
    /// move this.</summary>
    private static double SymmetryCentre(PowerSpectrum psd, List<(int A, int B)> group, double floor)
    {
        double[] at = [.. group.Select(r => Centre(psd, [r], floor))];
        double[] power = [.. group.Select(r => Power(psd, [r], floor))];
        // Candidates from the strongest lines only (the centre of a modulated carrier lies between strong lines).
        int[] strong = [.. Enumerable.Range(0, at.Length).OrderByDescending(k => power[k]).Take(SymmetryCandidates)];
        double best = Centre(psd, group, floor),
            bestScore = -1;
        foreach (int i in strong)
            foreach (int j in strong)
            {
                if (j < i)
                    continue;
                double c = (at[i] + at[j]) / 2,
                    score = 0;
                for (int k = 0; k < at.Length; k++)
                    score += Math.Min(power[k], MirrorPower(psd, group[k], c, floor));
                if (score > bestScore)
                    (best, bestScore) = (c, score);
            }
        return best;
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
        if (Math.Abs(cx + cy) > Math.Max(4 * psd.BinWidthHz, 0.25 * (Width(psd, x) + Width(psd, y))))
            return false;
        // Sidebands are mirror images: most bins of each have their mirror inside the other (to within a line's
        // lobe). A carrier and a keyed data signal placed symmetrically about a third emission are not.
        if (MirrorOverlap(psd, x, y, centreHz) < MirrorShare || MirrorOverlap(psd, y, x, centreHz) < MirrorShare)
            return false;
        double px = Power(psd, x, floor),
            py = Power(psd, y, floor);
        return px > 0 && py > 0 && Math.Max(px, py) <= MirrorPowerRatio * Math.Min(px, py);
    }

    /// <summary>The share of the bins of <paramref name="x"/> whose mirror about <paramref name="centreHz"/> lies in
    /// <paramref name="y"/> (to within <see cref="MirrorWidthBins"/> / 2 bins).</summary>
    private static double MirrorOverlap(
        PowerSpectrum psd,
        List<(int A, int B)> x,
        List<(int A, int B)> y,
        double centreHz
    )
    {
        int slack = MirrorWidthBins / 2,
            hit = 0,
            all = 0;
        foreach (var (a, b) in x)
            for (int i = a; i <= b; i++)
            {
                all++;
                int j = psd.BinOf(2 * centreHz - psd.FrequenciesHz[i]);
                if (y.Any(r => j >= r.A - slack && j <= r.B + slack))
                    hit++;
            }
        return all > 0 ? (double)hit / all : 0;
    }

    /// <summary>A group's power over the noise in its bins above the threshold, dB.</summary>
    private static double Snr(PowerSpectrum psd, List<(int A, int B)> g, double floor, double threshold)
    {
        int bins = 0;
        foreach (var (a, b) in g)
            for (int i = a; i <= b; i++)
                if (psd.Values[i] > threshold)
                    bins++;
        return 10 * Math.Log10(Math.Max(Power(psd, g, floor), 1e-300) / (floor * Math.Max(bins, 1) * psd.BinWidthHz));
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
