using System.Text;

namespace SignalInspect.Capture;

/// <summary>A member of a tar archive: where its bytes lie in the archive file.</summary>
internal sealed record TarMember(string Name, char Type, long DataOffset, long Size);

/// <summary>
/// Lists the members of a POSIX (ustar/pax) or GNU tar archive without extracting anything:
/// readers read a member's bytes in place. Member names that climb out of the archive
/// (<c>../</c>, absolute paths) and links are refused, since a SigMF archive has no use for them.
/// </summary>
internal static class TarArchive
{
    private const int Block = 512;
    private const int MaxNameRecordBytes = 1 << 20;

    public static IReadOnlyList<TarMember> List(string path)
    {
        var members = new List<TarMember>();
        using FileStream fs = ByteSource.OpenReadOnly(path);
        long length = fs.Length;
        var header = new byte[Block];
        long pos = 0;
        string? longName = null;
        while (pos + Block <= length)
        {
            fs.Position = pos;
            fs.ReadExactly(header);
            if (header.All(b => b == 0))
                break;
            if (!ChecksumOk(header))
                throw CaptureException.ForFile(
                    path,
                    pos == 0
                        ? "not a tar archive (a .sigmf file must be a tar archive)"
                        : $"damaged tar header at byte {pos}"
                );
            string name = CString(header, 0, 100);
            string prefix = CString(header, 345, 155);
            if (Encoding.ASCII.GetString(header, 257, 5) == "ustar" && prefix.Length > 0)
                name = prefix + "/" + name;
            long size = ParseOctal(path, header, 124, 12);
            char type = (char)header[156];
            long dataAt = pos + Block;
            if (dataAt + size > length)
                throw CaptureException.ForFile(
                    path,
                    $"tar member '{name}' declares {size} bytes, more than the archive holds (truncated archive?)"
                );
            switch (type)
            {
                case 'x':
                    longName = ReadPaxPath(path, fs, dataAt, size) ?? longName;
                    break;
                case 'L':
                    longName = ReadRecord(path, fs, dataAt, size).TrimEnd('\0');
                    break;
                case 'g':
                    break;
                default:
                    string full = longName ?? name;
                    longName = null;
                    CheckName(path, full, type);
                    if (type is '0' or '\0' or '7')
                        members.Add(new TarMember(full, type, dataAt, size));
                    break;
            }
            pos = dataAt + (size + Block - 1) / Block * Block;
        }
        if (members.Count == 0 && pos == 0)
            throw CaptureException.ForFile(path, "not a tar archive (a .sigmf file must be a tar archive)");
        return members;
    }

    private static void CheckName(string path, string name, char type)
    {
        if (type is '1' or '2')
            throw CaptureException.ForFile(
                path,
                $"tar member '{name}' is a link; links are refused in a SigMF archive"
            );
        string n = name.Replace('\\', '/');
        if (n.StartsWith('/') || (n.Length > 1 && n[1] == ':') || n.Split('/').Contains(".."))
            throw CaptureException.ForFile(
                path,
                $"tar member '{name}' has an unsafe path (absolute or with '..'); refused"
            );
    }

    private static bool ChecksumOk(byte[] h)
    {
        long sum = 0;
        for (int i = 0; i < Block; i++)
            sum += i is >= 148 and < 156 ? (byte)' ' : h[i];
        string field = CString(h, 148, 8).Trim(' ', '\0');
        try
        {
            return field.Length > 0 && Convert.ToInt64(field, 8) == sum;
        }
        catch (FormatException)
        {
            return false;
        }
    }

    private static long ParseOctal(string path, byte[] h, int at, int len)
    {
        if ((h[at] & 0x80) != 0)
        {
            long v = 0;
            for (int i = at + 1; i < at + len; i++)
                v = (v << 8) | h[i];
            if (v < 0)
                throw CaptureException.ForFile(path, "tar member size is negative");
            return v;
        }
        string s = CString(h, at, len).Trim(' ', '\0');
        if (s.Length == 0)
            return 0;
        try
        {
            return Convert.ToInt64(s, 8);
        }
        catch (Exception e) when (e is FormatException or OverflowException or ArgumentException)
        {
            throw CaptureException.ForFile(path, $"tar header has a malformed size field '{s}'");
        }
    }

    private static string ReadRecord(string path, FileStream fs, long at, long size)
    {
        if (size > MaxNameRecordBytes)
            throw CaptureException.ForFile(path, $"tar name record of {size} bytes is too large");
        var buf = new byte[size];
        fs.Position = at;
        fs.ReadExactly(buf);
        return Encoding.UTF8.GetString(buf);
    }

    private static string? ReadPaxPath(string path, FileStream fs, long at, long size)
    {
        string text = ReadRecord(path, fs, at, size);
        string? result = null;
        foreach (string line in text.Split('\n'))
        {
            int space = line.IndexOf(' ');
            if (space < 0)
                continue;
            string kv = line[(space + 1)..];
            if (kv.StartsWith("path=", StringComparison.Ordinal))
                result = kv[5..];
        }
        return result;
    }

    private static string CString(byte[] h, int at, int len)
    {
        int end = Array.IndexOf(h, (byte)0, at, len);
        return Encoding.UTF8.GetString(h, at, (end < 0 ? at + len : end) - at);
    }
}
