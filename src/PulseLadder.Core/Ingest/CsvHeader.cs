namespace PulseLadder.Core.Ingest;

/// <summary>The column names of a header line, split exactly as the parsers split it (for upload previews).</summary>
public static class CsvHeader
{
    /// <summary>Names in order, trimmed and unquoted; empty when the line has no separator the parsers accept.</summary>
    public static IReadOnlyList<string> Columns(string headerLine)
    {
        char sep = CsvSplitter.DetectSeparator(headerLine, out _);
        if (sep == '\0') return headerLine.Trim().Length == 0 ? [] : [headerLine.Trim().Trim('"')];
        var names = new List<string>();
        var cur = new System.Text.StringBuilder();
        bool inQuotes = false;
        foreach (char c in headerLine)
        {
            if (c == '"') inQuotes = !inQuotes;
            else if (c == sep && !inQuotes) { names.Add(cur.ToString().Trim()); cur.Clear(); }
            else cur.Append(c);
        }
        names.Add(cur.ToString().Trim());
        return names;
    }
}
