using System.Text;

namespace SignalInspect.Diagnostics;

/// <summary>
/// Text from files (metadata descriptions, annotation labels, file names) made safe to print: control characters
/// (C0, DEL, C1), line and paragraph separators and bidirectional overrides are shown as \uXXXX, so a capture cannot
/// move the cursor, recolour the terminal, forge a line of output or reverse the text around it.
/// </summary>
public static class SafeText
{
    /// <summary>The text with every unsafe character escaped as \uXXXX.</summary>
    public static string ForTerminal(string? text)
    {
        if (string.IsNullOrEmpty(text))
            return text ?? string.Empty;
        if (!text.Any(Unsafe))
            return text;
        var b = new StringBuilder(text.Length + 16);
        foreach (char c in text)
            if (Unsafe(c))
                b.Append("\\u").Append(((int)c).ToString("X4", System.Globalization.CultureInfo.InvariantCulture));
            else
                b.Append(c);
        return b.ToString();
    }

    /// <summary>A CSV cell that a spreadsheet will not run as a formula: one starting with =, +, -, @, a tab or a
    /// carriage return gets a leading apostrophe (the usual defence against formula injection).</summary>
    public static string ForSpreadsheet(string text) =>
        text.Length > 0 && text[0] is '=' or '+' or '-' or '@' or '\t' or '\r' ? "'" + text : text;

    /// <summary>A CSV cell (RFC 4180): made safe for a spreadsheet (<see cref="ForSpreadsheet"/>), quoted with its
    /// quotes doubled when it holds a comma, a quote or a line break.</summary>
    public static string CsvCell(string text)
    {
        string t = ForSpreadsheet(text);
        return t.IndexOfAny([',', '"', '\n', '\r']) >= 0 ? "\"" + t.Replace("\"", "\"\"") + "\"" : t;
    }

    private static bool Unsafe(char c) =>
        c < ' '
        || (c >= '\u007f' && c <= '\u009f')
        || c is '\u2028' or '\u2029'
        || (c >= '\u202a' && c <= '\u202e')
        || (c >= '\u2066' && c <= '\u2069');
}
