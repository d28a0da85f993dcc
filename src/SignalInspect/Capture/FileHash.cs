using System.Security.Cryptography;

namespace SignalInspect.Capture;

/// <summary>
/// SHA-256 of files, taken through a memory map a window at a time (<see cref="MappedExtent"/>),
/// or read in 1 MiB blocks where a file cannot be mapped (the runtime's stream overload reads in small ones).
/// </summary>
public static class FileHash
{
    /// <summary>Lower-case hex SHA-256 of the files' bytes, one after another.</summary>
    public static string Sha256(params string[] paths)
    {
        using var sha = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        byte[]? buf = null;
        foreach (string path in paths)
        {
            using FileStream fs = ByteSource.OpenReadOnly(path);
            using MappedExtent? map = MappedExtent.TryOpen(fs, 0, fs.Length);
            if (map is not null)
            {
                for (long at = 0; at < map.Length; at += map.Window)
                    sha.AppendData(map.Get(at, map.Window));
                continue;
            }
            buf ??= new byte[1 << 20];
            int n;
            while ((n = fs.Read(buf)) > 0)
                sha.AppendData(buf, 0, n);
        }
        return Convert.ToHexStringLower(sha.GetHashAndReset());
    }
}
