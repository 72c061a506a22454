using PulseLadder.Core.Calibration;

namespace PulseLadder.Core.Distances;

/// <summary>
/// One accepted star of a field as the summary needs it: the extinction-corrected apparent magnitude (or Wesenheit)
/// at the relation's period, the measurement error (no intrinsic scatter) and the terms that are common to the field.
/// Build it from a star's result with <see cref="FromResult"/>.
/// </summary>
public sealed record FieldStarDistance
{
    public required string Star { get; init; }
    public required string RelationId { get; init; }
    public string Band { get; init; } = "";
    /// <summary>log10 of the period fed to the relation (fundamentalised if applicable), days.</summary>
    public required double LogP { get; init; }
    /// <summary>Extinction-corrected apparent magnitude or Wesenheit index, mag.</summary>
    public required double Mag0 { get; init; }
    /// <summary>Measurement error of mu (photometry, period, reddening, [Fe/H]); intrinsic scatter excluded.</summary>
    public required double MeasurementErr { get; init; }
    /// <summary>gamma (Z - z_ref) applied for this star.</summary>
    public double MetallicityTerm { get; init; }
    /// <summary>Z - z_ref for this star (for the gamma systematic).</summary>
    public double MetallicityOffset { get; init; }
    /// <summary>Signed change of mu for +1 sigma in R_V (fully correlated between stars).</summary>
    public double RvSensitivity { get; init; }
    /// <summary>Per-star distance modulus (kept for display; the summary recomputes mu from Mag0).</summary>
    public double Mu { get; init; }

    /// <summary>Input record from a successful star result; null when the result carries no distance.</summary>
    public static FieldStarDistance? FromResult(string star, DistanceResult r)
    {
        if (r.FailureReason is not null || r.Relation is null) return null;
        var rel = r.Relation;
        double feh = r.FeH ?? rel.FeHDefault;
        return new FieldStarDistance
        {
            Star = star, RelationId = r.RelationId, Band = r.Band, LogP = r.LogPUsed, Mag0 = r.ApparentMag0,
            MeasurementErr = r.MuErrMeasurement, MetallicityTerm = r.MetallicityTerm,
            MetallicityOffset = rel.MetallicityVariable(feh) - rel.ZRef, RvSensitivity = r.RvSensitivity, Mu = r.Mu,
        };
    }
}

/// <summary>Settings of the per-field combination (SCIENCE 5.2).</summary>
public sealed record FieldSummarySettings
{
    public double ClipSigma { get; init; } = 3.0;
    public int MaxClipIterations { get; init; } = 5;
    /// <summary>Intrinsic scatter; null: the relation's own.</summary>
    public double? SigmaInt { get; init; }
    /// <summary>Reduced chi-square above which sigma_int is inflated until chi2_red = 1.</summary>
    public double InflateAboveChi2Red { get; init; } = 2.0;
    /// <summary>Relation used by the stars; null: looked up by the stars' relation id in the registry.</summary>
    public PlRelation? Relation { get; init; }
}

/// <summary>One star in the period-luminosity diagram.</summary>
public sealed record PlPoint(string Star, double LogP, double Mag0, double MagErr, double MetallicityTerm, double Mu, bool Kept, string? RejectedBecause);

/// <summary>A straight line m = ZeroPoint + Slope (log P - P0) over [LogPMin, LogPMax].</summary>
public sealed record PlLine(double ZeroPoint, double ZeroPointErr, double Slope, double SlopeErr, double P0, double LogPMin, double LogPMax);

