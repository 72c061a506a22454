using PulseLadder.Core.Reporting;
using ScottPlot;
using SkiaSharp;

namespace PulseLadder.Web.Export;

/// <summary>
/// PNG renderings (ScottPlot 5 on SkiaSharp) of the same figure models the SVG writers draw: the same points, error
/// bars, fit or relation line, axis ranges (magnitudes inverted: bright up), labels and caption. Sizes are pixels.
/// </summary>
internal static class FigurePng
{
    public const int MinSize = 200, MaxSize = 4000;
    public const int DefaultWidth = 640, DefaultPlHeight = 480, DefaultPanelHeight = 260;

    private static readonly ScottPlot.Color Ink = ScottPlot.Color.FromHex("#224466"), Fit = ScottPlot.Color.FromHex("#cc3333"), Grey = ScottPlot.Color.FromHex("#999999");

    static FigurePng()
    {
        // ScottPlot finds fonts through SkiaSharp's font manager; the NoDependencies native build has none, so
        // register a system DejaVu Sans file when the host has one (Debian: fonts-dejavu-core).
        foreach (var path in new[] { "/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf", "/usr/share/fonts/dejavu/DejaVuSans.ttf" })
        {
            if (!File.Exists(path)) continue;
            Fonts.AddFontFile("DejaVu Sans", path);
            Fonts.Default = "DejaVu Sans";
            break;
        }
    }

    /// <summary>Period-luminosity diagram, <paramref name="width"/> x <paramref name="height"/> pixels.</summary>
    public static byte[] PlDiagram(PlDiagramModel m, int width, int height)
    {
        var plot = new Plot();
        Style(plot);
        if (m.EmptyText is { } empty)
        {
            Empty(plot, empty);
            return plot.GetImageBytes(width, height, ImageFormat.Png);
        }
        if (m.Line is { } l)
        {
            var line = plot.Add.Line(l.X1, l.Y1, l.X2, l.Y2);
            line.Color = Fit;
            line.LineWidth = 1.5f;
        }
        double[] xs = m.Points.Select(p => p.LogP).ToArray(), ys = m.Points.Select(p => p.Mag0).ToArray();
        var bars = plot.Add.ErrorBar(xs, ys, m.Points.Select(p => p.Err).ToArray());
        bars.Color = Ink;
        var dots = plot.Add.Markers(xs, ys, MarkerShape.FilledCircle, 7, Ink);
        _ = dots;
        plot.Title(Wrap(m.Caption, Math.Max(40, width / 8)), size: 12);
        plot.XLabel(m.XLabel, size: 13);
        plot.YLabel(m.YLabel, size: 13);
        // Bright stars up: the bottom edge of the axis is the faint end.
        plot.Axes.SetLimits(m.XMin, m.XMax, m.YMax, m.YMin);
        return plot.GetImageBytes(width, height, ImageFormat.Png);
    }

    /// <summary>Phased light curve: one panel per band stacked top to bottom, each <paramref name="width"/> x (height / panels).</summary>
    public static byte[] LightCurve(LightCurveModel m, int width, int height)
    {
        using var surface = SKSurface.Create(new SKImageInfo(width, height, SKColorType.Rgba8888, SKAlphaType.Premul));
        var canvas = surface.Canvas;
        canvas.Clear(SKColors.White);
        int n = Math.Max(1, m.Panels.Count);
        for (int k = 0; k < n; k++)
        {
            var plot = new Plot();
            Style(plot);
            if (m.EmptyText is { } empty) Empty(plot, empty);
            else Panel(plot, m, m.Panels[k], k);
            int top = (int)Math.Round((double)height * k / n), bottom = (int)Math.Round((double)height * (k + 1) / n);
            // Each panel is rendered alone and pasted: a Plot paints its background over the whole canvas it is given.
            using var panel = SKBitmap.Decode(plot.GetImageBytes(width, bottom - top, ImageFormat.Png));
            canvas.DrawBitmap(panel, 0, top);
        }
        using var image = surface.Snapshot();
        using var data = image.Encode(SKEncodedImageFormat.Png, 100);
        return data.ToArray();
    }

    private static void Panel(Plot plot, LightCurveModel m, LightCurvePanel panel, int index)
    {
        var used = panel.Points.Where(p => !p.Rejected).ToList();
        var rejected = panel.Points.Where(p => p.Rejected).ToList();
        double[] Twice(IEnumerable<double> v) { var a = v.ToArray(); return [.. a, .. a]; }
        if (rejected.Count > 0)
            plot.Add.Markers(Twice(rejected.Select(p => p.Phase)).Select((x, i) => i < rejected.Count ? x : x + 1).ToArray(),
                Twice(rejected.Select(p => p.Mag)), MarkerShape.Eks, 6, Grey);
        if (used.Count > 0)
            plot.Add.Markers(Twice(used.Select(p => p.Phase)).Select((x, i) => i < used.Count ? x : x + 1).ToArray(),
                Twice(used.Select(p => p.Mag)), MarkerShape.FilledCircle, 4, Ink);
        var curve = plot.Add.ScatterLine(panel.Curve.Select(c => c.Phase).ToArray(), panel.Curve.Select(c => c.Mag).ToArray());
        curve.Color = Fit;
        curve.LineWidth = 2;
        if (index == 0) plot.Title(m.Title, size: 13);
        plot.XLabel("phase", size: 12);
        plot.YLabel(panel.Band + " (mag)", size: 12);
        plot.Axes.SetLimits(0, 2, panel.YMax, panel.YMin);
    }

    /// <summary>Breaks a caption into lines of at most about <paramref name="max"/> characters at spaces.</summary>
    internal static string Wrap(string text, int max)
    {
        var lines = new List<string>();
        var line = new System.Text.StringBuilder();
        foreach (var word in text.Split(' '))
        {
            if (line.Length > 0 && line.Length + 1 + word.Length > max) { lines.Add(line.ToString()); line.Clear(); }
            if (line.Length > 0) line.Append(' ');
            line.Append(word);
        }
        if (line.Length > 0) lines.Add(line.ToString());
        return string.Join("\n", lines);
    }

    private static void Style(Plot plot)
    {
        plot.FigureBackground.Color = Colors.White;
        plot.DataBackground.Color = Colors.White;
        plot.Grid.MajorLineColor = Colors.Black.WithAlpha(0.08);
    }

    private static void Empty(Plot plot, string text)
    {
        var t = plot.Add.Text(text, 0.5, 0.5);
        t.LabelFontSize = 14;
        t.LabelAlignment = Alignment.MiddleCenter;
        plot.Axes.SetLimits(0, 1, 0, 1);
        plot.HideGrid();
        plot.Layout.Frameless();
    }
}
