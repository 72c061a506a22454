using System.Globalization;

namespace PulseLadder.Core.Reporting;

/// <summary>RFC 4180 cells shared by every CSV PulseLadder writes (exports, <c>analyze --csv</c>).</summary>
public static class CsvText
{
    /// <summary>The cell as written: quoted (inner quotes doubled) when it holds a comma, quote, CR or LF.</summary>
    public static string Cell(string s) =>
        s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"") + "\"" : s;

    /// <summary>A number in invariant culture with round-trip precision; null as the empty cell.</summary>
    public static string Number(double? v) => v is { } x ? x.ToString("R", CultureInfo.InvariantCulture) : "";
}
