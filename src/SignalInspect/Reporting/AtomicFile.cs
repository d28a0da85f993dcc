namespace SignalInspect.Reporting;

/// <summary>
/// Writes output files so that a failure never leaves a half-written file: the content goes to a
/// temporary file in the same folder, which is renamed over the target when complete. An
/// existing target is replaced only when asked.
/// </summary>
public static class AtomicFile
{
    /// <summary>A temporary path beside <paramref name="path"/>, unique to this process and call.</summary>
    public static string TempPathFor(string path)
    {
        string full = Path.GetFullPath(path);
        return Path.Combine(
            Path.GetDirectoryName(full) ?? ".",
            $".{Path.GetFileName(full)}.{Environment.ProcessId}.{Guid.NewGuid():N}.tmp"
        );
    }

    /// <summary>Checks that <paramref name="path"/> may be written: its folder exists, it does not exist unless
    /// <paramref name="overwrite"/>, and what exists there is a regular file (a link is refused; a device such as
    /// /dev/null is written into, never replaced).</summary>
    /// <exception cref="OutputException">The file exists, is a folder or a link, or its folder does not exist.
    /// </exception>
    public static void CheckWritable(string path, bool overwrite)
    {
        string full = Path.GetFullPath(path);
        if (Directory.Exists(full))
            throw OutputException.ForFile(path, "is a folder; give a file name");
        if (new FileInfo(full).LinkTarget is not null)
            throw OutputException.ForFile(path, "is a symbolic link; give the file it points to, or another name");
        if (IsDevice(full))
            return;
        if (File.Exists(full) && !overwrite)
            throw OutputException.Exists(path);
        string? dir = Path.GetDirectoryName(full);
        if (dir is not null && !Directory.Exists(dir))
            throw OutputException.ForFile(path, $"output folder {dir} does not exist");
    }

    /// <summary>A device or kernel file (under /dev or /proc): written into as a stream, never renamed over.</summary>
    private static bool IsDevice(string full) =>
        File.Exists(full)
        && (full.StartsWith("/dev/", StringComparison.Ordinal) || full.StartsWith("/proc/", StringComparison.Ordinal));

    /// <summary>Writes a file atomically.</summary>
    /// <param name="path">Target file.</param>
    /// <param name="overwrite">Replace an existing file.</param>
    /// <param name="write">Writes the content to the stream given.</param>
    /// <exception cref="OutputException">The file exists and <paramref name="overwrite"/> is false, its folder does
    /// not exist, or writing failed (a full device, no permission): the message names the file and the reason,
    /// and nothing is left behind.</exception>
    public static void Write(string path, bool overwrite, Action<Stream> write) => WriteSet([(path, write)], overwrite);

    /// <summary>
    /// Writes several files as one set: every one to its temporary file first, then all renamed; when any write
    /// fails none of the targets is touched (a report without its JSON model would make a rerun refuse).
    /// </summary>
    /// <exception cref="OutputException">As <see cref="Write"/>.</exception>
    public static void WriteSet(IReadOnlyList<(string Path, Action<Stream> Write)> files, bool overwrite)
    {
        foreach (var (path, _) in files)
            CheckWritable(path, overwrite);
        var temps = new List<(string Temp, string Target)>();
        string current = files[0].Path;
        try
        {
            foreach (var (path, write) in files)
            {
                current = path;
                string full = Path.GetFullPath(path);
                if (IsDevice(full))
                {
                    using var device = new FileStream(full, FileMode.Open, FileAccess.Write, FileShare.ReadWrite);
                    write(device);
                    continue;
                }
                string temp = TempPathFor(path);
                temps.Add((temp, full));
                using var fs = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16);
                write(fs);
            }
            foreach (var (temp, target) in temps)
            {
                current = target;
                File.Move(temp, target, overwrite: true);
            }
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw OutputException.ForFile(current, $"cannot be written: {OneLine(e.Message)}");
        }
        finally
        {
            foreach (var (temp, _) in temps)
                if (File.Exists(temp))
                    File.Delete(temp);
        }
    }

    /// <summary>The system's message on one line, without the temporary file's name.</summary>
    private static string OneLine(string message) =>
        System.Text.RegularExpressions.Regex.Replace(message, @"\s+", " ").Trim();
}
