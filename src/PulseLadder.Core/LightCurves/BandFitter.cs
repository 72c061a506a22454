using System.Globalization;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.LightCurves;

/// <summary>The work behind <see cref="LightCurveFitter.FitBands"/>.</summary>
internal static class BandFitter
{
    /// <summary>Largest phase gap above which a band is flagged "poor_phase_coverage" (common practice: a fifth of a cycle can hide a rising branch).</summary>
    internal const double PoorCoverageGap = 0.2;
    /// <summary>Observers with fewer points in a band share the reference zero point (an offset from 1-2 points only absorbs them).</summary>
    internal const int MinPointsForOffset = 3;
    /// <summary>At most this fraction of a band's points is clipped as outliers.</summary>
    internal const double MaxClipFraction = 0.2;
    /// <summary>Floor of the robust scale of normalised residuals: errors overestimated more than 10x do not tighten clipping further.</summary>
    internal const double MinRobustScale = 0.1;
    /// <summary>A night (session of one observer) is "bad" when its residual rms exceeds this multiple of the typical night's.</summary>
    internal const double BadNightFactor = 3.0;
    /// <summary>Points of one observer closer in time than this (days) belong to the same night.</summary>
    internal const double NightGapDays = 0.3;
    internal const int GridPoints = 512;

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public static LightCurveFitOutcome Run(IReadOnlyList<LightCurvePoint> points, double periodDays, FitSettings fit, CleaningSettings cleaning)
    {
        if (points.Count == 0 || !(periodDays > 0) || !double.IsFinite(periodDays))
            return new LightCurveFitOutcome([], [], [], []);

        var rejections = new List<Rejection>();
        var usable = new List<int>();
        for (int i = 0; i < points.Count; i++)
        {
            var p = points[i];
            if (double.IsFinite(p.Bjd) && double.IsFinite(p.Mag) && double.IsFinite(p.MagErr) && p.MagErr > 0) usable.Add(i);
            else rejections.Add(Reject(p, "fit", "non_finite", "time, magnitude or error not finite/positive at the fit stage"));
        }
        if (usable.Count == 0) return new LightCurveFitOutcome([], rejections, [], []);

        double tMin = usable.Min(i => points[i].Bjd), tMax = usable.Max(i => points[i].Bjd);
        double t0 = Math.Floor(tMin); // provisional phase origin; every fit is moved to the common epoch at the end
        double baseline = tMax - tMin;

        var bands = usable.GroupBy(i => points[i].Band ?? "", StringComparer.Ordinal)
            .OrderBy(g => g.Key, StringComparer.Ordinal)
            .Select(g => new BandData(g.Key, g.ToArray(), points, periodDays, t0))
            .ToList();

        int maxOrder = Math.Clamp(fit.MaxOrder, 1, 20);
        var results = new Dictionary<string, BandResult>(StringComparer.Ordinal);

        // Own fits for every band that supports order >= 2, best-sampled first (it becomes the template).
        foreach (var b in bands.OrderByDescending(b => b.N).ThenBy(b => b.Name, StringComparer.Ordinal))
        {
            if (b.OwnOrderCapacity() >= 2)
                results[b.Name] = FitBand(b, new FourierModel(maxOrder), cleaning);
        }
        var template = results.Values.Where(r => !r.Failed && r.Order >= 2)
            .OrderByDescending(r => r.Data.N).ThenBy(r => r.Data.Name, StringComparer.Ordinal).FirstOrDefault();
        foreach (var b in bands)
        {
            if (results.ContainsKey(b.Name)) continue;
            if (template is not null && b.N >= b.FixedColumns + 1)
                results[b.Name] = FitBand(b, new TemplateModel(template), cleaning);
            else if (b.N >= b.FixedColumns + 3)
                results[b.Name] = FitBand(b, new FourierModel(maxOrder), cleaning);
            else
                foreach (var idx in b.Index)
                    rejections.Add(Reject(points[idx], "fit", "band_too_sparse", string.Create(Inv,
                        $"band {b.Name} has {b.N} point(s), too few for a fit with {b.FixedColumns - 1} observer offset(s) and no template band")));
        }

        // Common phase origin: epoch of maximum of the best-sampled band (the first own fit, else any fit).
        var reference = template ?? results.Values.Where(r => !r.Failed).OrderByDescending(r => r.Data.N).ThenBy(r => r.Data.Name, StringComparer.Ordinal).FirstOrDefault();
        double phaseZero = reference?.EpochOfMax ?? t0;

        var fits = new List<BandFit>();
        var offsets = new List<ObserverOffset>();
        var keptIdx = new List<int>();
        foreach (var b in bands)
        {
            if (!results.TryGetValue(b.Name, out var r)) continue;
            rejections.AddRange(r.Rejections);
            if (r.Failed) continue;
            offsets.AddRange(r.Offsets);
            for (int j = 0; j < b.N; j++) if (r.Active[j]) keptIdx.Add(b.Index[j]);
            var flags = new List<string>(r.Flags);
            if (baseline < periodDays) flags.Add("period_exceeds_baseline");
            double delta = (phaseZero - t0) / periodDays;
            var (c, s) = FourierSeries.Shift(r.Cos, r.Sin, delta - Math.Floor(delta)); // whole cycles dropped for precision
            fits.Add(r.Fit with { PhaseZeroBjd = phaseZero, Cos = c, Sin = s, Flags = flags });
        }
        keptIdx.Sort();
        return new LightCurveFitOutcome(fits, rejections, offsets, keptIdx.Select(i => points[i]).ToList());
    }

