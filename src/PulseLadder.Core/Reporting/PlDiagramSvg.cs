using System.Globalization;
using System.Text;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>The period-luminosity diagram (<see cref="PlDiagram"/>) as a standalone SVG figure (pure text, no fonts embedded).</summary>
public static class PlDiagramSvg
{
    private const double W = 640, H = 480, Left = 70, Right = 20, Top = 40, Bottom = 60;

    /// <summary>The SVG document, or a small figure saying "no star with a distance" when none qualifies.</summary>
    public static string Write(IReadOnlyList<StarAnalysis> analyses, string title) => Write(PlDiagram.Build(analyses, title));

    public static string Write(PlDiagramModel m)
    {
        ArgumentNullException.ThrowIfNull(m);
        var ci = CultureInfo.InvariantCulture;
        var sb = new StringBuilder();
        sb.Append(ci, $"<svg xmlns=\"http://www.w3.org/2000/svg\" width=\"{W}\" height=\"{H}\" viewBox=\"0 0 {W} {H}\" font-family=\"sans-serif\" font-size=\"12\">\n");
        sb.Append("<title>").Append(SvgText.Esc(m.Title)).Append(" period-luminosity diagram</title>\n");
        if (m.EmptyText is { } empty)
        {
            sb.Append(ci, $"<text x=\"{W / 2}\" y=\"{H / 2}\" text-anchor=\"middle\">{SvgText.Esc(empty)}</text>\n</svg>\n");
            return sb.ToString();
        }
        double xMin = m.XMin, xMax = m.XMax, yMin = m.YMin, yMax = m.YMax;
        double X(double v) => Left + (v - xMin) / (xMax - xMin) * (W - Left - Right);
        double Y(double v) => Top + (v - yMin) / (yMax - yMin) * (H - Top - Bottom); // brighter (smaller) up

        sb.Append(ci, $"<clipPath id=\"plot\"><rect x=\"{F(Left)}\" y=\"{F(Top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(H - Top - Bottom)}\"/></clipPath>\n");
        sb.Append(ci, $"<rect x=\"{F(Left)}\" y=\"{F(Top)}\" width=\"{F(W - Left - Right)}\" height=\"{F(H - Top - Bottom)}\" fill=\"none\" stroke=\"black\"/>\n");
        foreach (var t in PlDiagram.Ticks(xMin, xMax))
            sb.Append(ci, $"<line x1=\"{F(X(t))}\" y1=\"{F(H - Bottom)}\" x2=\"{F(X(t))}\" y2=\"{F(H - Bottom - 5)}\" stroke=\"black\"/><text x=\"{F(X(t))}\" y=\"{F(H - Bottom + 16)}\" text-anchor=\"middle\">{PlDiagram.Num(t)}</text>\n");
        foreach (var t in PlDiagram.Ticks(yMin, yMax))
            sb.Append(ci, $"<line x1=\"{F(Left)}\" y1=\"{F(Y(t))}\" x2=\"{F(Left + 5)}\" y2=\"{F(Y(t))}\" stroke=\"black\"/><text x=\"{F(Left - 6)}\" y=\"{F(Y(t) + 4)}\" text-anchor=\"end\">{PlDiagram.Num(t)}</text>\n");
        sb.Append(ci, $"<text x=\"{F((Left + W - Right) / 2)}\" y=\"{F(H - 20)}\" text-anchor=\"middle\">{SvgText.Esc(m.XLabel)}</text>\n");
        sb.Append(ci, $"<text transform=\"translate(18 {F((Top + H - Bottom) / 2)}) rotate(-90)\" text-anchor=\"middle\">{SvgText.Esc(m.YLabel)}</text>\n");
        if (m.Line is { } l)
            sb.Append(ci, $"<line class=\"relation\" x1=\"{F(X(l.X1))}\" y1=\"{F(Y(l.Y1))}\" x2=\"{F(X(l.X2))}\" y2=\"{F(Y(l.Y2))}\" stroke=\"#c33\" clip-path=\"url(#plot)\"/>\n");
        foreach (var p in m.Points)
        {
            sb.Append(ci, $"<g class=\"star\"><title>{SvgText.Esc(p.Star)}: log P = {PlDiagram.Num(p.LogP)}, m0 = {PlDiagram.Num(p.Mag0)}, mu = {PlDiagram.Num(p.Mu)} +- {PlDiagram.Num(p.MuErr)}</title>");
            sb.Append(ci, $"<line x1=\"{F(X(p.LogP))}\" y1=\"{F(Y(p.Mag0 - p.Err))}\" x2=\"{F(X(p.LogP))}\" y2=\"{F(Y(p.Mag0 + p.Err))}\" stroke=\"#246\"/>");
            sb.Append(ci, $"<circle cx=\"{F(X(p.LogP))}\" cy=\"{F(Y(p.Mag0))}\" r=\"3\" fill=\"#246\"/></g>\n");
        }
        sb.Append(ci, $"<text x=\"{F(Left)}\" y=\"24\">{SvgText.Esc(m.Caption)}</text>\n</svg>\n");
        return sb.ToString();
    }

    private static string F(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);
}

internal static class SvgText
{
    // Characters XML 1.0 cannot hold (C0 controls in names of older data) become U+FFFD so the figure stays well-formed.
    public static string Esc(string s) =>
        System.Security.SecurityElement.Escape(new string(s.Select(ch => char.IsSurrogate(ch) || System.Xml.XmlConvert.IsXmlChar(ch) ? ch : '\uFFFD').ToArray())) ?? "";
}
