using System.Globalization;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Classification;

/// <summary>A class with its reasons. Source: "star_list", "reviewer" or "suggested".</summary>
public sealed record ClassSuggestion(PulsatorClass Class, double Confidence, IReadOnlyList<string> Reasons, string Source);

/// <summary>Another star of the same field, for the period-luminosity position (class as declared, reviewed or suggested).</summary>
public sealed record FieldStar(string Name, PulsatorClass Class, double PeriodDays, string Band, double IntensityMeanMag);

/// <summary>
/// The field's period-luminosity relation in one band, fitted to its fundamental-mode classical Cepheids:
/// m = ZeroPoint + Slope log10 P (apparent intensity-mean magnitudes, days). Scatter is the robust (1.4826 MAD)
/// width about the line, at least 0.05 mag; Count the stars kept after clipping, Rejected those clipped.
/// SlopeSource: "fitted" (free slope), or the id of the registry relation whose slope was held fixed.
/// </summary>
public sealed record FieldPlLine(string Band, double ZeroPoint, double Slope, string SlopeSource, double Scatter, int Count, int Rejected);

/// <summary>
/// The other stars of a field (same distance and similar reddening), for the PL-plane test. Either the stars
/// (<see cref="Stars"/>; the lines are fitted from them on use) or, as stored with an analysis so a rerun
/// reproduces the class, the fitted lines themselves (<see cref="Lines"/>) with the hash of the star set.
/// </summary>
public sealed record FieldContext(IReadOnlyList<FieldStar> Stars)
{
    /// <summary>
    /// Fewest fundamental-mode Cepheids in one band, after clipping, for the PL position to be used: a median zero
    /// point from 5 stars with the ~0.1-0.2 mag intrinsic width of optical and near-infrared PL relations is good to
    /// ~0.1 mag, far below the 1.5-2.2 mag that separate Type II from classical Cepheids, and 5 is the fewest for
    /// which the MAD scale still tolerates one contaminating star.
    /// </summary>
    public const int MinStars = 5;

    /// <summary>The fitted lines, when given directly (a stored context); null: fit them from <see cref="Stars"/>.</summary>
    public IReadOnlyList<FieldPlLine>? Lines { get; init; }

    /// <summary>SHA-256 over the star set the lines were fitted to (name, class, band, period, magnitude); "" when unknown.</summary>
    public string StarSetHash { get; init; } = "";

    /// <summary>Number of distinct stars in the set the lines were fitted to.</summary>
    public int StarCount { get; init; }

    /// <summary>The field's PL lines: <see cref="Lines"/> if set, else fitted from <see cref="Stars"/> (<see cref="FieldPl.Fit"/>).</summary>
    public IReadOnlyList<FieldPlLine> PlLines() => Lines ?? FieldPl.Fit(Stars);

    /// <summary>The context reduced to its fitted lines and star-set hash: what an analysis stores.</summary>
    public FieldContext Compact() => new([]) { Lines = PlLines(), StarSetHash = StarSetHash.Length > 0 ? StarSetHash : FieldPl.HashOf(Stars), StarCount = StarCount > 0 ? StarCount : Stars.Select(s => s.Name).Distinct(StringComparer.Ordinal).Count() };
}

/// <summary>Stage "classify".</summary>
public static class Classifier
{
    /// <summary>False-alarm probability above which the best peak is not taken as real variability.</summary>
    internal const double MaxFap = 0.01;

    /// <summary>
    /// Class of the star: the reviewer's choice wins (source "reviewer"), then the star list's declared class
    /// ("star_list"), else a rule-based suggestion ("suggested") from the period, the peak-to-peak amplitude and the
    /// Fourier parameters R21/phi21/R31 of the best band (I preferred, then V), each rule adding a reason a reviewer
    /// can read. No PL-plane position is used here (the light-curve class); Type II versus classical Cepheids at the
    /// same period is therefore decided only for RV Tau-like double-wave curves, otherwise the suggestion is a
    /// classical Cepheid with the Type II alternative stated and the confidence capped. The field PL pass
    /// (<see cref="Pipeline.FieldPass"/>) adds the PL position later through the overload taking a
    /// <see cref="FieldContext"/>. Never throws; missing inputs lower the confidence. See docs/light-curves.md for the
    /// thresholds and their origin.
    /// </summary>
    public static ClassSuggestion Classify(StarInfo star, PeriodEstimate? period, PeriodSearchResult? search, IReadOnlyList<BandFit> fits, PulsatorClass? reviewerClass)
        => Classify(star, period, search, fits, reviewerClass, null);

