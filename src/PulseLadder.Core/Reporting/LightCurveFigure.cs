using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Reporting;

/// <summary>One observation in a light-curve panel: phase in [0, 1) (drawn at phase and phase + 1), corrected magnitude.</summary>
public sealed record PhasedPoint(double Phase, double Mag, bool Rejected, long ObservationId);

/// <summary>One fitted band: points, the Fourier curve sampled at phases 0..2 (201 samples), magnitude range (faint = YMax, drawn at the bottom).</summary>
public sealed record LightCurvePanel(string Band, IReadOnlyList<PhasedPoint> Points, IReadOnlyList<(double Phase, double Mag)> Curve, double YMin, double YMax, double Pad);

/// <summary>What a phased light-curve figure shows, independent of the output format (SVG, PNG).</summary>
/// <param name="EmptyText">Set when the analysis has no fit: the figure is only this sentence.</param>
public sealed record LightCurveModel(string Star, string Title, string? EmptyText, double? PeriodDays, IReadOnlyList<LightCurvePanel> Panels);

/// <summary>
/// Builds the phased light curve of one stored analysis: one panel per fitted band, phase 0 to 2 (each point drawn
/// twice, common practice), phase = (BJD_TDB - PhaseZeroBjd) / P mod 1 of that band's fit. Points are corrected for
/// the fitted observer zero points (mag - offset, as in the fit); points the analysis rejected are flagged. The curve
/// is the stored Fourier series. Magnitudes increase downwards.
/// </summary>
public static class LightCurveFigure
{
    /// <param name="analysis">The stored result (fits, observer offsets, rejections).</param>
    /// <param name="points">The star's observations on BJD_TDB (any order; ids match the rejections).</param>
    public static LightCurveModel Build(StarAnalysis analysis, IReadOnlyList<LightCurvePoint> points)
    {
        ArgumentNullException.ThrowIfNull(analysis);
        ArgumentNullException.ThrowIfNull(points);
        var fits = analysis.Fits.GroupBy(f => f.Band).Select(g => g.First()).OrderBy(f => f.Band, StringComparer.Ordinal).ToList();
        if (fits.Count == 0)
            return new LightCurveModel(analysis.Star, analysis.Star + " phased light curve", $"{analysis.Star}: no light-curve fit ({analysis.Outcome})", null, []);
        var rejected = analysis.Rejections.Select(r => r.ObservationId).Where(id => id != 0).ToHashSet();
        var offsets = analysis.ObserverOffsets.ToDictionary(o => (o.Band, o.Observer), o => o.Offset);
        var panels = new List<LightCurvePanel>();
        foreach (var fit in fits)
        {
            var bandPts = points.Where(p => p.Band == fit.Band)
                .Select(p => new PhasedPoint(Phase(p.Bjd, fit), p.Mag - offsets.GetValueOrDefault((p.Band, p.Observer)), rejected.Contains(p.ObservationId), p.ObservationId))
                .ToList();
            var curve = Enumerable.Range(0, 201).Select(i => (Phase: i / 100.0, Mag: FourierSeries.Evaluate(fit.A0, fit.Cos, fit.Sin, i / 100.0))).ToList();
            var used = bandPts.Where(p => !p.Rejected).Select(p => p.Mag).Concat(curve.Select(c => c.Mag)).ToList();
            double yMin = used.Min(), yMax = used.Max();
            double pad = Math.Max(0.05, 0.08 * (yMax - yMin));
            panels.Add(new LightCurvePanel(fit.Band, bandPts, curve, yMin - pad, yMax + pad, pad));
        }
        double period = fits[0].PeriodDays;
        return new LightCurveModel(analysis.Star, $"{analysis.Star}: P = {period.ToString("R", System.Globalization.CultureInfo.InvariantCulture)} d", null, period, panels);
    }

    private static double Phase(double bjd, BandFit fit)
    {
        double x = (bjd - fit.PhaseZeroBjd) / fit.PeriodDays;
        return x - Math.Floor(x);
    }
}