    internal static Rejection Reject(LightCurvePoint p, string stage, string reason, string detail) =>
        new(p.ObservationId, stage, reason, detail) { Time = double.IsFinite(p.Bjd) ? p.Bjd : 0, Band = p.Band ?? "", Mag = double.IsFinite(p.Mag) ? p.Mag : 0 };

    /// <summary>Per-band arrays: times, mean-removed magnitudes, weights, phases, offset columns.</summary>
    internal sealed class BandData
    {
        public string Name { get; }
        public int[] Index { get; }
        public int N => Index.Length;
        public double[] T { get; }
        public double[] Y { get; }      // magnitude minus YMean
        public double YMean { get; }
        public double[] W { get; }
        public double[] Err { get; }
        public double[] Phase { get; }
        public int[] OffsetColumn { get; } // -1: reference zero point
        public string[] Observer { get; }
        public string ReferenceObserver { get; }
        public List<string> OffsetObservers { get; } = [];
        public List<string> Unfitted { get; } = [];
        public int FixedColumns => 1 + OffsetObservers.Count;
        public double MedianErr { get; }
        public double Period { get; }
        public double T0 { get; }
        public IReadOnlyList<LightCurvePoint> Source { get; }

        public BandData(string name, int[] index, IReadOnlyList<LightCurvePoint> pts, double period, double t0)
        {
            Name = name;
            Index = index;
            Source = pts;
            Period = period;
            T0 = t0;
            int n = index.Length;
            T = new double[n]; Y = new double[n]; W = new double[n]; Err = new double[n]; Phase = new double[n];
            Observer = new string[n];
            double sw = 0, swy = 0;
            for (int j = 0; j < n; j++)
            {
                var p = pts[index[j]];
                T[j] = p.Bjd; Err[j] = p.MagErr; W[j] = 1.0 / (p.MagErr * p.MagErr);
                Observer[j] = p.Observer ?? "";
                double ph = ((p.Bjd - t0) / period) % 1.0;
                Phase[j] = ph < 0 ? ph + 1 : ph;
                sw += W[j]; swy += W[j] * p.Mag;
            }
            YMean = swy / sw;
            for (int j = 0; j < n; j++) Y[j] = pts[index[j]].Mag - YMean;
            var sortedErr = (double[])Err.Clone();
            Array.Sort(sortedErr);
            MedianErr = sortedErr[n / 2];

            var counts = Observer.GroupBy(o => o, StringComparer.Ordinal)
                .Select(g => (Obs: g.Key, Count: g.Count()))
                .OrderByDescending(g => g.Count).ThenBy(g => g.Obs, StringComparer.Ordinal).ToList();
            ReferenceObserver = counts[0].Obs;
            var col = new Dictionary<string, int>(StringComparer.Ordinal);
            foreach (var (obs, count) in counts.Skip(1))
            {
                if (count >= MinPointsForOffset) { col[obs] = 1 + OffsetObservers.Count; OffsetObservers.Add(obs); }
                else Unfitted.Add(obs);
            }
            OffsetColumn = Observer.Select(o => col.TryGetValue(o, out int c) ? c : -1).ToArray();
        }

