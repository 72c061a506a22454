using System.Globalization;
using System.Security;
using System.Text;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>
/// A period-luminosity diagram of stored results as a standalone SVG figure (pure text, no fonts embedded).
/// Plotted: every analysis with a distance by the most used relation (ties: first id in name order); x = log10 of
/// the period fed to the relation (fundamentalised where applicable), y = extinction-corrected apparent magnitude
/// (or Wesenheit index) of the reported route, error bar = the measurement error of the distance modulus
/// (photometry, period, reddening, [Fe/H]). The line is that relation at its default [Fe/H] shifted by the
/// inverse-variance weighted mean of the plotted distance moduli (weights 1/MuErrStat^2); the caption states it.
/// </summary>
public static class PlDiagramSvg
{
    private const double W = 640, H = 480, Left = 70, Right = 20, Top = 40, Bottom = 60;

    /// <summary>The SVG document, or a small figure saying "no star with a distance" when none qualifies.</summary>
    public static string Write(IReadOnlyList<StarAnalysis> analyses, string title)
    {
        ArgumentNullException.ThrowIfNull(analyses);
        var withDistance = analyses.Where(a => a.Distance is { FailureReason: null }).ToList();
        var ci = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        sb.Append(ci, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{H}\" viewBox=\"0 0 {W} {H}\" font-family=\"sans-serif\" font-size=\"12\">\n");
        sb.Append("<title>").Append(Esc(title)).Append(" period-luminosity diagram</title>\n");
        if (withDistance.Count == 0)
        {
            sb.Append(ci, $"<text x=\"{W / 2}\" y=\"{H / 2}\" text-anchor=\"middle\">{Esc(title)}: no star with a distance</text>\n</svg>\n");
            return sb.ToString();
        }
        string relationId = withDistance.GroupBy(a => a.Distance!.RelationId).OrderByDescending(g => g.Count())
            .ThenBy(g => g.Key, StringComparer.Ordinal).First().Key;
        var pts = withDistance.Where(a => a.Distance!.RelationId == relationId).Select(a => a.Distance!).ToList();
        var names = withDistance.Where(a => a.Distance!.RelationId == relationId).Select(a => a.Star).ToList();
        var rel = pts.Select(p => p.Relation).FirstOrDefault(r => r is not null);
        string band = rel?.BandLabel ?? pts[0].Band;

        double wsum = 0, wmu = 0;
        foreach (var p in pts) { double w = p.MuErrStat > 0 ? 1 / (p.MuErrStat * p.MuErrStat) : 0; wsum += w; wmu += w * p.Mu; }
        double? muMean = wsum > 0 ? wmu / wsum : null;

        double xMin = pts.Min(p => p.LogPUsed), xMax = pts.Max(p => p.LogPUsed);
        double yMin = pts.Min(p => p.ApparentMag0 - p.MuErrMeasurement), yMax = pts.Max(p => p.ApparentMag0 + p.MuErrMeasurement);
        Pad(ref xMin, ref xMax, 0.1);
        Pad(ref yMin, ref yMax, 0.3);
        double X(double v) => Left + (v - xMin) / (xMax - xMin) * (W - Left - Right);
        double Y(double v) => Top + (v - yMin) / (yMax - yMin) * (H - Top - Bottom); // brighter (smaller) up

        sb.Append(ci, $"<clipPath id=\"plot\"><rect x=\"{F(Left)}\" y=\"{F(Top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(H - Top - Bottom)}\"/></clipPath>\n");
        sb.Append(ci, $"<rect x=\"{F(Left)}\" y=\"{F(Top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(H - Top - Bottom)}\" fill=\"none\" stroke=\"black\"/>\n");
        foreach (var t in Ticks(xMin, xMax))
            sb.Append(ci, $"<line x1=\"{F(X(t))}\" y1=\"{F(H - Bottom)}\" x2=\"{F(X(t))}\" y2=\"{F(H - Bottom - 5)}\" stroke=\"black\"/><text x=\"{F(X(t))}\" y=\"{F(H - Bottom + 16)}\" text-anchor=\"middle\">{Num(t)}</text>\n");
        foreach (var t in Ticks(yMin, yMax))
            sb.Append(ci, $"<line x1=\"{F(Left)}\" y1=\"{F(Y(t))}\" x2=\"{F(Left + 5)}\" y2=\"{F(Y(t))}\" stroke=\"black\"/><text x=\"{F(Left - 6)}\" y=\"{F(Y(t) + 4)}\" text-anchor=\"end\">{Num(t)}</text>\n");
        sb.Append(ci, $"<text x=\"{F((Left + W - Right) / 2)}\" y=\"{F(H - 20)}\" text-anchor=\"middle\">log10 P (d)</text>\n");
        sb.Append(ci, $"<text transform=\"translate(18 {F((Top + H - Bottom) / 2)}) rotate(-90)\" text-anchor=\"middle\">{Esc(rel?.IsWesenheit == true ? band + " (reddening-free)" : band + "_0 (extinction-corrected)")} (mag)</text>\n");

        if (rel is not null && muMean is { } mu)
        {
            double fe = rel.FeHDefault;
            sb.Append(ci, $"<line class=\"relation\" x1=\"{F(X(xMin))}\" y1=\"{F(Y(rel.RelationMagnitude(xMin, fe) + mu))}\" x2=\"{F(X(xMax))}\" y2=\"{F(Y(rel.RelationMagnitude(xMax, fe) + mu))}\" stroke=\"#c33\" clip-path=\"url(#plot)\"/>\n");
        }
        for (int i = 0; i < pts.Count; i++)
        {
            var p = pts[i];
            sb.Append(ci, $"<g class=\"star\"><title>{Esc(names[i])}: log P = {Num(p.LogPUsed)}, m0 = {Num(p.ApparentMag0)}, mu = {Num(p.Mu)} +- {Num(p.MuErr)}</title>");
            sb.Append(ci, $"<line x1=\"{F(X(p.LogPUsed))}\" y1=\"{F(Y(p.ApparentMag0 - p.MuErrMeasurement))}\" x2=\"{F(X(p.LogPUsed))}\" y2=\"{F(Y(p.ApparentMag0 + p.MuErrMeasurement))}\" stroke=\"#246\"/>");
            sb.Append(ci, $"<circle cx=\"{F(X(p.LogPUsed))}\" cy=\"{F(Y(p.ApparentMag0))}\" r=\"3\" fill=\"#246\"/></g>\n");
        }
        string caption = muMean is { } m && rel is not null
            ? string.Create(ci, $"{title}: {pts.Count} star(s); line: {relationId} ({rel.Source}) at [Fe/H] = {Num(rel.FeHDefault)}, shifted by the weighted mean mu = {m:F3} mag")
            : string.Create(ci, $"{title}: {pts.Count} star(s), relation {relationId}");
        int other = withDistance.Count - pts.Count;
        if (other > 0) caption += string.Create(ci, $"; {other} star(s) with other relations not shown");
        sb.Append(ci, $"<text x=\"{F(Left)}\" y=\"24\">{Esc(caption)}</text>\n</svg>\n");
        return sb.ToString();
    }

