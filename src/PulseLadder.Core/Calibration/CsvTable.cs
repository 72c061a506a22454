using System.Globalization;
using System.Text;

namespace PulseLadder.Core.Calibration;

/// <summary>One problem found while reading a calibration file: 1-based line, column name (or "" for the line).</summary>
public sealed record CalibrationFileError(int Line, string Field, string Message)
{
    /// <summary>File name (without folder) the error is in; "" for text given directly.</summary>
    public string File { get; init; } = "";

    public override string ToString()
    {
        var where = Field.Length == 0 ? $"line {Line}" : $"line {Line}, field '{Field}'";
        return (File.Length == 0 ? "" : File + ", ") + where + ": " + Message;
    }
}

/// <summary>
/// Minimal RFC 4180 reader for the calibration tables: '#' lines and blank lines are comments, the first other line is
/// the header, fields may be double-quoted (a doubled quote inside is a quote). Values are trimmed.
/// </summary>
internal sealed class CsvTable
{
    public required IReadOnlyList<string> Header { get; init; }
    public required IReadOnlyList<CsvRow> Rows { get; init; }

    public static CsvTable Parse(string text, List<CalibrationFileError> errors)
    {
        var rows = new List<CsvRow>();
        string[]? header = null;
        int lineNo = 0;
        using var reader = new StringReader(text);
        while (reader.ReadLine() is { } line)
        {
            lineNo++;
            var trimmed = line.Trim();
            if (trimmed.Length == 0 || trimmed[0] == '#') continue;
            if (!TrySplit(line, out var fields, out var problem))
            {
                errors.Add(new CalibrationFileError(lineNo, "", problem));
                continue;
            }
            if (header is null)
            {
                header = fields;
                continue;
            }
            if (fields.Length != header.Length)
            {
                errors.Add(new CalibrationFileError(lineNo, "", $"expected {header.Length} fields (as the header), found {fields.Length}"));
                continue;
            }
            rows.Add(new CsvRow(lineNo, header, fields));
        }
        if (header is null) errors.Add(new CalibrationFileError(Math.Max(lineNo, 1), "", "no header line"));
        return new CsvTable { Header = header ?? [], Rows = rows };
    }

    private static bool TrySplit(string line, out string[] fields, out string problem)
    {
        var list = new List<string>();
        var sb = new StringBuilder();
        bool quoted = false;
        problem = "";
        for (int i = 0; i < line.Length; i++)
        {
            char c = line[i];
            if (quoted)
            {
                if (c == '"')
                {
                    if (i + 1 < line.Length && line[i + 1] == '"') { sb.Append('"'); i++; }
                    else quoted = false;
                }
                else sb.Append(c);
            }
            else if (c == '"') quoted = true;
            else if (c == ',') { list.Add(sb.ToString().Trim()); sb.Clear(); }
            else sb.Append(c);
        }
        list.Add(sb.ToString().Trim());
        fields = list.ToArray();
        if (quoted) { problem = "unterminated quoted field"; return false; }
        return true;
    }
}

/// <summary>One data row with typed accessors that record errors naming the line and column.</summary>
internal sealed class CsvRow(int line, IReadOnlyList<string> header, string[] fields)
{
    public int Line { get; } = line;

    public bool Has(string column) => IndexOf(column) >= 0;

    private int IndexOf(string column)
    {
        for (int i = 0; i < header.Count; i++)
            if (string.Equals(header[i], column, StringComparison.OrdinalIgnoreCase)) return i;
        return -1;
    }

    public string Text(string column, List<CalibrationFileError> errors, bool required = true)
    {
        int i = IndexOf(column);
        if (i < 0)
        {
            if (required) errors.Add(new CalibrationFileError(Line, column, "column missing from the header"));
            return "";
        }
        var v = fields[i];
        if (required && v.Length == 0) errors.Add(new CalibrationFileError(Line, column, "value required"));
        return v;
    }

    public double Number(string column, List<CalibrationFileError> errors, double? min = null, double? max = null)
        => NumberOrNull(column, errors, min, max, required: true) ?? 0.0;

    public double? NumberOrNull(string column, List<CalibrationFileError> errors, double? min = null, double? max = null, bool required = false)
    {
        var s = Text(column, errors, required);
        if (s.Length == 0) return null;
        if (!double.TryParse(s, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) || !double.IsFinite(v))
        {
            errors.Add(new CalibrationFileError(Line, column, $"'{s}' is not a finite number"));
            return null;
        }
        if (min is { } lo && v < lo) errors.Add(new CalibrationFileError(Line, column, $"{s} is below the allowed minimum {lo.ToString(CultureInfo.InvariantCulture)}"));
        if (max is { } hi && v > hi) errors.Add(new CalibrationFileError(Line, column, $"{s} is above the allowed maximum {hi.ToString(CultureInfo.InvariantCulture)}"));
        return v;
    }
}
