namespace SignalInspect.Measure;

/// <summary>What a capture holds, for triage.</summary>
public enum ModulationKind
{
    /// <summary>Noise only: no signal found above the floor.</summary>
    Noise,

    /// <summary>Unmodulated carrier.</summary>
    Cw,

    /// <summary>Amplitude modulation (double sideband, full carrier).</summary>
    Am,

    /// <summary>Frequency modulation (analogue).</summary>
    Fm,

    /// <summary>Phase modulation (analogue).</summary>
    Pm,

    /// <summary>Frequency-shift keying.</summary>
    Fsk,

    /// <summary>On-off keying: the carrier present part of the time, steady while present.</summary>
    Ook,

    /// <summary>None of the classes: envelope and phase both vary (a digital or combined modulation, a carrier keyed
    /// down with phase keying). Measured for its bandwidths only: no carrier (its mean frequency is none), no
    /// designator.</summary>
    Unknown,
}

/// <summary>Names of the modulation kinds as the command line and JSON write them.</summary>
public static class ModulationKindNames
{
    /// <summary>Lower-case name: noise, cw, am, fm, pm, fsk, ook, unknown.</summary>
    public static string Name(this ModulationKind k) => k.ToString().ToLowerInvariant();

    /// <summary>Parses a name.</summary>
    /// <exception cref="SettingException">Not one of the names.</exception>
    public static ModulationKind Parse(string name) =>
        Enum.TryParse(name.Trim(), ignoreCase: true, out ModulationKind k)
        && Enum.IsDefined(k)
        && !int.TryParse(name, out _)
            ? k
            : throw new SettingException("Expect", name, "is not one of am, fm, pm, fsk, cw, noise");
}
