using FsCheck;
using FsCheck.Fluent;
using FsCheck.Xunit;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

// Property: parsers never throw, whatever the text; every accepted row satisfies the documented row checks.
public class ParserPropertyTests
{
    private static readonly PhotometryParseOptions Options = new(TimeScale.JdUtc, 0) { Limits = new IngestLimits(MaxLineLength: 256) };

    [Property(MaxTest = 300)]
    public bool PhotometryCsv_NeverThrows_WhenArbitraryText(string? text)
    {
        var r = PhotometryCsv.Parse(new StringReader(text ?? string.Empty), "p.csv", Options);
        return r.Rows.All(Valid);
    }

    [Property(MaxTest = 300)]
    public bool PhotometryCsv_NeverThrows_WhenArbitraryLinesAfterHeader(string[]? lines)
    {
        var text = "star,time,band,mag,mag_err,observer\n" + string.Join("\n", (lines ?? []).Select(l => l ?? string.Empty));
        var r = PhotometryCsv.Parse(new StringReader(text), "p.csv", Options);
        return r.Rows.All(Valid) && r.Summary.AcceptedRows + r.Summary.RejectedRows <= (lines?.Length ?? 0) + 1;
    }

    [Property(MaxTest = 300)]
    public bool PlainText_NeverThrows_WhenArbitraryText(string? text)
    {
        var r = PlainTextPhotometry.Parse(new StringReader(text ?? string.Empty), "p.dat", "S", "V", Options);
        return r.Rows.All(Valid);
    }

    [Property(MaxTest = 300)]
    public bool StarList_NeverThrows_WhenArbitraryLinesAfterHeader(string[]? lines)
    {
        var text = "star,field,ra_deg,dec_deg,class,ebv\n" + string.Join("\n", (lines ?? []).Select(l => l ?? string.Empty));
        var r = StarListCsv.Parse(new StringReader(text), "s.csv", Options.Limits);
        return r.Rows.All(s => s.Name.Length > 0 && SkyPositionOk(s));
    }

    [Property(MaxTest = 200)]
    public bool PhotometryCsv_AcceptsRow_WhenFieldsValid(NormalFloat mag, PositiveInt errMilli, NonNegativeInt day)
    {
        double m = Math.Clamp(mag.Get, -5, 40);
        double err = Math.Min(errMilli.Get, 5000) / 1000.0;
        double t = 2440000 + day.Get % 40000;
        var line = FormattableString.Invariant($"S1,{t:R},V,{m:R},{err:R}");
        var r = PhotometryCsv.Parse(new StringReader("star,time,band,mag,mag_err\n" + line), "p.csv", Options);
        return r.IsSuccess && r.Rows.Count == 1 && r.Rows[0].Observation.Mag == m && r.Rows[0].Observation.MagErr == err;
    }

    private static bool SkyPositionOk(StarInfo s) => s.Position.RaDeg is >= 0 and < 360 && s.Position.DecDeg is >= -90 and <= 90;

    private static bool Valid(PhotometryRow row)
    {
        var o = row.Observation;
        return row.Star.Length > 0 && Bands.Known.ContainsKey(o.Band) && o.MagErr > 0 && o.MagErr <= 5 && o.Mag is >= -5 and <= 40 &&
               o.Time >= Photometry.TimeScales.MinPlausibleJd && o.Time <= Photometry.TimeScales.MaxPlausibleJd;
    }
}