    private static void Pad(ref double lo, ref double hi, double minSpan)
    {
        double span = Math.Max(hi - lo, minSpan);
        double mid = (hi + lo) / 2;
        lo = mid - 0.55 * span;
        hi = mid + 0.55 * span;
    }

    /// <summary>About five ticks at 1, 2 or 5 times a power of ten inside [lo, hi].</summary>
    private static IEnumerable<double> Ticks(double lo, double hi)
    {
        double raw = (hi - lo) / 5, p = Math.Pow(10, Math.Floor(Math.Log10(raw)));
        double step = raw / p < 1.5 ? p : raw / p < 3.5 ? 2 * p : raw / p < 7.5 ? 5 * p : 10 * p;
        for (double t = Math.Ceiling(lo / step) * step; t <= hi + 1e-12; t += step) yield return Math.Round(t / step) * step;
    }

    private static string F(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);

    private static string Num(double v) => Math.Round(v, 3).ToString("0.###", CultureInfo.InvariantCulture);

    // Characters XML 1.0 cannot hold (C0 controls in names of older data) become U+FFFD so the figure stays well-formed.
    private static string Esc(string s) => SecurityElement.Escape(new string(s.Select(ch => char.IsSurrogate(ch) || System.Xml.XmlConvert.IsXmlChar(ch) ? ch : '\uFFFD').ToArray())) ?? "";
}