        /// <summary>Highest Fourier order the point count and phase coverage allow (0 when not even order 1).</summary>
        public int OwnOrderCapacity() => OrderCapacity(Enumerable.Repeat(true, N).ToArray(), 20);

        public int OrderCapacity(bool[] active, int maxOrder, bool ignorePoints = false)
        {
            int nAct = active.Count(a => a);
            int byPoints = ignorePoints ? maxOrder : (nAct - FixedColumns) / 4; // n <= (N-1)/4 (SCIENCE.md 2.2), offsets counted as parameters
            double gap = LargestGap(active);
            int byGap = gap <= 0 ? maxOrder : (int)Math.Floor(1.0 / (2.0 * gap));
            return Math.Max(0, Math.Min(maxOrder, Math.Min(byPoints, byGap)));
        }

        private int[]? _byPhase;

        /// <summary>Largest phase gap (wrapping at 1) between active points. The phases are fixed for the band, only
        /// the active set changes between calls (clipping): they are sorted once.</summary>
        public double LargestGap(bool[] active)
        {
            if (_byPhase is null)
            {
                var order = new int[N];
                var keys = (double[])Phase.Clone();
                for (int j = 0; j < N; j++) order[j] = j;
                Array.Sort(keys, order);
                _byPhase = order;
            }
            double first = double.NaN, prev = double.NaN, gap = 0;
            foreach (int j in _byPhase)
            {
                if (!active[j]) continue;
                double ph = Phase[j];
                if (double.IsNaN(first)) first = ph;
                else gap = Math.Max(gap, ph - prev);
                prev = ph;
            }
            if (double.IsNaN(first)) return 1.0;
            return Math.Max(gap, first + 1.0 - prev);
        }
    }

    /// <summary>Shape part of a model: design columns after the constant and offsets.</summary>
    internal interface IShapeModel
    {
        /// <summary>Largest number of shape columns.</summary>
        int MaxColumns { get; }
        void FillColumns(double phase, Span<double> columns);
        /// <summary>Picks the number of shape columns to use and fits; null when nothing can be fitted.</summary>
        (LinearFit.Solution Sol, int ShapeColumns, List<OrderScore> Scores, List<string> Flags)? Choose(BandData b, double[] x, int stride, bool[] active);
        string Name { get; }
    }

    internal sealed class FourierModel(int maxOrder) : IShapeModel
    {
        public int MaxColumns => 2 * maxOrder;
        public string Name => "fourier";

        public void FillColumns(double phase, Span<double> columns)
        {
            double a = 2 * Math.PI * phase, c1 = Math.Cos(a), s1 = Math.Sin(a), ck = c1, sk = s1;
            for (int k = 0; k < maxOrder; k++)
            {
                columns[2 * k] = ck; columns[2 * k + 1] = sk;
                double cn = ck * c1 - sk * s1;
                sk = sk * c1 + ck * s1;
                ck = cn;
            }
        }

