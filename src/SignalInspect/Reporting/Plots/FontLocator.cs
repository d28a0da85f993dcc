namespace SignalInspect.Reporting.Plots;

/// <summary>
/// Finds a TrueType font for plots and reports in the system font folders (DejaVu, Liberation,
/// Noto, Arial ...). Without one, plot labels would silently vanish, so a missing font is an error.
/// </summary>
public static class FontLocator
{
    /// <summary>Font files looked for, in order (regular face, bold face).</summary>
    private static readonly (string Regular, string Bold, string Family)[] Candidates =
    [
        ("DejaVuSans.ttf", "DejaVuSans-Bold.ttf", "DejaVu Sans"),
        ("LiberationSans-Regular.ttf", "LiberationSans-Bold.ttf", "Liberation Sans"),
        ("NotoSans-Regular.ttf", "NotoSans-Bold.ttf", "Noto Sans"),
        ("Arial.ttf", "Arial Bold.ttf", "Arial"),
        ("arial.ttf", "arialbd.ttf", "Arial"),
        ("FreeSans.ttf", "FreeSansBold.ttf", "FreeSans"),
    ];

    private static readonly string[] Folders =
    [
        "/usr/share/fonts",
        "/usr/local/share/fonts",
        "/usr/share/fonts/truetype",
        Path.Combine(Environment.GetFolderPath(Environment.SpecialFolder.UserProfile), ".fonts"),
        Path.Combine(Environment.GetFolderPath(Environment.SpecialFolder.UserProfile), ".local", "share", "fonts"),
        "/Library/Fonts",
        "/System/Library/Fonts",
        Environment.GetFolderPath(Environment.SpecialFolder.Fonts),
    ];

    private static readonly Lazy<(string Regular, string Bold, string Family)?> Found = new(Search);

    /// <summary>The regular and bold font files and the family name.</summary>
    /// <exception cref="InvalidOperationException">No font was found (a one-line message saying what to
    /// install).</exception>
    public static (string RegularPath, string BoldPath, string Family) Require() =>
        Found.Value
        ?? throw new InvalidOperationException(
            "no TrueType font found for plots and reports (looked for DejaVu Sans, Liberation Sans, Noto Sans, Arial "
                + "in the system font folders): install one, e.g. 'apt-get install fonts-dejavu-core'"
        );

    private static (string, string, string)? Search()
    {
        foreach ((string regular, string bold, string family) in Candidates)
        {
            foreach (string folder in Folders.Where(f => !string.IsNullOrEmpty(f) && Directory.Exists(f)))
            {
                string? r = Find(folder, regular);
                if (r is null)
                    continue;
                string b = Find(folder, bold) ?? r;
                return (r, b, family);
            }
        }
        return null;
    }

    private static string? Find(string folder, string file)
    {
        try
        {
            return Directory
                .EnumerateFiles(
                    folder,
                    file,
                    new EnumerationOptions
                    {
                        RecurseSubdirectories = true,
                        IgnoreInaccessible = true,
                        MaxRecursionDepth = 4,
                    }
                )
                .FirstOrDefault();
        }
        catch (IOException)
        {
            return null;
        }
    }
}
