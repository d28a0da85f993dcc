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

    /// <summary>Checks that <paramref name="path"/> may be written: its folder exists and it does not exist unless
    /// <paramref name="overwrite"/>.</summary>
    /// <exception cref="OutputException">The file exists, or its folder does not.</exception>
    public static void CheckWritable(string path, bool overwrite)
    {
        string full = Path.GetFullPath(path);
        if (Directory.Exists(full))
            throw OutputException.ForFile(path, "is a folder; give a file name");
        if (File.Exists(full) && !overwrite)
            throw OutputException.Exists(path);
        string? dir = Path.GetDirectoryName(full);
        if (dir is not null && !Directory.Exists(dir))
            throw OutputException.ForFile(path, $"output folder {dir} does not exist");
    }

    /// <summary>Writes a file atomically.</summary>
    /// <param name="path">Target file.</param>
    /// <param name="overwrite">Replace an existing file.</param>
    /// <param name="write">Writes the content to the stream given.</param>
    /// <exception cref="OutputException">The file exists and <paramref name="overwrite"/> is false, or its
    /// folder does not exist.</exception>
    public static void Write(string path, bool overwrite, Action<Stream> write)
    {
        CheckWritable(path, overwrite);
        string temp = TempPathFor(path);
        try
        {
            using (var fs = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16))
            {
                write(fs);
            }
            File.Move(temp, Path.GetFullPath(path), overwrite: true);
        }
        finally
        {
            if (File.Exists(temp))
                File.Delete(temp);
        }
    }
}