/// <summary>Output of <see cref="FieldSummarizer.Summarize"/>.</summary>
public sealed record FieldSummary
{
    /// <summary>Null on success; "no_stars", "unknown_relation".</summary>
    public string? FailureReason { get; init; }
    public string RelationId { get; init; } = "";
    public string Band { get; init; } = "";
    public int StarsIn { get; init; }
    public int StarsUsed { get; init; }
    public int StarsRejected { get; init; }
    public int ClipIterations { get; init; }
    /// <summary>Weighted mean distance modulus (= fixed-slope zero point minus the relation zero point).</summary>
    public double Mu { get; init; }
    /// <summary>(sum w)^-1/2, scaled by sqrt(chi2_red) only through the sigma_int inflation.</summary>
    public double MuErrStat { get; init; }
    /// <summary>Zero point, anchor, slope, gamma and R_V terms, added once (not divided by N).</summary>
    public double MuErrSys { get; init; }
    public double MuErr { get; init; }
    public double DistancePc { get; init; }
    public double DistancePcErr { get; init; }
    public double DistancePc16 { get; init; }
    public double DistancePc84 { get; init; }
    public double DistanceKpc { get; init; }
    public double DistanceKpcErr { get; init; }
    public double DistanceMpc { get; init; }
    public double DistanceMpcErr { get; init; }
    public double ChiSquareRed { get; init; }
    public double SigmaIntUsed { get; init; }
    public bool SigmaIntInflated { get; init; }
    /// <summary>Apparent relation fitted at the calibrated slope (zero point free).</summary>
    public PlLine? FixedSlopeFit { get; init; }
    /// <summary>Free-slope fit: a diagnostic only (blending, mode mix, wrong periods show here).</summary>
    public PlLine? FreeSlopeFit { get; init; }
    /// <summary>(free slope - calibrated slope) / free-slope error.</summary>
    public double? SlopeDifferenceSigma { get; init; }
    /// <summary>Zero-point (absolute) of the relation used: a, or a - mu_anchor for LMC-anchored relations.</summary>
    public double RelationZeroPoint { get; init; }
    public double AnchorErr { get; init; }
    public IReadOnlyList<PlPoint> Points { get; init; } = [];
    public IReadOnlyList<string> Flags { get; init; } = [];
}

/// <summary>Stage "per-field summary": combines the accepted stars of one field into one distance.</summary>
public static class FieldSummarizer
{
    public static FieldSummary Summarize(IReadOnlyList<FieldStarDistance> stars, FieldSummarySettings settings)
        => Summarize(stars, settings, CalibrationRegistry.Embedded);

