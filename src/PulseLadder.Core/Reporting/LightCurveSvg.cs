using System.Globalization;
using System.Text;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>
/// The phased light curve (<see cref="LightCurveFigure"/>) as a standalone SVG: one panel per fitted band, phase 0
/// to 2; rejected points are grey crosses, the line is the stored Fourier series. Magnitudes increase downwards.
/// </summary>
public static class LightCurveSvg
{
    private const double W = 640, PanelH = 220, Left = 70, Right = 20, Top = 40, Gap = 40, Bottom = 50;

    /// <param name="analysis">The stored result (fits, observer offsets, rejections).</param>
    /// <param name="points">The star's observations on BJD_TDB (any order; ids match the rejections).</param>
    public static string Write(StarAnalysis analysis, IReadOnlyList<LightCurvePoint> points) => Write(LightCurveFigure.Build(analysis, points));

    public static string Write(LightCurveModel m)
    {
        ArgumentNullException.ThrowIfNull(m);
        var ci = CultureInfo.InvariantCulture;
        int n = m.Panels.Count;
        double h = Top + Bottom + Math.Max(1, n) * PanelH + Math.Max(0, n - 1) * Gap;
        var sb = new StringBuilder();
        sb.Append(ci, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{F(h)}\" viewBox=\"0 0 {W} {F(h)}\" font-family=\"sans-serif\" font-size=\"12\">\n");
        sb.Append("<title>").Append(SvgText.Esc(m.Star)).Append(" phased light curve</title>\n");
        if (m.EmptyText is { } empty)
        {
            sb.Append(ci, $"<text x=\"{W / 2}\" y=\"{F(h / 2)}\" text-anchor=\"middle\">{SvgText.Esc(empty)}</text>\n</svg>\n");
            return sb.ToString();
        }
        sb.Append(ci, $"<text x=\"{F(Left)}\" y=\"24\">{SvgText.Esc(m.Title)}</text>\n");
        for (int k = 0; k < n; k++)
        {
            var panel = m.Panels[k];
            double top = Top + k * (PanelH + Gap), bottom = top + PanelH;
            double yMin = panel.YMin, yMax = panel.YMax, pad = panel.Pad;
            double X(double ph) => Left + ph / 2 * (W - Left - Right);
            double Y(double mag) => top + (Math.Clamp(mag, yMin, yMax) - yMin) / (yMax - yMin) * PanelH;

            sb.Append(ci, $"<g class=\"band\" data-band=\"{SvgText.Esc(panel.Band)}\">\n");
            sb.Append(ci, $"<rect x=\"{F(Left)}\" y=\"{F(top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(PanelH)}\" fill=\"none\" stroke=\"black\"/>\n");
            for (double t = 0; t <= 2.0001; t += 0.5)
                sb.Append(ci, $"<line x1=\"{F(X(t))}\" y1=\"{F(bottom)}\" x2=\"{F(X(t))}\" y2=\"{F(bottom - 5)}\" stroke=\"black\"/><text x=\"{F(X(t))}\" y=\"{F(bottom + 15)}\" text-anchor=\"middle\">{t.ToString("0.0", ci)}</text>\n");
            foreach (var t in new[] { yMin + pad, (yMin + yMax) / 2, yMax - pad })
                sb.Append(ci, $"<text x=\"{F(Left - 6)}\" y=\"{F(Y(t) + 4)}\" text-anchor=\"end\">{t.ToString("0.00", ci)}</text>\n");
            sb.Append(ci, $"<text transform=\"translate(18 {F((top + bottom) / 2)}) rotate(-90)\" text-anchor=\"middle\">{SvgText.Esc(panel.Band)} (mag)</text>\n");
            foreach (var p in panel.Points)
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
            sb.AppendJoin(' ', panel.Curve.Select(c => F(X(c.Phase)) + "," + F(Y(c.Mag))));
            sb.Append("\"/>\n</g>\n");
        }
        sb.Append(ci, $"<text x=\"{F((Left + W - Right) / 2)}\" y=\"{F(h - 15)}\" text-anchor=\"middle\">phase</text>\n</svg>\n");
        return sb.ToString();
    }

    private static string F(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);
}