        public (LinearFit.Solution, int, List<OrderScore>, List<string>)? Choose(BandData b, double[] x, int stride, bool[] active)
        {
            int nAct = active.Count(a => a);
            int byPointsOnly = Math.Min(maxOrder, (nAct - b.FixedColumns) / 4);
            int cap = b.OrderCapacity(active, maxOrder);
            var flags = new List<string>();
            if (cap < byPointsOnly) flags.Add("order_limited_by_phase_gap");
            if (cap < 1)
            {
                if (nAct < b.FixedColumns + 3) return null; // order 1 needs one degree of freedom at least
                cap = 1;
            }
            // Data range after offsets, for the ringing guard.
            var scores = new List<OrderScore>();
            LinearFit.Solution? best = null;
            int bestOrder = 0;
            // Orders beyond the guards are still scored (and shown, marked) so a reviewer sees what was excluded.
            int scored = Math.Max(cap, Math.Min(maxOrder, (nAct - b.FixedColumns - 1) / 2));
            int byGap = b.OrderCapacity(active, maxOrder, ignorePoints: true);
            var normal = new LinearFit.Normal(x, stride, b.FixedColumns + 2 * scored, b.Y, b.W, active);
            var candidates = new List<(int Order, LinearFit.Solution Sol, double Bic)>();
            for (int n = 1; n <= scored; n++)
            {
                int p = b.FixedColumns + 2 * n;
                var sol = normal.Solve(p, withCovariance: false);
                if (sol is null) { scores.Add(new OrderScore(n, 0, 0, "singular")); continue; }
                double bic = sol.ChiSquare + p * Math.Log(nAct);
                string? why = n > cap ? (n > byGap ? "phase_gap" : "too_few_points") : null;
                scores.Add(new OrderScore(n, sol.ChiSquare, bic, why));
                if (why is null) candidates.Add((n, sol, bic));
            }
            // Ringing is checked from the best BIC down and only until an order passes (order 1 is the minimal
            // periodic model and is never refused: poor coverage is flagged instead).
            foreach (var c in candidates.OrderBy(c => c.Bic))
            {
                if (c.Order > 1 && Rings(b, c.Sol, c.Order, active))
                {
                    int i = scores.FindIndex(s => s.Order == c.Order);
                    scores[i] = scores[i] with { Rejected = "ringing" };
                    continue;
                }
                best = c.Sol;
                bestOrder = c.Order;
                break;
            }
            if (best is null) return null;
            best = normal.Solve(b.FixedColumns + 2 * bestOrder)!;
            if (scores.Any(s => s.Rejected == "ringing")) flags.Add("ringing_orders_rejected");
            return (best, 2 * bestOrder, scores, flags);
        }

        // An order "rings" when its curve overshoots the (offset-corrected) data range by more than
        // max(15% of the range, 3 median errors): the extra terms are filling a phase gap, not describing data.
        private static bool Rings(BandData b, LinearFit.Solution sol, int order, bool[] active)
        {
            double lo = double.PositiveInfinity, hi = double.NegativeInfinity;
            for (int j = 0; j < b.N; j++)
            {
                if (!active[j]) continue;
                double v = b.Y[j] - (b.OffsetColumn[j] > 0 ? sol.Beta[b.OffsetColumn[j]] : 0);
                lo = Math.Min(lo, v); hi = Math.Max(hi, v);
            }
            double tol = Math.Max(0.15 * (hi - lo), 3 * b.MedianErr);
            var (cos, sin) = Split(sol.Beta, b.FixedColumns, order);
            for (int i = 0; i < 256; i++)
            {
                double m = FourierSeries.Evaluate(sol.Beta[0], cos, sin, i / 256.0);
                if (m > hi + tol || m < lo - tol) return true;
            }
            return false;
        }
    }

    internal sealed class TemplateModel(BandResult template) : IShapeModel
    {
        public int MaxColumns => 1;
        public string Name => "template:" + template.Data.Name;
        public BandResult Template => template;

        public void FillColumns(double phase, Span<double> columns) =>
            columns[0] = FourierSeries.Evaluate(0, template.Cos, template.Sin, phase);

