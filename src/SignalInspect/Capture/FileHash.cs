using System.Security.Cryptography;

namespace SignalInspect.Capture;

/// <summary>SHA-256 of files, read in 1 MiB blocks (the runtime's stream overload reads in small ones).</summary>
public static class FileHash
{
    /// <summary>Lower-case hex SHA-256 of the files' bytes, one after another.</summary>
    public static string Sha256(params string[] paths)
    {
        using var sha = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        byte[] buf = new byte[1 << 20];
        foreach (string path in paths)
        {
            using FileStream fs = ByteSource.OpenReadOnly(path);
            int n;
            while ((n = fs.Read(buf)) > 0) sha.AppendData(buf, 0, n);
        }
        return Convert.ToHexStringLower(sha.GetHashAndReset());
    }
}
