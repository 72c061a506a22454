using System.Globalization;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>One star on the period-luminosity diagram.</summary>
/// <param name="LogP">log10 of the period fed to the relation (fundamentalised where applicable), days.</param>
/// <param name="Mag0">Extinction-corrected apparent magnitude (or Wesenheit index) of the reported route, mag.</param>
/// <param name="Err">Half-length of the error bar: the measurement error of the distance modulus, mag.</param>
public sealed record PlPoint(string Star, double LogP, double Mag0, double Err, double Mu, double MuErr);

/// <summary>
/// What a period-luminosity figure shows, independent of the output format (SVG, PNG). Axis ranges are padded data
/// ranges; magnitudes grow downwards, so <see cref="YMin"/> (brightest) is drawn at the top.
/// </summary>
/// <param name="EmptyText">Set when no star has a distance: the figure is only this sentence.</param>
/// <param name="Line">The relation shifted by the weighted mean modulus, from (XMin, y1) to (XMax, y2); null without a relation.</param>
public sealed record PlDiagramModel(
    string Title, string? EmptyText, string? RelationId, string XLabel, string YLabel, string Caption,
    IReadOnlyList<PlPoint> Points, double XMin, double XMax, double YMin, double YMax,
    (double X1, double Y1, double X2, double Y2)? Line);

/// <summary>
/// Builds the period-luminosity figure of stored results. Plotted: every analysis with a distance by the most used
/// relation (ties: first id in name order); x = log10 of the period fed to the relation, y = extinction-corrected
/// apparent magnitude (or Wesenheit index) of the reported route, error bar = the measurement error of the distance
/// modulus (photometry, period, reddening, [Fe/H]). The line is that relation at its default [Fe/H] shifted by the
/// inverse-variance weighted mean of the plotted distance moduli (weights 1/MuErrStat^2); the caption states it.
/// </summary>
public static class PlDiagram
{
    public static PlDiagramModel Build(IReadOnlyList<StarAnalysis> analyses, string title)
    {
        ArgumentNullException.ThrowIfNull(analyses);
        var ci = CultureInfo.InvariantCulture;
        var withDistance = analyses.Where(a => a.Distance is { FailureReason: null }).ToList();
        if (withDistance.Count == 0)
            return new PlDiagramModel(title, $"{title}: no star with a distance", null, "log10 P (d)", "mag", "", [], 0, 1, 0, 1, null);
        string relationId = withDistance.GroupBy(a => a.Distance!.RelationId).OrderByDescending(g => g.Count())
            .ThenBy(g => g.Key, StringComparer.Ordinal).First().Key;
        var chosen = withDistance.Where(a => a.Distance!.RelationId == relationId).ToList();
        var pts = chosen.Select(a => a.Distance!).ToList();
        var rel = pts.Select(p => p.Relation).FirstOrDefault(r => r is not null);
        string band = rel?.BandLabel ?? pts[0].Band;

        double wsum = 0, wmu = 0;
        foreach (var p in pts) { double w = p.MuErrStat > 0 ? 1 / (p.MuErrStat * p.MuErrStat) : 0; wsum += w; wmu += w * p.Mu; }
        double? muMean = wsum > 0 ? wmu / wsum : null;

        double xMin = pts.Min(p => p.LogPUsed), xMax = pts.Max(p => p.LogPUsed);
        double yMin = pts.Min(p => p.ApparentMag0 - p.MuErrMeasurement), yMax = pts.Max(p => p.ApparentMag0 + p.MuErrMeasurement);
        Pad(ref xMin, ref xMax, 0.1);
        Pad(ref yMin, ref yMax, 0.3);

        (double, double, double, double)? line = null;
        if (rel is not null && muMean is { } mu)
            line = (xMin, rel.RelationMagnitude(xMin, rel.FeHDefault) + mu, xMax, rel.RelationMagnitude(xMax, rel.FeHDefault) + mu);
        string caption = muMean is { } m && rel is not null
            ? string.Create(ci, $"{title}: {pts.Count} star(s); line: {relationId} ({rel.Source}) at [Fe/H] = {Num(rel.FeHDefault)}, shifted by the weighted mean mu = {m:F3} mag")
            : string.Create(ci, $"{title}: {pts.Count} star(s), relation {relationId}");
        int other = withDistance.Count - pts.Count;
        if (other > 0) caption += string.Create(ci, $"; {other} star(s) with other relations not shown");
        string yLabel = (rel?.IsWesenheit == true ? band + " (reddening-free)" : band + "_0 (extinction-corrected)") + " (mag)";
        var points = chosen.Select(a => new PlPoint(a.Star, a.Distance!.LogPUsed, a.Distance.ApparentMag0, a.Distance.MuErrMeasurement, a.Distance.Mu, a.Distance.MuErr)).ToList();
        return new PlDiagramModel(title, null, relationId, "log10 P (d)", yLabel, caption, points, xMin, xMax, yMin, yMax, line);
    }

    private static void Pad(ref double lo, ref double hi, double minSpan)
    {
        double span = Math.Max(hi - lo, minSpan);
        double mid = (hi + lo) / 2;
        lo = mid - 0.55 * span;
        hi = mid + 0.55 * span;
    }

    /// <summary>About five ticks at 1, 2 or 5 times a power of ten inside [lo, hi].</summary>
    public static IEnumerable<double> Ticks(double lo, double hi)
    {
        double raw = (hi - lo) / 5, p = Math.Pow(10, Math.Floor(Math.Log10(raw)));
        double step = raw / p < 1.5 ? p : raw / p < 3.5 ? 2 * p : raw / p < 7.5 ? 5 * p : 10 * p;
        for (double t = Math.Ceiling(lo / step) * step; t <= hi + 1e-12; t += step) yield return Math.Round(t / step) * step;
    }

    internal static string Num(double v) => Math.Round(v, 3).ToString("0.###", CultureInfo.InvariantCulture);
}