        public (LinearFit.Solution, int, List<OrderScore>, List<string>)? Choose(BandData b, double[] x, int stride, bool[] active)
        {
            int nAct = active.Count(a => a);
            var flags = new List<string>();
            if (nAct >= b.FixedColumns + 3)
            {
                var sol = LinearFit.Solve(x, stride, b.FixedColumns + 1, b.Y, b.W, active);
                double s = sol?.Beta[b.FixedColumns] ?? 0;
                if (sol is not null && s >= 0.2 && s <= 5) return (sol, 1, [], flags);
            }
            // Too few points (or an implausible scale) to fit the amplitude: keep the template's, fit the level only.
            var y = new double[b.N];
            for (int j = 0; j < b.N; j++) y[j] = b.Y[j] - x[j * stride + b.FixedColumns];
            var fixedSol = LinearFit.Solve(x, stride, b.FixedColumns, y, b.W, active);
            if (fixedSol is null) return null;
            flags.Add("template_scale_fixed");
            var beta = fixedSol.Beta.Append(1.0).ToArray();
            int p = b.FixedColumns + 1;
            var cov = new double[p * p];
            for (int i = 0; i < b.FixedColumns; i++)
                for (int j = 0; j < b.FixedColumns; j++) cov[i * p + j] = fixedSol.Cov(i, j);
            return (new LinearFit.Solution(beta, cov, p, fixedSol.ChiSquare, fixedSol.Used), 1, [], flags);
        }
    }

    internal sealed record BandResult(BandData Data, BandFit Fit, double[] Cos, double[] Sin, int Order, bool[] Active,
        List<Rejection> Rejections, List<ObserverOffset> Offsets, List<string> Flags, double EpochOfMax)
    {
        /// <summary>True when no model could be fitted (all points reported as rejections).</summary>
        public bool Failed { get; init; }
    }

    internal static (double[] Cos, double[] Sin) Split(double[] beta, int fixedColumns, int order)
    {
        var c = new double[order];
        var s = new double[order];
        for (int k = 0; k < order; k++) { c[k] = beta[fixedColumns + 2 * k]; s[k] = beta[fixedColumns + 2 * k + 1]; }
        return (c, s);
    }