    /// <summary>
    /// Weighted mean of mu_i = Mag0_i - (a + b (logP_i - p0) + gamma term_i) over stars of the most common relation,
    /// after iterative clipping at ClipSigma x 1.4826 MAD about the median (at most MaxClipIterations passes);
    /// w_i = 1/(sigma_meas,i^2 + sigma_int^2); sigma_int inflated until chi2_red = 1 when chi2_red exceeds
    /// InflateAboveChi2Red. Empty input gives FailureReason "no_stars".
    /// </summary>
    public static FieldSummary Summarize(IReadOnlyList<FieldStarDistance> stars, FieldSummarySettings settings, CalibrationRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(stars);
        ArgumentNullException.ThrowIfNull(settings);
        if (stars.Count == 0) return new FieldSummary { FailureReason = "no_stars" };
        var flags = new List<string>();

        string relId = settings.Relation?.Id ?? stars.GroupBy(x => x.RelationId).OrderByDescending(g => g.Count()).ThenBy(g => g.Key, StringComparer.Ordinal).First().Key;
        PlRelation? rel = settings.Relation;
        if (rel is null && !registry.TryGet(relId, out rel)) return new FieldSummary { FailureReason = "unknown_relation", RelationId = relId, StarsIn = stars.Count };
        double anchorMu = 0, anchorErr = 0;
        if (rel.Kind == RelationKind.Apparent && registry.TryGetAnchor(rel.AnchorId, out var anc)) { anchorMu = anc.Mu ?? 0; anchorErr = anc.MuErr; }
        double zp = rel.A - anchorMu; // absolute zero point at p0

        var points = new List<PlPoint>();
        var use = new List<FieldStarDistance>();
        foreach (var st in stars)
        {
            if (st.RelationId != rel.Id) { points.Add(Point(st, rel, zp, false, "different_relation:" + st.RelationId)); continue; }
            if (!double.IsFinite(st.Mag0) || !double.IsFinite(st.LogP) || !(st.MeasurementErr >= 0)) { points.Add(Point(st, rel, zp, false, "invalid_values")); continue; }
            use.Add(st);
        }
        if (use.Count == 0) return new FieldSummary { FailureReason = "no_stars", RelationId = rel.Id, StarsIn = stars.Count, Points = points };

        // mu_i from the fixed-slope relation.
        double[] mu = use.Select(st => MuOf(st, rel, zp)).ToArray();
        var kept = Enumerable.Repeat(true, use.Count).ToArray();
        int iterations = 0;
        if (use.Count >= 3 && settings.ClipSigma > 0)
        {
            for (int it = 0; it < settings.MaxClipIterations; it++)
            {
                var cur = mu.Where((_, i) => kept[i]).ToArray();
                double med = Median(cur);
                double mad = Median(cur.Select(v => Math.Abs(v - med)).ToArray());
                double robust = 1.4826 * mad;
                if (!(robust > 0)) break;
                bool changed = false;
                for (int i = 0; i < mu.Length; i++)
                {
                    bool k = Math.Abs(mu[i] - med) <= settings.ClipSigma * robust;
                    if (k != kept[i]) { kept[i] = k; changed = true; }
                }
                iterations = it + 1;
                if (!changed) break;
                if (kept.Count(k => k) < 3) break;
            }
        }
        else if (use.Count < 3) flags.Add("too_few_stars_to_clip");

        var k0 = Enumerable.Range(0, use.Count).Where(i => kept[i]).ToArray();
        double sigmaInt = settings.SigmaInt ?? rel.Scatter;
        if (k0.Any(i => use[i].MeasurementErr * use[i].MeasurementErr + sigmaInt * sigmaInt < ErrorFloor * ErrorFloor)) flags.Add("error_floor_applied");
        var (mean, sumW, chi2) = WeightedMean(k0, use, mu, sigmaInt);
        int dof = k0.Length - 1;
        double chi2Red = dof > 0 ? chi2 / dof : 0;
        bool inflated = false;
        if (dof > 0 && chi2Red > settings.InflateAboveChi2Red)
        {
            double lo = sigmaInt, hi = Math.Max(1.0, sigmaInt * 2);
            while (Chi2Red(k0, use, mu, hi) > 1.0 && hi < 50) hi *= 2;
            for (int i = 0; i < 60; i++)
            {
                double mid = 0.5 * (lo + hi);
                if (Chi2Red(k0, use, mu, mid) > 1.0) lo = mid; else hi = mid;
            }
            sigmaInt = hi;
            (mean, sumW, chi2) = WeightedMean(k0, use, mu, sigmaInt);
            inflated = true;
            flags.Add("sigma_int_inflated");
        }

        double stat = 1.0 / Math.Sqrt(sumW);
        // Systematic terms are common to all stars: evaluate at the weighted means of the star-dependent factors.
        double wLogP = 0, wZ = 0, wRv = 0;
        foreach (int i in k0)
        {
            double w = Weight(use[i], sigmaInt);
            wLogP += w * (use[i].LogP - rel.P0);
            wZ += w * use[i].MetallicityOffset;
            wRv += w * use[i].RvSensitivity;
        }
        wLogP /= sumW; wZ /= sumW; wRv /= sumW;
        double sys = Math.Sqrt(rel.AErr * rel.AErr + anchorErr * anchorErr + wLogP * wLogP * rel.BErr * rel.BErr + wZ * wZ * rel.GammaErr * rel.GammaErr + wRv * wRv);
        double total = Math.Sqrt(stat * stat + sys * sys);

        double lpMin = k0.Min(i => use[i].LogP), lpMax = k0.Max(i => use[i].LogP);
        // Fixed slope: alpha = mean of (Mag0 - b(logP - p0) - met) = mu + zp.
        var fixedFit = new PlLine(mean + zp, stat, rel.B, 0, rel.P0, lpMin, lpMax);
        PlLine? freeFit = null;
        double? slopeSigma = null;
        if (k0.Length >= 3 && lpMax - lpMin > 1e-6)
        {
            double sw = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
            foreach (int i in k0)
            {
                double w = Weight(use[i], sigmaInt), x = use[i].LogP - rel.P0, y = use[i].Mag0 - use[i].MetallicityTerm;
                sw += w; sx += w * x; sy += w * y; sxx += w * x * x; sxy += w * x * y;
            }
            double det = sw * sxx - sx * sx;
            if (det > 0)
            {
                double slope = (sw * sxy - sx * sy) / det;
                double icpt = (sxx * sy - sx * sxy) / det;
                double slopeErr = Math.Sqrt(sw / det), icptErr = Math.Sqrt(sxx / det);
                freeFit = new PlLine(icpt, icptErr, slope, slopeErr, rel.P0, lpMin, lpMax);
                slopeSigma = (slope - rel.B) / slopeErr;
                if (Math.Abs(slopeSigma.Value) > 3) flags.Add("free_slope_differs");
            }
        }
        else flags.Add("no_free_slope_fit");

        for (int i = 0; i < use.Count; i++)
            points.Add(Point(use[i], rel, zp, kept[i], kept[i] ? null : $"clipped_{settings.ClipSigma.ToString(System.Globalization.CultureInfo.InvariantCulture)}sigma_mad", sigmaInt));
        points.Sort((a, b) => a.LogP.CompareTo(b.LogP));

        double pc = Math.Pow(10, mean / 5 + 1);
        double pcErr = pc * Math.Log(10) / 5 * total;
        return new FieldSummary
        {
            RelationId = rel.Id, Band = rel.BandLabel,
            StarsIn = stars.Count, StarsUsed = k0.Length, StarsRejected = stars.Count - k0.Length, ClipIterations = iterations,
            Mu = mean, MuErrStat = stat, MuErrSys = sys, MuErr = total,
            DistancePc = pc, DistancePcErr = pcErr,
            DistancePc16 = Math.Pow(10, (mean - total) / 5 + 1), DistancePc84 = Math.Pow(10, (mean + total) / 5 + 1),
            DistanceKpc = pc / 1e3, DistanceKpcErr = pcErr / 1e3, DistanceMpc = pc / 1e6, DistanceMpcErr = pcErr / 1e6,
            ChiSquareRed = chi2Red, SigmaIntUsed = sigmaInt, SigmaIntInflated = inflated,
            FixedSlopeFit = fixedFit, FreeSlopeFit = freeFit, SlopeDifferenceSigma = slopeSigma,
            RelationZeroPoint = zp, AnchorErr = anchorErr,
            Points = points, Flags = flags,
        };
    }