    /// <summary>
    /// As <see cref="Classify(StarInfo, PeriodEstimate?, PeriodSearchResult?, IReadOnlyList{BandFit}, PulsatorClass?)"/>,
    /// adding the star's position in its field's period-luminosity plane when <paramref name="field"/> holds at
    /// least <see cref="FieldContext.MinStars"/> fundamental-mode classical Cepheids measured in the same band.
    /// </summary>
    public static ClassSuggestion Classify(StarInfo star, PeriodEstimate? period, PeriodSearchResult? search, IReadOnlyList<BandFit> fits, PulsatorClass? reviewerClass, FieldContext? field)
    {
        if (reviewerClass is { } rc && rc != PulsatorClass.Unknown)
            return new ClassSuggestion(rc, 1.0, ["class set by the reviewer: " + rc.ToCode()], "reviewer");
        if (star.DeclaredClass is { } dc && dc != PulsatorClass.Unknown)
            return new ClassSuggestion(dc, 1.0, ["class declared in the star list: " + dc.ToCode()], "star_list");
        return Suggest(period, search, fits ?? [], field);
    }

    private static string F(double v, string fmt = "0.###") => v.ToString(fmt, CultureInfo.InvariantCulture);

    internal static ClassSuggestion Suggest(PeriodEstimate? period, PeriodSearchResult? search, IReadOnlyList<BandFit> fits, FieldContext? field)
    {
        var reasons = new List<string>();
        // A period chosen by the reviewer stands even where the automatic search found nothing significant.
        bool reviewerPeriod = period?.Method == "reviewer" && period.PeriodDays > 0 && double.IsFinite(period.PeriodDays);
        if (reviewerPeriod) reasons.Add("period chosen by the reviewer");
        if (!reviewerPeriod && search?.FailureReason is { } failure)
        {
            if (failure == "no_significant_period")
                return new ClassSuggestion(PulsatorClass.NotVariable, 0.7, ["period search found no significant period"], "suggested");
            return new ClassSuggestion(PulsatorClass.Unknown, 0.0, ["period search failed: " + failure + "; no class suggested"], "suggested");
        }
        double? p = period is { PeriodDays: > 0 } pe && double.IsFinite(pe.PeriodDays) ? pe.PeriodDays : null;
        if (p is null)
            return new ClassSuggestion(PulsatorClass.Unknown, 0.0, ["no period available; no class suggested"], "suggested");
        double P = p.Value;

        var peakFap = search?.Peaks is { Count: > 0 } peaks ? peaks[0].Fap : null;
        if (!reviewerPeriod && peakFap is { } fap && fap > MaxFap)
            return new ClassSuggestion(PulsatorClass.NotVariable, 0.6,
                [$"best peak false-alarm probability {F(fap, "0.###")} > {F(MaxFap)}: variability not established"], "suggested");

        var band = PickBand(fits);
        if (band is null)
        {
            reasons.Add("no light-curve fit: class from the period alone");
        }
        else
        {
            double amp = band.Amplitude;
            double ampV = amp / VRatio(band.Band);
            reasons.Add($"band {band.Band}: amplitude {F(amp, "0.000")} mag (~{F(ampV, "0.00")} in V), {band.Points} points");
            bool tiny = amp < 0.02 || (band.AmplitudeErr > 0 && amp < 4 * band.AmplitudeErr);
            if (tiny)
            {
                reasons.Add($"amplitude {F(amp, "0.000")} +- {F(band.AmplitudeErr, "0.000")} mag is below 0.02 mag or 4 sigma: not variable at this precision");
                return new ClassSuggestion(PulsatorClass.NotVariable, 0.6, reasons, "suggested");
            }
        }
        reasons.Insert(0, $"period {F(P, "0.######")} d (log P = {F(Math.Log10(P), "0.000")})");
        if (peakFap is { } fapShown && !reviewerPeriod) reasons.Add($"best peak false-alarm probability {F(fapShown, "0.0E+0")}");

        var (cls, conf) = P switch
        {
            < 0.2 => Other(reasons, "period below 0.2 d: shorter than RR Lyrae and Cepheids (delta Scuti / SX Phe or other)"),
            < 1.0 => RRLyrae(P, band, reasons),
            <= 100 => Cepheid(P, band, reasons, field),
            _ => Other(reasons, "period above 100 d: beyond the Cepheid range (Mira / semiregular or other)"),
        };
        if (band is null) conf = Math.Min(conf, 0.4);
        else if (band.Flags.Contains("poor_phase_coverage")) { conf *= 0.8; reasons.Add("poor phase coverage lowers the confidence"); }
        return new ClassSuggestion(cls, Math.Round(Math.Clamp(conf, 0, 1), 3), reasons, "suggested");
    }

    private static (PulsatorClass, double) Other(List<string> reasons, string why)
    {
        reasons.Add(why);
        return (PulsatorClass.OtherVariable, 0.6);
    }

    // I and V carry the thresholds below; SDSS i and r are their nearest neighbours.
    private static readonly string[] PreferredBands = ["I", "V", "i", "r"];

    /// <summary>Own Fourier fit of I, else V, i, r, else the band with most points; template fits only as a last resort.</summary>
    private static BandFit? PickBand(IReadOnlyList<BandFit> fits)
    {
        var own = fits.Where(f => f.Model == "fourier" && f.Order >= 1).ToList();
        var pool = own.Count > 0 ? own : fits.Where(f => f.Points > 0).ToList();
        if (pool.Count == 0) return null;
        foreach (var preferred in PreferredBands)
            if (pool.FirstOrDefault(f => f.Band == preferred) is { } hit) return hit;
        return pool.OrderByDescending(f => f.Points).First();
    }

    /// <summary>
    /// Approximate amplitude ratio A_band / A_V of pulsating stars (from memory, common practice: I ~0.6, near-IR
    /// 0.3-0.4); used only to put thresholds on a V scale.
    /// </summary>
    internal static double VRatio(string band) => band switch
    {
        "U" or "u" => 1.5,
        "B" => 1.4,
        "g" => 1.2,
        "V" => 1.0,
        "R" or "r" => 0.8,
        "I" or "i" => 0.6,
        "z" => 0.55,
        "J" => 0.4,
        "H" or "K" or "Ks" => 0.3,
        _ => 1.0,
    };

    private static bool IsRedBand(string band) => band is "I" or "i" or "z" or "J" or "H" or "K" or "Ks";

    // RR Lyrae: period, R21 and the Bailey diagram (amplitude vs log P). Thresholds: SCIENCE.md 2.4 table
    // (RRab 0.45-1.0 d, R21 0.40-0.55; RRc 0.2-0.45 d, R21 0.05-0.25) and the LMC OGLE-III stars in tests/data/open.
    private static (PulsatorClass, double) RRLyrae(double P, BandFit? band, List<string> reasons)
    {
        double ab = 0, c = 0;
        if (P < 0.40) { c += 2; reasons.Add("period < 0.40 d: RRc range"); }
        else if (P >= 0.48) { ab += 2; reasons.Add("period >= 0.48 d: RRab range"); }
        else reasons.Add("period 0.40-0.48 d: RRab and RRc overlap");
        if (band?.R21 is { } r21)
        {
            if (r21 < 0.25) { c += 1.5; reasons.Add($"R21 = {F(r21, "0.000")} < 0.25: near-sinusoidal (RRc-like)"); }
            else if (r21 > 0.32) { ab += 1.5; reasons.Add($"R21 = {F(r21, "0.000")} > 0.32: skewed curve (RRab-like)"); }
        }
        if (band is not null)
        {
            double ampV = band.Amplitude / VRatio(band.Band);
            // Bailey diagram, Oosterhoff I RRab locus (approx., from memory): A_V ~ -2.5 log P - 0.25 ... 1.3 at 0.5 d.
            if (ampV > 0.75) { ab += 1; reasons.Add("amplitude above 0.75 mag (V): RRab side of the Bailey diagram"); }
            else if (ampV < 0.6 && P < 0.45) { c += 0.5; reasons.Add("amplitude below 0.6 mag (V) at short period: RRc side of the Bailey diagram"); }
        }
        if (P > 0.8) reasons.Add("period above 0.8 d: long for an RR Lyrae (BL Her / anomalous Cepheid possible)");
        var cls = ab >= c ? PulsatorClass.RRLyraeAB : PulsatorClass.RRLyraeC;
        double conf = 0.5 + 0.1 * Math.Abs(ab - c);
        if (P > 0.8) conf -= 0.2;
        return (cls, Math.Min(conf, 0.9));
    }

    // Cepheids: F vs 1O from period, R21 and amplitude (SCIENCE.md 2.4 table; I-band values checked on the OGLE-III
    // LMC stars in tests/data/open: F R21(I) 0.17-0.53 with R21 > 0.33 below 8 d, 1O R21(I) 0.09-0.24, 1O periods
    // below ~6 d). Type II from what one light curve can show: an RV Tau-like double wave (R21 > 0.6) or irregular
    // cycles (residuals far above the errors) at P > 20 d, a low amplitude for a long period; and, when the caller
    // gives the field's other Cepheids, the PL position (Type II lie 1.5-2 mag below the classical relation).
    private static (PulsatorClass, double) Cepheid(double P, BandFit? band, List<string> reasons, FieldContext? field)
    {
        double? r21 = band?.R21;
        bool red = band is not null && IsRedBand(band.Band);
        double f = 0, o = 0, t2 = 0;
        if (P > 6) { o -= 3; reasons.Add("period > 6 d: first-overtone Cepheids are rare above ~6 d"); }
        else if (P < 1.0) { o += 1; }
        if (r21 is { } r)
        {
            double lowCut = red ? 0.27 : 0.30, highCut = red ? 0.32 : 0.35;
            if (P > 20 && r > 0.6) { t2 += 2; reasons.Add($"R21 = {F(r, "0.000")} > 0.6 at P > 20 d: alternating deep/shallow minima (RV Tau-like double wave)"); }
            else if (r < lowCut && P <= 8) { o += 2; reasons.Add($"R21 = {F(r, "0.000")} < {F(lowCut)}: near-sinusoidal (first-overtone-like)"); }
            else if (r > highCut) { f += 2; reasons.Add($"R21 = {F(r, "0.000")} > {F(highCut)}: skewed curve (fundamental-like)"); }
            else if (P > 8) reasons.Add($"R21 = {F(r, "0.000")}: low R21 is normal for F near 10 d (Hertzsprung progression)");
        }
        else reasons.Add("no R21 (order < 2): mode from period and amplitude only");
        if (band is not null)
        {
            double ampV = band.Amplitude / VRatio(band.Band);
            if (ampV < 0.55 && P < 6) { o += 1; reasons.Add("amplitude below ~0.55 mag (V): typical of first overtone"); }
            else if (ampV > 0.7 && P <= 20) { f += 1; reasons.Add("amplitude above ~0.7 mag (V): typical of fundamental mode"); }
            if (P > 20)
            {
                if (ampV < 0.8) { t2 += 1; reasons.Add($"amplitude ~{F(ampV, "0.00")} mag (V) is low for a classical Cepheid above 20 d (typically 1.0-1.4 in the LMC test stars)"); }
                else f += 1;
                if (band.ResidualRms > 0.05 && band.ReducedChiSquare > 64)
                {
                    t2 += 2;
                    reasons.Add($"residual rms {F(band.ResidualRms, "0.000")} mag is {F(Math.Sqrt(band.ReducedChiSquare), "0")}x the errors: cycle-to-cycle changes, as in RV Tau / W Vir stars (classical Cepheids repeat closely)");
                }
            }
        }
        bool plUsed = false;
        if (field is not null && band is not null && PlResidual(P, band, field) is { } pl)
        {
            plUsed = true;
            reasons.Add($"PL position in field ({pl.Count} fundamental-mode Cepheids, band {band.Band}): {F(pl.Residual, "+0.00;-0.00")} mag from the relation (scatter {F(pl.Scatter, "0.00")})");
            if (pl.Residual > 1.0 && pl.Residual > 4 * pl.Scatter) { t2 += 4; reasons.Add("far below the classical PL relation: Type II Cepheid"); }
            else if (pl.Residual < -0.3 && pl.Residual < -2 * pl.Scatter && P < 7) { o += 2; reasons.Add("brighter than the fundamental-mode relation: first overtone"); }
            else if (Math.Abs(pl.Residual) < Math.Max(0.3, 3 * pl.Scatter)) { f += 1; o -= 0.5; t2 -= 1; reasons.Add("on the fundamental-mode relation"); }
        }
        PulsatorClass cls;
        double margin;
        if (t2 > f && t2 > o) { cls = PulsatorClass.TypeIICepheid; margin = t2 - Math.Max(f, o); }
        else if (f >= o) { cls = PulsatorClass.ClassicalCepheidFundamental; margin = f - Math.Max(o, t2); }
        else { cls = PulsatorClass.ClassicalCepheidFirstOvertone; margin = o - Math.Max(f, t2); }
        double cap = plUsed ? 0.9 : 0.75;
        if (!plUsed && cls != PulsatorClass.TypeIICepheid)
            reasons.Add("Type II Cepheid not excluded: at this period only the PL position separates it reliably (no field PL given)");
        double conf = Math.Min(cap, 0.45 + 0.08 * margin);
        return (cls, conf);
    }

    private static (double Residual, double Scatter, int Count)? PlResidual(double P, BandFit band, FieldContext field)
    {
        var line = field.PlLines().FirstOrDefault(l => l.Band == band.Band);
        if (line is null || line.Count < FieldContext.MinStars) return null;
        return (band.IntensityMeanMag - (line.ZeroPoint + line.Slope * Math.Log10(P)), line.Scatter, line.Count);
    }
}