    private static BandResult FitBand(BandData b, IShapeModel model, CleaningSettings cleaning)
    {
        int stride = b.FixedColumns + model.MaxColumns;
        var x = new double[b.N * stride];
        for (int j = 0; j < b.N; j++)
        {
            int row = j * stride;
            x[row] = 1.0;
            if (b.OffsetColumn[j] > 0) x[row + b.OffsetColumn[j]] = 1.0;
            model.FillColumns(b.Phase[j], x.AsSpan(row + b.FixedColumns, model.MaxColumns));
        }

        var active = Enumerable.Repeat(true, b.N).ToArray();
        var clipped = new bool[b.N];
        var badNight = new bool[b.N];
        var chosen = model.Choose(b, x, stride, active);
        var z = new double[b.N];
        var med = 0.0;
        var scale = 1.0;

        // Iterative clipping of residuals from the current model: each pass refits (order re-chosen) on the
        // surviving points and may re-admit points that the better model now explains.
        for (int iter = 0; chosen is not null && iter < Math.Max(0, cleaning.MaxClipIterations); iter++)
        {
            var (sol, cols, _, _) = chosen.Value;
            int p = b.FixedColumns + cols;
            int nAct = active.Count(a => a);
            if (nAct < p + 5) break; // too few points for a meaningful robust scale
            Residuals(b, x, stride, sol, p, z);
            (med, scale) = RobustScale(z, active);
            double limit = cleaning.ClipSigma * Math.Max(scale, MinRobustScale);
            var newClip = new bool[b.N];
            for (int j = 0; j < b.N; j++) newClip[j] = !badNight[j] && Math.Abs(z[j] - med) > limit;
            CapClipping(newClip, z, med, (int)Math.Floor(MaxClipFraction * b.N));
            bool changed = false;
            for (int j = 0; j < b.N; j++)
            {
                if (newClip[j] != clipped[j]) changed = true;
                clipped[j] = newClip[j];
                active[j] = !clipped[j] && !badNight[j];
            }
            if (!changed) break;
            chosen = model.Choose(b, x, stride, active) ?? chosen;
        }

        // Whole nights far worse than the star's other nights.
        if (chosen is not null)
        {
            var (sol, cols, _, _) = chosen.Value;
            Residuals(b, x, stride, sol, b.FixedColumns + cols, z);
            // Clipped points count towards their night's rms: a night whose points were clipped one by one is
            // still a bad night, and is reported as such.
            var eligible = Enumerable.Repeat(true, b.N).ToArray();
            if (FlagBadNights(b, z, eligible, badNight))
            {
                for (int j = 0; j < b.N; j++)
                {
                    if (badNight[j]) clipped[j] = false;
                    active[j] = !clipped[j] && !badNight[j];
                }
                chosen = model.Choose(b, x, stride, active) ?? chosen;
            }
        }

        var rejections = new List<Rejection>();
        var flags = new List<string>();
        if (chosen is null)
        {
            // Nothing could be fitted (degenerate design): every point of the band is reported, none kept.
            for (int j = 0; j < b.N; j++)
            {
                active[j] = false;
                rejections.Add(Reject(b.Source[b.Index[j]], "fit", "band_too_sparse", "no stable fit for band " + b.Name));
            }
            var empty = new BandFit { Band = b.Name, PeriodDays = b.Period, PhaseZeroBjd = b.T0, A0 = b.YMean, MagnitudeMean = b.YMean, IntensityMeanMag = b.YMean, Flags = ["no_fit"] };
            return new BandResult(b, empty, [], [], 0, active, rejections, [], flags, b.T0) { Failed = true };
        }

        var (final, shapeCols, scores, modelFlags) = chosen.Value;
        flags.AddRange(modelFlags);
        int pFinal = b.FixedColumns + shapeCols;
        Residuals(b, x, stride, final, pFinal, z);
        for (int j = 0; j < b.N; j++)
        {
            var pt = b.Source[b.Index[j]];
            double r = z[j] / Math.Sqrt(b.W[j]);
            if (clipped[j])
                rejections.Add(Reject(pt, "clip", "clipped", string.Create(Inv,
                    $"residual {r:+0.000;-0.000} mag = {(z[j] - med) / Math.Max(scale, MinRobustScale):0.0} robust sigma (1.4826 MAD of residual/error = {scale:0.00}; limit {cleaning.ClipSigma:0.0})")));
            else if (badNight[j])
                rejections.Add(Reject(pt, "clip", "bad_night", string.Create(Inv,
                    $"night of {pt.Bjd:0.0} ({(pt.Observer is { Length: > 0 } o ? o : "no observer")}) has residual rms far above the star's other nights")));
        }

        int nUsed = active.Count(a => a);
        int dof = Math.Max(1, nUsed - pFinal);
        double chi2Red = final.ChiSquare / dof;
        double covScale = Math.Max(1.0, chi2Red);

        // Coefficients of the shape in the provisional phase frame.
        double[] cos, sin;
        int order;
        double? templateScale = null;
        if (model is TemplateModel tm)
        {
            double s = final.Beta[b.FixedColumns];
            templateScale = s;
            cos = tm.Template.Cos.Select(v => v * s).ToArray();
            sin = tm.Template.Sin.Select(v => v * s).ToArray();
            order = cos.Length;
            flags.Add("template_fit:" + tm.Template.Data.Name);
        }
        else
        {
            order = shapeCols / 2;
            (cos, sin) = Split(final.Beta, b.FixedColumns, order);
        }
        double a0 = b.YMean + final.Beta[0];

        // Gradients of derived quantities with respect to the parameters (constant + shape columns; offsets do
        // not enter the curve), propagated with the covariance scaled by max(1, reduced chi-square).
        var grid = new double[GridPoints];
        var gridCols = new double[GridPoints * model.MaxColumns];
        double fluxSum = 0;
        var flux = new double[GridPoints];
        for (int i = 0; i < GridPoints; i++)
        {
            double ph = (double)i / GridPoints;
            grid[i] = FourierSeries.Evaluate(a0, cos, sin, ph);
            model.FillColumns(ph, gridCols.AsSpan(i * model.MaxColumns, model.MaxColumns));
            flux[i] = Math.Pow(10.0, -0.4 * (grid[i] - a0));
            fluxSum += flux[i];
        }
        double intensityMean = a0 - 2.5 * Math.Log10(fluxSum / GridPoints);
        var gInt = new double[pFinal];
        gInt[0] = 1.0;
        for (int c = 0; c < shapeCols; c++)
        {
            double acc = 0;
            for (int i = 0; i < GridPoints; i++) acc += flux[i] * gridCols[i * model.MaxColumns + c];
            gInt[b.FixedColumns + c] = acc / fluxSum;
        }
        double intensityErr = Math.Sqrt(Math.Max(0, Quad(gInt, final, covScale)));
        double a0Err = Math.Sqrt(Math.Max(0, final.Cov(0, 0) * covScale));

        double phMax = FourierSeries.Extremum(a0, cos, sin, findMinimum: true);   // maximum light = minimum magnitude
        double phMin = FourierSeries.Extremum(a0, cos, sin, findMinimum: false);
        double amplitude = FourierSeries.Evaluate(a0, cos, sin, phMin) - FourierSeries.Evaluate(a0, cos, sin, phMax);
        var gAmp = new double[pFinal];
        var colMax = new double[model.MaxColumns];
        var colMin = new double[model.MaxColumns];
        model.FillColumns(phMax, colMax);
        model.FillColumns(phMin, colMin);
        for (int c = 0; c < shapeCols; c++) gAmp[b.FixedColumns + c] = colMin[c] - colMax[c];
        double ampErr = Math.Sqrt(Math.Max(0, Quad(gAmp, final, covScale)));

        // Epoch of maximum light: the maximum nearest the middle of the data (minimises epoch-period covariance).
        double tMid = 0.5 * (b.T.Min() + b.T.Max());
        double firstMax = b.T0 + phMax * b.Period;
        double epoch = firstMax + Math.Round((tMid - firstMax) / b.Period) * b.Period;
        var (d1, d2) = FourierSeries.Derivatives(cos, sin, phMax);
        _ = d1;
        // Phase error of an extremum: sigma_phi = sqrt(g C g) / |m''|, g = d(dm/dphi)/d(params).
        double epochErr = 0;
        if (Math.Abs(d2) > 0 && model is FourierModel)
        {
            var gEp = new double[pFinal];
            for (int k = 1; k <= order; k++)
            {
                double w = 2 * Math.PI * k;
                gEp[b.FixedColumns + 2 * (k - 1)] = -w * Math.Sin(w * phMax);
                gEp[b.FixedColumns + 2 * (k - 1) + 1] = w * Math.Cos(w * phMax);
            }
            epochErr = Math.Sqrt(Math.Max(0, Quad(gEp, final, covScale))) / Math.Abs(d2) * b.Period;
        }

        double gap = b.LargestGap(active);
        if (gap > PoorCoverageGap) flags.Add("poor_phase_coverage");
        foreach (var u in b.Unfitted) flags.Add("offset_not_fitted:" + u);

        double rms = 0;
        for (int j = 0; j < b.N; j++) if (active[j]) { double r = z[j] / Math.Sqrt(b.W[j]); rms += r * r; }
        rms = nUsed > 0 ? Math.Sqrt(rms / nUsed) : 0;

        var fitRecord = new BandFit
        {
            Band = b.Name,
            Points = nUsed,
            Order = model is FourierModel ? order : 0,
            PeriodDays = b.Period,
            PhaseZeroBjd = b.T0,
            A0 = a0,
            Cos = cos,
            Sin = sin,
            IntensityMeanMag = intensityMean,
            IntensityMeanErr = intensityErr,
            MagnitudeMean = a0,
            MagnitudeMeanErr = a0Err,
            Amplitude = amplitude,
            AmplitudeErr = ampErr,
            EpochOfMaxBjd = epoch,
            EpochOfMaxErr = epochErr,
            LargestPhaseGap = gap,
            ResidualRms = rms,
            ReducedChiSquare = chi2Red,
            Model = model.Name,
            TemplateScale = templateScale,
            ReferenceObserver = b.ReferenceObserver,
            OrderScores = scores,
        };
        if (model is FourierModel)
            fitRecord = FourierParameters.Apply(fitRecord, final, b.FixedColumns, order, covScale);

        var offsets = new List<ObserverOffset>();
        for (int k = 0; k < b.OffsetObservers.Count; k++)
        {
            string obs = b.OffsetObservers[k];
            int count = 0;
            for (int j = 0; j < b.N; j++) if (active[j] && b.OffsetColumn[j] == k + 1) count++;
            offsets.Add(new ObserverOffset(b.Name, obs, final.Beta[k + 1], Math.Sqrt(Math.Max(0, final.Cov(k + 1, k + 1) * covScale)), count));
        }
        return new BandResult(b, fitRecord, cos, sin, model is FourierModel ? order : 0, active, rejections, offsets, flags, epoch);
    }

