namespace SignalInspect.Measure;

/// <summary>A reverse burst found at the end of a transmission: the sub-audible tone's phase shifted before
/// key-down.</summary>
/// <param name="ShiftDeg">The phase shift, degrees (0 to 180; 180 in common use, 120 on some radios).</param>
/// <param name="DurationS">How long before the window's end the shift lasts, s (a transmission's window ends
/// <see cref="TransmissionFinder.SteadyBeforeKeyDownS"/> before its key-down).</param>
/// <param name="ResolutionS">The duration's resolution, s (the averaging that reads the tone's phase).</param>
public sealed record ReverseBurstResult(double ShiftDeg, double DurationS, double ResolutionS);

/// <summary>
/// Finds a reverse burst: the sub-audible tone's phase, read from the block means of the demodulated frequency by
/// complex demodulation at the tone (<see cref="BlockTone"/>) and an average over whole periods (about 20 ms), is
/// followed against the line fitted to it over the body of the window (which takes out the tone's frequency error); a
/// burst is a stretch reaching the window's end over which the phase stands more than <see cref="MinShiftDeg"/> off the
/// line, the tone still at half its level or more, for at least <see cref="MinDurationS"/>. Key-down itself is not in
/// the window (the transmission's last 10 ms are left out), so the duration reads short by up to that.
/// </summary>
internal static class ReverseBurstFinder
{
    /// <summary>Least phase shift taken for a burst, degrees.</summary>
    public const double MinShiftDeg = 90;

    /// <summary>Shortest burst, s.</summary>
    public const double MinDurationS = 0.04;

    /// <summary>Longest stretch looked at before the end, s (bursts last about 150-200 ms: from memory).</summary>
    public const double LookS = 0.5;

    /// <summary>The burst at the end of <paramref name="freq"/> (block means, Hz, blocks of <paramref name="blockS"/>
    /// s) for a tone at <paramref name="toneHz"/>, or null.</summary>
    public static ReverseBurstResult? Find(double[] freq, double blockS, double toneHz)
    {
        int n = freq.Length;
        while (n > 0 && !double.IsFinite(freq[n - 1]))
            n--;
        int first = 0;
        while (first < n && !double.IsFinite(freq[first]))
            first++;
        // The end looked at: LookS, or half a shorter window (the body before it fits the tone's phase line).
        int look = Math.Min((int)(LookS / blockS), (n - first) / 2);
        if (!(toneHz > 0) || look * blockS < 2 * MinDurationS)
            return null;
        // Average over whole periods of the tone (about 20 ms), which removes the image at twice the tone.
        int periods = Math.Max(1, (int)Math.Round(0.02 * toneHz));
        int m = Math.Max(1, (int)Math.Round(periods / toneHz / blockS));
        var tone = new BlockTone(freq, first, n - 1, blockS, toneHz);
        // The phase and level at each block, over the centred window of m blocks (clipped at the ends).
        (double Phase, double Level) At(int i)
        {
            int a = Math.Max(first, i - m / 2),
                b = Math.Min(n, a + m);
            return tone.Over(Math.Max(first, b - m), b);
        }
        // The body's phase line (unwrapped), from the start to LookS before the end.
        int bodyEnd = n - look;
        double sumT = 0,
            sumP = 0,
            sumTT = 0,
            sumTP = 0,
            previous = 0,
            unwrap = 0;
        var levels = new List<double>();
        int count = 0;
        for (int i = first + m; i < bodyEnd; i += Math.Max(1, m / 4))
        {
            var (p, level) = At(i);
            levels.Add(level);
            double d = p - previous;
            unwrap += d - 2 * Math.PI * Math.Round(d / (2 * Math.PI));
            previous = p;
            sumT += i;
            sumP += unwrap;
            sumTT += (double)i * i;
            sumTP += i * unwrap;
            count++;
        }
        if (count < 8)
            return null;
        double slope = (count * sumTP - sumT * sumP) / (count * sumTT - sumT * sumT),
            intercept = (sumP - slope * sumT) / count;
        levels.Sort();
        double bodyLevel = levels[levels.Count / 2];
        // Walk back from the end while the phase stands off the line with the tone still there.
        var shifts = new List<double>();
        int start = n;
        for (int i = n - 1; i >= bodyEnd; i--)
        {
            var (p, level) = At(i);
            double off = p - (intercept + slope * i);
            off -= 2 * Math.PI * Math.Round(off / (2 * Math.PI));
            if (Math.Abs(off) * 180 / Math.PI < MinShiftDeg || level < 0.5 * bodyLevel)
                break;
            shifts.Add(Math.Abs(off) * 180 / Math.PI);
            start = i;
        }
        // To the window's end (blocks the filters' settling left unmeasured at the end count: the burst goes on).
        double duration = (freq.Length - start) * blockS;
        if (duration < MinDurationS)
            return null;
        shifts.Sort();
        return new ReverseBurstResult(shifts[shifts.Count / 2], duration, m * blockS / 2);
    }
}
