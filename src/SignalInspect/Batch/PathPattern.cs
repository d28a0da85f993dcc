using System.Text.RegularExpressions;

namespace SignalInspect.Batch;

/// <summary>
/// File patterns expanded by the tool, for patterns the shell left as they were (quoted, or a shell without
/// globbing): <c>*</c> (any run of characters within a name) and <c>?</c> (one character) in any part of the path,
/// and <c>**</c> as a whole part for any depth of folders (none included). Hidden names (a leading '.') match only
/// a part that starts with '.' itself, as shells do. <c>**</c> does not follow linked folders.
/// </summary>
public static class PathPattern
{
    /// <summary>The files matching <paramref name="pattern"/>, sorted; empty when none does.</summary>
    public static IReadOnlyList<string> Expand(string pattern)
    {
        string full = pattern.Replace('\\', '/');
        bool rooted = full.StartsWith('/');
        string[] parts = full.Split('/', StringSplitOptions.RemoveEmptyEntries);
        var results = new SortedSet<string>(StringComparer.Ordinal);
        Walk(rooted ? "/" : ".", parts, 0, rooted ? "/" : "", results);
        return [.. results];
    }

    private static void Walk(string dir, string[] parts, int i, string shown, SortedSet<string> results)
    {
        if (i == parts.Length || !Directory.Exists(dir))
            return;
        string part = parts[i];
        bool last = i == parts.Length - 1;
        string Join(string name) => shown.Length == 0 || shown.EndsWith('/') ? shown + name : shown + "/" + name;
        if (part == "**")
        {
            Walk(dir, parts, i + 1, shown, results); // no folder
            // Linked folders are not descended by **: a link to a parent would never end.
            foreach (string sub in Names(dir, directories: true))
                if (!sub.StartsWith('.') && new DirectoryInfo(Path.Combine(dir, sub)).LinkTarget is null)
                    Walk(Path.Combine(dir, sub), parts, i, Join(sub), results);
            return;
        }
        if (part.IndexOfAny(['*', '?']) < 0)
        {
            string next = Path.Combine(dir, part);
            if (last && File.Exists(next))
                results.Add(Join(part));
            else if (!last)
                Walk(next, parts, i + 1, Join(part), results);
            return;
        }
        var re = new Regex(
            "^" + Regex.Escape(part).Replace(@"\*", "[^/]*").Replace(@"\?", "[^/]") + "$",
            RegexOptions.CultureInvariant
        );
        foreach (string name in Names(dir, directories: !last))
            if (re.IsMatch(name) && (!name.StartsWith('.') || part.StartsWith('.')))
            {
                if (last)
                    results.Add(Join(name));
                else
                    Walk(Path.Combine(dir, name), parts, i + 1, Join(name), results);
            }
    }

    private static IEnumerable<string> Names(string dir, bool directories)
    {
        try
        {
            return (directories ? Directory.EnumerateDirectories(dir) : Directory.EnumerateFiles(dir))
                .Select(p => Path.GetFileName(p))
                .ToList();
        }
        catch (Exception e) when (e is UnauthorizedAccessException or IOException)
        {
            return []; // an unreadable folder matches nothing, as in a shell
        }
    }
}