    private static double Quad(double[] g, LinearFit.Solution sol, double scale)
    {
        double s = 0;
        for (int i = 0; i < g.Length; i++)
        {
            if (g[i] == 0) continue;
            for (int j = 0; j < g.Length; j++) s += g[i] * sol.Cov(i, j) * g[j];
        }
        return s * scale;
    }

    /// <summary>Error-normalised residuals (data - model) / sigma for every point of the band.</summary>
    private static void Residuals(BandData b, double[] x, int stride, LinearFit.Solution sol, int p, double[] z)
    {
        for (int j = 0; j < b.N; j++)
            z[j] = (b.Y[j] - LinearFit.Predict(x, stride, j, sol.Beta, p)) * Math.Sqrt(b.W[j]);
    }

    /// <summary>Median and 1.4826 x median absolute deviation of the active values.</summary>
    internal static (double Median, double Scale) RobustScale(double[] z, bool[] active)
    {
        var v = new List<double>(z.Length);
        for (int j = 0; j < z.Length; j++) if (active[j]) v.Add(z[j]);
        if (v.Count == 0) return (0, 0);
        double med = Median(v);
        for (int j = 0; j < v.Count; j++) v[j] = Math.Abs(v[j] - med);
        return (med, 1.4826 * Median(v));
    }