    private static double MuOf(FieldStarDistance st, PlRelation rel, double zp) => st.Mag0 - (zp + rel.B * (st.LogP - rel.P0) + st.MetallicityTerm);

    /// <summary>Floor on a star's total error (mag) so a star with no quoted error and a zero-scatter relation cannot take infinite weight.</summary>
    internal const double ErrorFloor = 1e-3;

    private static double Weight(FieldStarDistance st, double sigmaInt) => 1.0 / Math.Max(st.MeasurementErr * st.MeasurementErr + sigmaInt * sigmaInt, ErrorFloor * ErrorFloor);

    private static PlPoint Point(FieldStarDistance st, PlRelation rel, double zp, bool kept, string? why, double sigmaInt = 0)
        => new(st.Star, st.LogP, st.Mag0, Math.Sqrt(st.MeasurementErr * st.MeasurementErr + sigmaInt * sigmaInt), st.MetallicityTerm,
            double.IsFinite(st.Mag0) && double.IsFinite(st.LogP) ? MuOf(st, rel, zp) : 0, kept, why);

    private static (double Mean, double SumW, double Chi2) WeightedMean(int[] idx, List<FieldStarDistance> use, double[] mu, double sigmaInt)
    {
        double sw = 0, swm = 0;
        foreach (int i in idx) { double w = Weight(use[i], sigmaInt); sw += w; swm += w * mu[i]; }
        double mean = swm / sw, chi2 = 0;
        foreach (int i in idx) { double d = mu[i] - mean; chi2 += Weight(use[i], sigmaInt) * d * d; }
        return (mean, sw, chi2);
    }

    private static double Chi2Red(int[] idx, List<FieldStarDistance> use, double[] mu, double sigmaInt)
    {
        var (_, _, chi2) = WeightedMean(idx, use, mu, sigmaInt);
        return chi2 / (idx.Length - 1);
    }

    internal static double Median(double[] v)
    {
        var c = (double[])v.Clone();
        Array.Sort(c);
        int n = c.Length;
        return n % 2 == 1 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    }
}
