namespace PulseLadder.Core.Ingest;

internal enum SplitStatus
{
    Ok,
    UnterminatedQuote,
    TextAfterQuote,
}

/// <summary>
/// Splits one CSV line (RFC 4180 quoting: fields may be quoted, a doubled quote inside quotes is one quote, the
/// separator may appear inside quotes; a record never spans lines). Field text goes to a scratch buffer so the hot
/// path allocates nothing; spaces around unquoted fields and around quotes are trimmed.
/// </summary>
internal static class CsvSplitter
{
    /// <summary>Splits into <paramref name="fields"/> (ranges into <paramref name="scratch"/>, which must be at least as long as the line); <paramref name="count"/> is the true field count even beyond the capacity of <paramref name="fields"/>.</summary>
    public static SplitStatus Split(ReadOnlySpan<char> line, char separator, Span<char> scratch, Span<Range> fields, out int count)
    {
        count = 0;
        int pos = 0;
        int w = 0;
        while (true)
        {
            while (pos < line.Length && line[pos] == ' ') pos++;
            int start = w;
            if (pos < line.Length && line[pos] == '"')
            {
                pos++;
                while (true)
                {
                    int q = line[pos..].IndexOf('"');
                    if (q < 0) return SplitStatus.UnterminatedQuote;
                    line.Slice(pos, q).CopyTo(scratch[w..]);
                    w += q;
                    pos += q + 1;
                    if (pos < line.Length && line[pos] == '"')
                    {
                        scratch[w++] = '"';
                        pos++;
                        continue;
                    }
                    break;
                }
                while (pos < line.Length && line[pos] == ' ') pos++;
                if (count < fields.Length) fields[count] = new Range(start, w);
                count++;
                if (pos >= line.Length) return SplitStatus.Ok;
                if (line[pos] != separator) return SplitStatus.TextAfterQuote;
                pos++;
            }
            else
            {
                var rest = line[pos..];
                int s = rest.IndexOf(separator);
                var field = s < 0 ? rest : rest[..s];
                field = field.TrimEnd(' ');
                field.CopyTo(scratch[w..]);
                w += field.Length;
                if (count < fields.Length) fields[count] = new Range(start, w);
                count++;
                if (s < 0) return SplitStatus.Ok;
                pos += s + 1;
            }
        }
    }

    /// <summary>
    /// The separator of a header line: whichever of tab, semicolon, comma occurs most outside quotes; '\0' when none
    /// does. <paramref name="unbalancedQuotes"/> is set when a quote is left open.
    /// </summary>
    public static char DetectSeparator(ReadOnlySpan<char> header, out bool unbalancedQuotes)
    {
        int tabs = 0, semis = 0, commas = 0;
        bool inQuotes = false;
        foreach (char c in header)
        {
            if (c == '"') inQuotes = !inQuotes;
            else if (!inQuotes)
            {
                if (c == '\t') tabs++;
                else if (c == ';') semis++;
                else if (c == ',') commas++;
            }
        }
        unbalancedQuotes = inQuotes;
        if (tabs == 0 && semis == 0 && commas == 0) return '\0';
        if (tabs >= semis && tabs >= commas) return '\t';
        return semis >= commas ? ';' : ',';
    }
}