    private static double Median(List<double> v)
    {
        v.Sort();
        int n = v.Count;
        return n % 2 == 1 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
    }

    private static void CapClipping(bool[] clip, double[] z, double med, int max)
    {
        int count = clip.Count(c => c);
        if (count <= max) return;
        var order = Enumerable.Range(0, clip.Length).Where(j => clip[j]).OrderByDescending(j => Math.Abs(z[j] - med)).ToList();
        for (int k = max; k < order.Count; k++) clip[order[k]] = false;
    }

    // Nights = runs of one observer's points without a gap of NightGapDays. A night of >= 3 points is bad when its
    // robust rms normalised residual exceeds BadNightFactor times the median night's (or the robust scale when fewer than
    // three such nights exist), and at most a third of the nights may be bad (otherwise "bad" is the norm).
    private static bool FlagBadNights(BandData b, double[] z, bool[] active, bool[] badNight)
    {
        var nights = new List<List<int>>();
        foreach (var g in Enumerable.Range(0, b.N).Where(j => active[j]).GroupBy(j => b.Observer[j], StringComparer.Ordinal))
        {
            List<int>? current = null;
            double last = double.NegativeInfinity;
            foreach (int j in g.OrderBy(j => b.T[j]))
            {
                if (current is null || b.T[j] - last > NightGapDays) { current = []; nights.Add(current); }
                current.Add(j);
                last = b.T[j];
            }
        }
        var multi = nights.Where(n => n.Count >= 3).ToList();
        if (multi.Count == 0) return false;
        // Robust night rms sqrt(median z^2): one outlier in a night is clipping's business, not a bad night, while
        // a night with most points off (scatter or a zero-point jump) stands out.
        var rms = multi.Select(n => Math.Sqrt(Median(n.Select(j => z[j] * z[j]).ToList()))).ToList();
        double typical;
        if (multi.Count >= 3) typical = Median(rms.ToList());
        else typical = RobustScale(z, active).Scale;
        typical = Math.Max(typical, MinRobustScale);
        var bad = Enumerable.Range(0, multi.Count).Where(i => rms[i] > BadNightFactor * typical).ToList();
        if (bad.Count == 0 || 3 * bad.Count > nights.Count) return false;
        foreach (int i in bad) foreach (int j in multi[i]) badNight[j] = true;
        return true;
    }
}
