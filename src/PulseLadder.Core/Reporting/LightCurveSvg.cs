using System.Globalization;
using System.Security;
using System.Text;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>
/// Phased light curve of one stored analysis as a standalone SVG: one panel per fitted band, phase 0 to 2 (each
/// point drawn twice, common practice), phase = (BJD_TDB - PhaseZeroBjd) / P mod 1 of that band's fit. Points are
/// corrected for the fitted observer zero points (mag - offset, as in the fit); points the analysis rejected are
/// drawn as grey crosses. The line is the stored Fourier series. Magnitudes increase downwards.
/// </summary>
public static class LightCurveSvg
{
    private const double W = 640, PanelH = 220, Left = 70, Right = 20, Top = 40, Gap = 40, Bottom = 50;

    /// <param name="analysis">The stored result (fits, observer offsets, rejections).</param>
    /// <param name="points">The star's observations on BJD_TDB (any order; ids match the rejections).</param>
    public static string Write(StarAnalysis analysis, IReadOnlyList<LightCurvePoint> points)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        ArgumentNullException.ThrowIfNull(points);
        var ci = CultureInfo.InvariantCulture;
        var fits = analysis.Fits.GroupBy(f => f.Band).Select(g => g.First()).OrderBy(f => f.Band, StringComparer.Ordinal).ToList();
        double h = Top + Bottom + Math.Max(1, fits.Count) * PanelH + Math.Max(0, fits.Count - 1) * Gap;
        var sb = new StringBuilder();
        sb.Append(ci, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{F(h)}\" viewBox=\"0 0 {W} {F(h)}\" font-family=\"sans-serif\" font-size=\"12\">\n");
        sb.Append("<title>").Append(Esc(analysis.Star)).Append(" phased light curve</title>\n");
        if (fits.Count == 0)
        {
            sb.Append(ci, $"<text x=\"{W / 2}\" y=\"{F(h / 2)}\" text-anchor=\"middle\">{Esc(analysis.Star)}: no light-curve fit ({Esc(analysis.Outcome)})</text>\n</svg>\n");
            return sb.ToString();
        }
        var rejected = analysis.Rejections.Select(r => r.ObservationId).Where(id => id != 0).ToHashSet();
        var offsets = analysis.ObserverOffsets.ToDictionary(o => (o.Band, o.Observer), o => o.Offset);
        double period = fits[0].PeriodDays;
        sb.Append(ci, $"<text x=\"{F(Left)}\" y=\"24\">{Esc(analysis.Star)}: P = {period.ToString("R", ci)} d</text>\n");

        for (int k = 0; k < fits.Count; k++)
        {
            var fit = fits[k];
            double top = Top + k * (PanelH + Gap), bottom = top + PanelH;
            var bandPts = points.Where(p => p.Band == fit.Band)
                .Select(p => (Phase: Phase(p.Bjd, fit), Mag: p.Mag - offsets.GetValueOrDefault((p.Band, p.Observer)), Rejected: rejected.Contains(p.ObservationId), p.ObservationId))
                .ToList();
            var curve = Enumerable.Range(0, 201).Select(i => (Phase: i / 100.0, Mag: FourierSeries.Evaluate(fit.A0, fit.Cos, fit.Sin, i / 100.0))).ToList();
            var used = bandPts.Where(p => !p.Rejected).Select(p => p.Mag).Concat(curve.Select(c => c.Mag)).ToList();
            double yMin = used.Min(), yMax = used.Max();
            double pad = Math.Max(0.05, 0.08 * (yMax - yMin));
            yMin -= pad; yMax += pad;
            double X(double ph) => Left + ph / 2 * (W - Left - Right);
            double Y(double m) => top + (Math.Clamp(m, yMin, yMax) - yMin) / (yMax - yMin) * PanelH;

            sb.Append(ci, $"<g class=\"band\" data-band=\"{Esc(fit.Band)}\">\n");
            sb.Append(ci, $"<rect x=\"{F(Left)}\" y=\"{F(top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(PanelH)}\" fill=\"none\" stroke=\"black\"/>\n");
            for (double t = 0; t <= 2.0001; t += 0.5)
                sb.Append(ci, $"<line x1=\"{F(X(t))}\" y1=\"{F(bottom)}\" x2=\"{F(X(t))}\" y2=\"{F(bottom - 5)}\" stroke=\"black\"/><text x=\"{F(X(t))}\" y=\"{F(bottom + 15)}\" text-anchor=\"middle\">{t.ToString("0.0", ci)}</text>\n");
            foreach (var t in new[] { yMin + pad, (yMin + yMax) / 2, yMax - pad })
                sb.Append(ci, $"<text x=\"{F(Left - 6)}\" y=\"{F(Y(t) + 4)}\" text-anchor=\"end\">{t.ToString("0.00", ci)}</text>\n");
            sb.Append(ci, $"<text transform=\"translate(18 {F((top + bottom) / 2)}) rotate(-90)\" text-anchor=\"middle\">{Esc(fit.Band)} (mag)</text>\n");
            foreach (var p in bandPts)
            {
                foreach (var ph in new[] { p.Phase, p.Phase + 1 })
                {
                    if (p.Rejected)
                        sb.Append(ci, $"<path class=\"rejected\" d=\"M{F(X(ph) - 2)} {F(Y(p.Mag) - 2)}l4 4m0 -4l-4 4\" stroke=\"#999\"/>\n");
                    else
                        sb.Append(ci, $"<circle class=\"point\" cx=\"{F(X(ph))}\" cy=\"{F(Y(p.Mag))}\" r=\"1.8\" fill=\"#246\"/>\n");
                }
            }
            sb.Append("<polyline class=\"fit\" fill=\"none\" stroke=\"#c33\" points=\"");
            sb.AppendJoin(' ', curve.Select(c => F(X(c.Phase)) + "," + F(Y(c.Mag))));
            sb.Append("\"/>\n</g>\n");
        }
        sb.Append(ci, $"<text x=\"{F((Left + W - Right) / 2)}\" y=\"{F(h - 15)}\" text-anchor=\"middle\">phase</text>\n</svg>\n");
        return sb.ToString();
    }

    private static double Phase(double bjd, BandFit fit)
    {
        double x = (bjd - fit.PhaseZeroBjd) / fit.PeriodDays;
        return x - Math.Floor(x);
    }

    private static string F(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);

    // Characters XML 1.0 cannot hold (C0 controls in names of older data) become U+FFFD so the figure stays well-formed.
    private static string Esc(string s) => SecurityElement.Escape(new string(s.Select(ch => char.IsSurrogate(ch) || System.Xml.XmlConvert.IsXmlChar(ch) ? ch : '\uFFFD').ToArray())) ?? "";
}
