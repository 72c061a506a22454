using System.Buffers;
using System.Globalization;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Kernels;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>The work behind <see cref="PeriodFinder"/>.</summary>
internal static class PeriodSearchEngine
{
    internal sealed record Candidate(double Frequency, double Power)
    {
        public double ModelFrequency { get; set; }
        public double? ModelChi2 { get; set; }

        /// <summary>At a grid frequency, not yet moved to the GLS maximum near it.</summary>
        public bool OnGrid { get; init; }
    }

    /// <summary>Share of a band's chi2_0 that observer offsets must explain before the grid is searched again on
    /// offset-corrected magnitudes (own choice: below this the raw periodogram is barely disturbed).</summary>
    internal const double OffsetSecondPassShare = 0.10;

    /// <summary>Candidates whose harmonic fit is minimised in frequency (the rest are compared at their GLS peak).</summary>
    internal const int RankingRefined = 3;

    public static PeriodSearchResult Search(IReadOnlyList<LightCurvePoint> points, PulsatorClass cls, PeriodSearchSettings s)
    {
        var data = SearchData.Prepare(points);
        var (first, firstPlot) = SearchOnce(data, cls, s);
        if (first.Peaks.Count == 0 || first.ObserverOffsets.Count == 0 || !OffsetsMatter(data, first.ObserverOffsets))
            return WithWindow(first, firstPlot, data);

        // The coarse grid ran on raw magnitudes; observer zero points blur it. Search again with them removed.
        var corrected = data.WithOffsetsRemoved(first.ObserverOffsets);
        var (second, secondPlot) = SearchOnce(corrected, cls, s);
        if (second.Peaks.Count == 0) return WithWindow(first, firstPlot, data);
        var total = second.ObserverOffsets.Select(o =>
        {
            double o1 = first.ObserverOffsets.FirstOrDefault(x => x.Band == o.Band && x.Observer == o.Observer)?.Offset ?? 0;
            return o with { Offset = o.Offset + o1 };
        }).ToArray();
        return WithWindow(second, secondPlot, corrected) with { ObserverOffsets = total, Notes = [.. second.Notes, "offsets_removed_second_pass"] };
    }

    /// <summary>Plotted frequencies of one pass: grid indices of the thinned periodogram, for the spectral window.</summary>
    private readonly record struct PlotIndices(FrequencyGrid Grid, int[] Indices);

    /// <summary>
    /// Adds the spectral window on the plotted frequencies. Done once, for the pass that is returned (the window
    /// depends only on the times, which both passes share): it costs about as much as the harmonic ranking.
    /// </summary>
    private static PeriodSearchResult WithWindow(PeriodSearchResult r, PlotIndices? plot, SearchData data)
    {
        if (plot is not { } p || r.FailureReason is "too_few_points" or "baseline_too_short") return r;
        if (r.Periodogram.X.Length == 0) return r;
        var wy = new double[p.Indices.Length];
        // Direct sums cost about half a kernel evaluation per point and plotted frequency; the NUFFT window one
        // transform of the whole grid (a fifth of that for a typical star), accurate to ~1e-9, far below a plot's pixel.
        int n = data.AllT.Length;
        if (Periodogram.WindowForSearchCost(n, p.Grid.Count) < 0.5 * n * (double)p.Indices.Length)
        {
            double[] full = ArrayPool<double>.Shared.Rent(p.Grid.Count);
            try
            {
                Periodogram.WindowForSearch(data.AllT, p.Grid.F0, p.Grid.Df, full.AsSpan(0, p.Grid.Count));
                for (int i = 0; i < wy.Length; i++) wy[i] = full[p.Indices[i]];
            }
            finally { ArrayPool<double>.Shared.Return(full); }
        }
        else SpectralTools.WindowOnGrid(data.AllT, p.Grid.F0, p.Grid.Df, p.Indices, wy);
        for (int i = 0; i < wy.Length; i++) wy[i] = Math.Round(wy[i], PlotPowerDecimals);
        return r with { Window = new Curve(r.Periodogram.X, wy) };
    }

    private static bool OffsetsMatter(SearchData data, IReadOnlyList<ObserverOffset> offsets)
    {
        foreach (var b in data.Bands)
        {
            if (!(b.Chi2Mean > 0)) continue;
            var o = new double[b.Observers.Length];
            foreach (var x in offsets)
                if (x.Band == b.Band) { int j = Array.IndexOf(b.Observers, x.Observer); if (j >= 0) o[j] = x.Offset; }
            double sw = 0, swo = 0;
            for (int i = 0; i < b.Count; i++) { sw += b.W[i]; swo += b.W[i] * o[b.Obs[i]]; }
            double mean = swo / sw, ss = 0;
            for (int i = 0; i < b.Count; i++) { double d = o[b.Obs[i]] - mean; ss += b.W[i] * d * d; }
            if (ss > OffsetSecondPassShare * b.Chi2Mean) return true;
        }
        return false;
    }

    private static (PeriodSearchResult Result, PlotIndices? Plot) SearchOnce(SearchData data, PulsatorClass cls, PeriodSearchSettings s)
    {
        var result = new PeriodSearchResult
        {
            BaselineDays = data.Baseline, PointsUsed = data.Count, Seed = s.Seed,
            Bands = data.Bands.Select(b => b.Band).ToArray(), SkippedBands = data.SkippedBands,
            Method = MethodName(data, 0),
        };
        if (data.Count < PeriodFinder.MinPoints) return (result with { FailureReason = "too_few_points" }, null);
        if (FrequencyGrid.Build(data.Baseline, cls, s) is not { } grid) return (result with { FailureReason = "baseline_too_short" }, null);
        int harmonics = Math.Clamp(s.RankingHarmonics ?? DefaultHarmonics(cls), 1, 8);
        result = result with
        {
            MinFrequency = grid.F0, FrequencyStep = grid.Df, FrequencyCount = grid.Count, MaxFrequency = grid.FMax,
            RankingHarmonics = harmonics, Method = MethodName(data, harmonics),
        };
        var notes = new List<string>();
        if (grid.Capped) notes.Add("grid_capped");
        foreach (var b in data.SkippedBands) notes.Add("band_too_few_points:" + b);

        double chi0 = data.Bands.Sum(b => b.Chi2Mean);
        if (!(chi0 > 0) || !double.IsFinite(chi0))
            return (result with { FailureReason = "no_significant_period", Notes = [.. notes, "no_variance"] }, null);

        // The grid-sized buffers (tens of thousands of frequencies: large-object-heap size) are pooled; fresh ones per
        // star cost a full garbage collection every few stars.
        double[] powerBuf = ArrayPool<double>.Shared.Rent(grid.Count), tmpBuf = ArrayPool<double>.Shared.Rent(grid.Count);
        try
        {
            return SearchGrid(data, cls, grid, s, result, notes, chi0, harmonics, powerBuf.AsSpan(0, grid.Count), tmpBuf.AsSpan(0, grid.Count));
        }
        finally
        {
            ArrayPool<double>.Shared.Return(tmpBuf);
            ArrayPool<double>.Shared.Return(powerBuf);
        }
    }

    private static (PeriodSearchResult Result, PlotIndices? Plot) SearchGrid(SearchData data, PulsatorClass cls, FrequencyGrid grid, PeriodSearchSettings s,
        PeriodSearchResult result, List<string> notes, double chi0, int harmonics, Span<double> power, Span<double> tmp)
    {
        string gridMethod = CombinedPower(data, grid, power, tmp);
        result = result with { Method = MethodName(gridMethod, data, harmonics) };
        var candidates = DistinctPeaks(power, grid, 1.0 / data.Baseline, Math.Max(s.Candidates, s.TopPeaks));
        if (candidates.Count == 0)
            return (result with { FailureReason = "no_significant_period", Notes = [.. notes, "no_peak"], Periodogram = Thinned(power, grid, SpectralTools.Thin(power)) }, null);

        var refined = new List<Candidate>(candidates.Count);
        foreach (var k in candidates) refined.Add(new Candidate(grid.At(k), power[k]) { OnGrid = true });

        // Re-rank with the multi-harmonic model + observer zero points.
        var orders = data.Bands.Select(b => HarmonicFit.SupportedHarmonics(b, harmonics)).ToArray();
        var refChi2 = data.Bands.Select(b => HarmonicFit.Fit(b, 0, 0) ?? b.Chi2Mean).ToArray();
        double chiRef = refChi2.Sum();
        bool modelUsable = orders.Any(o => o > 0) && chiRef > 0;
        // Without the model the candidates are ranked by GLS power itself, so every one is refined first.
        if (!modelUsable) RefineGlsPeaks(data, grid, refined);
        if (modelUsable)
        {
            // Every candidate at its grid frequency first (at most half a grid step, 1/(2 n0 T), from the peak: the model
            // chi2 there is within a few % of the peak's chi2 drop of its local minimum); only the best few get the
            // (costlier) local minimisation over +-2 grid steps, which holds the model optimum.
            foreach (var c in refined)
            {
                double v = HarmonicFit.TotalChi2(data.Bands, orders, refChi2, c.Frequency);
                if (double.IsFinite(v)) { c.ModelFrequency = c.Frequency; c.ModelChi2 = v; }
            }
            foreach (var c in refined.Where(c => c.ModelChi2 is not null).OrderBy(c => c.ModelChi2).Take(RankingRefined).ToList())
            {
                // Half a grid step apart (the peak is ~n0 steps wide: the vertex lands within ~1e-2 step of the
                // minimum, plenty for ranking; the refinement fit starts from it), shifted up to +-2 steps.
                double h = 0.5 * grid.Df;
                var (x, v) = Brent.ParabolicNear(f => HarmonicFit.TotalChi2(data.Bands, orders, refChi2, f), c.Frequency, c.ModelChi2!.Value, h, 4);
                if (double.IsFinite(v) && v < c.ModelChi2) { c.ModelFrequency = x; c.ModelChi2 = v; }
            }
        }
        var ranked = refined
            .OrderBy(c => c.ModelChi2 ?? double.PositiveInfinity)
            .ThenByDescending(c => c.Power)
            .ToList();

        Candidate? doubleCandidate = null;
        if (modelUsable && (s.ConsiderDoublePeriod ?? cls == PulsatorClass.TypeIICepheid)
            && DoublePeriod(data, grid, ranked[0], orders, refChi2) is { } dbl)
        {
            // On real RV Tau data the alternation can be genuine and still not be what a catalogue quotes, so by
            // default the double period is listed for the reviewer, not chosen.
            if (s.PreferDoublePeriod) { ranked.Insert(0, dbl); notes.Add("double_period_preferred"); }
            else { doubleCandidate = dbl; notes.Add("double_period_favoured"); }
        }

        double tol = Math.Max(0.5 / data.Baseline, 2 * grid.Df);
        var peaks = new List<PeriodPeak>();
        var stronger = new List<double>();
        var listed = ranked.Take(Math.Max(1, s.TopPeaks)).ToList();
        // The listed peaks are given at the maximum of the combined GLS (the grid step is 1/(n0 T); the peak is
        // known to a small fraction of it); the ranking above did not need it.
        if (modelUsable) RefineGlsPeaks(data, grid, listed);
        foreach (var c in listed)
        {
            var (fap, method) = Fap(c.Power, data, grid);
            var aliases = AliasLabels.For(c.Frequency, stronger, tol);
            double? mp = c.ModelChi2 is { } mc ? Math.Clamp(1 - mc / chiRef, 0, 1) : null;
            peaks.Add(new PeriodPeak(c.Frequency, c.Power, fap, method, aliases)
            {
                ModelPower = mp, ModelFrequency = c.ModelChi2 is null ? null : c.ModelFrequency,
            });
            stronger.Add(c.Frequency);
        }

        if (doubleCandidate is { } dc)
        {
            var (fap, method) = Fap(dc.Power, data, grid);
            peaks.Add(new PeriodPeak(dc.Frequency, dc.Power, fap, method, AliasLabels.For(dc.Frequency, stronger, tol))
            {
                ModelPower = Math.Clamp(1 - dc.ModelChi2!.Value / chiRef, 0, 1), ModelFrequency = dc.ModelFrequency,
            });
        }

        var offsets = modelUsable && ranked[0].ModelChi2 is not null
            ? ObserverOffsets(data.Bands, orders, ranked[0].ModelFrequency)
            : [];

        double? bootFap = null;
        if (s.BootstrapSamples > 0)
        {
            bootFap = BootstrapFap(data, grid, peaks[0].Power, s.BootstrapSamples, s.Seed);
        }

        var plotIdx = SpectralTools.Thin(power);
        var plot = Thinned(power, grid, plotIdx);

        // Detection asks whether any listed peak is significant; which of them is the period is the ranking's job
        // (a preferred double period has little single-sinusoid power of its own).
        double bestFap = bootFap ?? peaks.Min(p => p.Fap ?? 1.0);

        // The GLS runs on raw magnitudes, where observer zero points that follow the time of night (observers at
        // different sites) look like a 1 c/d signal. The detection must also beat the constants-and-offsets model.
        double? modelFap = null;
        if (modelUsable && ranked[0].ModelChi2 is { } bestChi2)
        {
            int free = 0, total = 0;
            for (int b = 0; b < data.Bands.Count; b++)
            {
                int m = data.Bands[b].Observers.Length;
                total += orders[b] > 0 ? HarmonicFit.ParamCount(orders[b], m) : HarmonicFit.ParamCount(0, m);
                free += 2 * orders[b];
            }
            modelFap = FalseAlarm.Model(Math.Clamp(1 - bestChi2 / chiRef, 0, 1), data.Count, free, total, orders.Max(), grid.FMax, data.Baseline);
        }
        return (result with
        {
            FailureReason = bestFap > s.MaxFalseAlarmProbability || modelFap > s.MaxFalseAlarmProbability ? "no_significant_period" : null,
            ModelFap = modelFap,
            Peaks = peaks,
            Periodogram = plot,
            ObserverOffsets = offsets,
            BootstrapFap = bootFap,
            BootstrapSamples = Math.Max(0, s.BootstrapSamples),
            Notes = notes,
        }, new PlotIndices(grid, plotIdx));
    }

    /// <summary>
    /// RV Tauri stars alternate deep and shallow minima: the strongest peak is then at twice the formal frequency.
    /// The model at f/2 with twice the harmonics contains the model at f exactly (nested), so it is preferred only
    /// when BIC says the extra (odd half-) harmonics are real: chi2 drop > sum_b (extra parameters_b) ln N_b, with chi2
    /// in units of the residual variance (scaled by max(1, chi2_red)).
    /// </summary>
    private static Candidate? DoublePeriod(SearchData data, FrequencyGrid grid, Candidate best, int[] orders, double[] refChi2)
    {
        if (best.ModelChi2 is not { } parentChi2) return null;
        double fh = best.ModelFrequency / 2;
        if (fh < grid.F0) return null;
        var doubled = new int[orders.Length];
        double penalty = 0;
        for (int b = 0; b < orders.Length; b++)
        {
            if (orders[b] <= 0) continue;
            int k2 = HarmonicFit.SupportedHarmonics(data.Bands[b], 2 * orders[b]);
            if (k2 < 2 * orders[b]) return null;
            doubled[b] = k2;
            penalty += 2 * (k2 - orders[b]) * Math.Log(data.Bands[b].Count);
        }
        var (x, v) = Brent.Minimize(f => HarmonicFit.TotalChi2(data.Bands, doubled, refChi2, f), fh - grid.Df, fh + grid.Df, grid.Df * 1e-3);
        // Residual chi2 per degree of freedom of the larger model scales the test: real light curves with
        // cycle-to-cycle changes leave structured residuals that extra harmonics always reduce a little.
        int dof = 0;
        for (int b = 0; b < orders.Length; b++)
            if (orders[b] > 0) dof += data.Bands[b].Count - HarmonicFit.ParamCount(doubled[b], data.Bands[b].Observers.Length);
        double scale = dof > 0 ? Math.Max(1, v / dof) : double.PositiveInfinity;
        if (!(parentChi2 - v > penalty * scale)) return null;
        return new Candidate(x, CombinedPowerAt(data, x)) { ModelFrequency = x, ModelChi2 = v };
    }

    /// <summary>Decimals kept in the plotted curves (periodogram and window; the peaks keep full precision): 1e-7 c/d is
    /// far below any grid step a plot can show, 1e-5 in power below a pixel. Rounded values print short, which
    /// halves the stored result (the curves are most of it) and the time spent writing it.</summary>
    internal const int PlotFrequencyDecimals = 7, PlotPowerDecimals = 5;

    private static Curve Thinned(ReadOnlySpan<double> power, FrequencyGrid grid, int[] idx)
    {
        var x = new double[idx.Length];
        var y = new double[idx.Length];
        for (int i = 0; i < idx.Length; i++)
        {
            x[i] = Math.Round(grid.At(idx[i]), PlotFrequencyDecimals);
            y[i] = Math.Round(power[idx[i]], PlotPowerDecimals);
        }
        return new Curve(x, y);
    }

    internal static int DefaultHarmonics(PulsatorClass cls) => cls switch
    {
        PulsatorClass.ClassicalCepheidFirstOvertone or PulsatorClass.RRLyraeC => 2,
        _ => 3,
    };

    private static string MethodName(SearchData data, int harmonics) => MethodName(Periodogram.GlsVariantName, data, harmonics);

    private static string MethodName(string gridMethod, SearchData data, int harmonics)
        => string.Create(CultureInfo.InvariantCulture,
            $"gls[{gridMethod}] x{data.Bands.Count} band(s), chi2-weighted; ranked by {harmonics}-harmonic fit with observer offsets");

    /// <summary>chi2_0-weighted multiband GLS power on the grid.</summary>
    internal static double[] CombinedPower(SearchData data, FrequencyGrid grid)
    {
        var power = new double[grid.Count];
        CombinedPower(data, grid, power, data.Bands.Count > 1 ? new double[grid.Count] : power);
        return power;
    }

    /// <summary>As above into <paramref name="power"/> (grid.Count long); <paramref name="tmp"/> is scratch of the same length
    /// (may be <paramref name="power"/> itself for one band). Long grids go through <see cref="Periodogram.GlsForSearch"/>
    /// (NUFFT within a few 1e-10 of the exact power when that is clearly cheaper; every peak is then refined with the exact
    /// kernel); returns the kernel(s) used, for the result's method.</summary>
    internal static string CombinedPower(SearchData data, FrequencyGrid grid, Span<double> power, Span<double> tmp)
    {
        power.Clear();
        double chi0 = data.Bands.Sum(b => b.Chi2Mean);
        if (data.Bands.Count == 1)
        {
            if (data.Bands[0].Chi2Mean > 0) return Periodogram.GlsForSearch(data.Bands[0].T, data.Bands[0].Y, data.Bands[0].W, grid.F0, grid.Df, power);
            return Periodogram.GlsVariantName;
        }
        string? method = null;
        foreach (var b in data.Bands)
        {
            if (!(b.Chi2Mean > 0)) continue;
            string m = Periodogram.GlsForSearch(b.T, b.Y, b.W, grid.F0, grid.Df, tmp);
            if (method is null) method = m;
            else if (!method.Split('+').Contains(m)) method += "+" + m;
            double wgt = b.Chi2Mean;
            for (int k = 0; k < power.Length; k++) power[k] += wgt * tmp[k];
        }
        for (int k = 0; k < power.Length; k++) power[k] /= chi0;
        return method ?? Periodogram.GlsVariantName;
    }

    /// <summary>Moves each grid candidate to the combined-GLS maximum near it, keeping the grid value when refinement
    /// finds nothing higher (others, e.g. a double period placed by its model, stay where they are).</summary>
    private static void RefineGlsPeaks(SearchData data, FrequencyGrid grid, List<Candidate> candidates)
    {
        for (int i = 0; i < candidates.Count; i++)
        {
            var c = candidates[i];
            if (!c.OnGrid) continue;
            var (x, v) = RefinePeak(data, c.Frequency, grid.Df);
            if (v >= c.Power)
                candidates[i] = new Candidate(x, v) { ModelFrequency = c.ModelFrequency, ModelChi2 = c.ModelChi2 };
        }
    }

    /// <summary>
    /// Maximum of the combined power near grid peak <paramref name="fk"/>: 33 frequencies over +- df (step df/16), a
    /// parabola through the best three, one last evaluation there. The peak is ~n0 grid steps wide, so at step df/16
    /// the parabola's vertex is off by ~(df/16)^2 / (n0 df), a few 1e-4 df. One kernel call per band: a call has a
    /// fixed cost far above that of one frequency, so this beats a point-by-point 1-D search.
    /// </summary>
    internal static (double F, double Power) RefinePeak(SearchData data, double fk, double df)
    {
        const int m = 33;
        double center = fk, half = df, bestF = fk, bestP = double.NegativeInfinity;
        double step = 2 * half / (m - 1);
        var g = new FrequencyGrid(center - half, step, m, false);
        double[] p = CombinedPower(data, g);
        int j = 0;
        for (int i = 1; i < m; i++) if (p[i] > p[j]) j = i;
        if (p[j] > bestP) { bestP = p[j]; bestF = g.At(j); }
        center = g.At(j);
        if (j > 0 && j < m - 1)
        {
            double denom = p[j - 1] - 2 * p[j] + p[j + 1];
            if (denom < 0)
            {
                double fx = center + 0.5 * step * (p[j - 1] - p[j + 1]) / denom;
                double px = CombinedPowerAt(data, fx);
                if (px > bestP) { bestP = px; bestF = fx; }
            }
        }
        return (bestF, bestP);
    }

    internal static double CombinedPowerAt(SearchData data, double f)
    {
        Span<double> one = stackalloc double[1];
        double num = 0, den = 0;
        foreach (var b in data.Bands)
        {
            den += b.Chi2Mean;
            if (!(b.Chi2Mean > 0)) continue;
            Periodogram.Gls(b.T, b.Y, b.W, f, 0, one);
            num += b.Chi2Mean * one[0];
        }
        return den > 0 ? num / den : 0;
    }

    /// <summary>
    /// Grid indices of the highest interior local maxima, each more than <paramref name="separation"/> from every
    /// higher one kept. Maxima at the grid edges are not resolved peaks and are left out.
    /// </summary>
    internal static List<int> DistinctPeaks(ReadOnlySpan<double> p, FrequencyGrid grid, double separation, int count)
    {
        var maxima = new List<int>();
        for (int k = 1; k < p.Length - 1; k++)
            if (p[k] > p[k - 1] && p[k] >= p[k + 1] && p[k] > 0) maxima.Add(k);
        // Sort by descending power through a key array: a comparison delegate over thousands of maxima cost more
        // than the rest of this method.
        var idx = maxima.ToArray();
        var keys = new double[idx.Length];
        for (int i = 0; i < idx.Length; i++) keys[i] = -p[idx[i]];
        Array.Sort(keys, idx);
        var kept = new List<int>();
        foreach (int k in idx)
        {
            double f = grid.At(k);
            bool distinct = true;
            foreach (int j in kept)
                if (Math.Abs(grid.At(j) - f) <= separation) { distinct = false; break; }
            if (distinct) kept.Add(k);
            if (kept.Count >= count) break;
        }
        return kept;
    }

    internal static (double? Fap, string Method) Fap(double z, SearchData data, FrequencyGrid grid)
    {
        if (data.Bands.Count == 1)
            return (FalseAlarm.Baluev(z, data.Count, WeightedVariance(data.AllT, data.AllW), grid.FMax), FalseAlarm.BaluevMethod);
        return (FalseAlarm.Multiband(z, data.Count, data.Bands.Count, grid.FMax, data.Baseline), FalseAlarm.MultibandMethod);
    }

    internal static double WeightedVariance(double[] t, double[] w)
    {
        double sw = 0, st = 0, stt = 0;
        for (int i = 0; i < t.Length; i++) { sw += w[i]; st += w[i] * t[i]; }
        if (!(sw > 0)) return 0;
        double mean = st / sw;
        for (int i = 0; i < t.Length; i++) { double d = t[i] - mean; stt += w[i] * d * d; }
        return stt / sw;
    }

    internal static IReadOnlyList<ObserverOffset> ObserverOffsets(IReadOnlyList<BandSeries> bands, int[] orders, double f)
    {
        var list = new List<ObserverOffset>();
        for (int bi = 0; bi < bands.Count; bi++)
        {
            var b = bands[bi];
            int k = orders[bi], m = b.Observers.Length;
            if (k <= 0) continue;
            int p = HarmonicFit.ParamCount(k, m);
            var x = new double[p];
            var cov = new double[p * p];
            if (HarmonicFit.Fit(b, f, k, x, cov) is not { } chi2) continue;
            double scale = Math.Max(1, chi2 / Math.Max(1, b.Count - p));
            list.Add(new ObserverOffset(b.Band, b.Observers[0], 0, 0, b.ObserverCounts[0]));
            for (int j = 1; j < m; j++)
            {
                int idx = 1 + 2 * k + j - 1;
                list.Add(new ObserverOffset(b.Band, b.Observers[j], x[idx], Math.Sqrt(cov[idx * p + idx] * scale), b.ObserverCounts[j]));
            }
        }
        return list;
    }

    /// <summary>
    /// Bootstrap FAP (SCIENCE.md 1.6): times kept, (magnitude, error) pairs resampled with replacement within each
    /// band, maximum combined power over the same grid; FAP = (1 + #{max >= z}) / (1 + B). Seeded, so reproducible.
    /// </summary>
    internal static double BootstrapFap(SearchData data, FrequencyGrid grid, double z, int samples, int seed)
    {
        var rng = new Random(seed);
        int above = 0;
        for (int b = 0; b < samples; b++)
        {
            var bands = new List<BandSeries>(data.Bands.Count);
            foreach (var s in data.Bands)
            {
                int n = s.Count;
                var y = new double[n]; var w = new double[n];
                for (int i = 0; i < n; i++) { int j = rng.Next(n); y[i] = s.Y[j]; w[i] = s.W[j]; }
                double ws = 0, wy = 0;
                for (int i = 0; i < n; i++) { ws += w[i]; wy += w[i] * y[i]; }
                double ybar = wy / ws, chi0 = 0;
                for (int i = 0; i < n; i++) { double d = y[i] - ybar; chi0 += w[i] * d * d; }
                bands.Add(new BandSeries
                {
                    Band = s.Band, T = s.T, Y = y, W = w, Obs = s.Obs, Observers = s.Observers,
                    ObserverCounts = s.ObserverCounts, Chi2Mean = chi0, YMean = ybar,
                });
            }
            var sd = new SearchData
            {
                Bands = bands, ReferenceEpoch = data.ReferenceEpoch, Baseline = data.Baseline, UsablePoints = data.UsablePoints,
                SkippedBands = data.SkippedBands, Count = data.Count, AllT = data.AllT, AllW = data.AllW,
            };
            var p = CombinedPower(sd, grid);
            double max = 0;
            foreach (double v in p) max = Math.Max(max, v);
            if (max >= z) above++;
        }
        return (1.0 + above) / (1.0 + samples);
    }

    // ---------------------------------------------------------------------------------------------------------------

    public static PeriodEstimate Refine(IReadOnlyList<LightCurvePoint> points, double frequency, PeriodSearchResult? search, PeriodSearchSettings s)
    {
        var data = SearchData.Prepare(points);
        double T = data.Baseline;
        PeriodEstimate Unrefined(string reason)
        {
            double f = frequency > 0 && double.IsFinite(frequency) ? frequency : 0;
            double p = f > 0 ? 1 / f : 0;
            double fErr = T > 0 ? 1 / T : f;
            return new PeriodEstimate
            {
                FailureReason = reason, Method = "unrefined", Frequency = f, PeriodDays = p,
                FrequencyErr = fErr, PeriodErrDays = f > 0 ? fErr / (f * f) : 0, ReferenceEpochBjd = data.ReferenceEpoch,
            };
        }
        if (!(frequency > 0) || !double.IsFinite(frequency)) return Unrefined("invalid_frequency");
        if (data.Count < PeriodFinder.MinPoints) return Unrefined("too_few_points");
        if (!(T > 0)) return Unrefined("baseline_too_short");
        if (!(data.Bands.Sum(b => b.Chi2Mean) > 0)) return Unrefined("no_variance");

        // Local search around the given frequency: the caller may pass a reviewer's period that is not a grid peak.
        int startK = Math.Max(1, Math.Min(3, s.MaxRefineHarmonics));
        var startOrders = data.Bands.Select(b => HarmonicFit.SupportedHarmonics(b, startK)).ToArray();
        if (startOrders.All(o => o <= 0)) return Unrefined("too_few_points");
        var refChi2 = data.Bands.Select(b => HarmonicFit.Fit(b, 0, 0) ?? b.Chi2Mean).ToArray();
        double half = 0.5 / T;
        const int steps = 20;
        double stepF = 2 * half / steps;
        double Chi2(double f) => HarmonicFit.TotalChi2(data.Bands, startOrders, refChi2, f);
        double fb;
        if (ModelMinimumNear(search, frequency, half) is { } hint)
        {
            // The search already minimised its harmonic model (same data, a model of similar order) next to this peak:
            // the minimum of this model lies a small fraction of a step from it. Two parabolic zooms (steps stepF/2,
            // then stepF/32) put the start within ~1e-5 of a grid step of it, far inside the refinement fit's reach.
            var (x1, c1) = Brent.ParabolicNear(Chi2, hint, Chi2(hint), stepF / 2, 4);
            (fb, _) = Brent.ParabolicNear(Chi2, x1, c1, stepF / 32, 4);
        }
        else
        {
            double bestF = frequency, bestC = double.PositiveInfinity;
            for (int i = 0; i <= steps; i++)
            {
                double f = frequency - half + 2 * half * i / steps;
                if (f <= 0) continue;
                double c = Chi2(f);
                if (c < bestC) { bestC = c; bestF = f; }
            }
            (fb, _) = Brent.Minimize(Chi2, Math.Max(bestF - stepF, 1e-12), bestF + stepF, stepF * 1e-6);
        }

        // Order per band by BIC at that frequency.
        var orders = new int[data.Bands.Count];
        for (int b = 0; b < data.Bands.Count; b++)
        {
            var band = data.Bands[b];
            int kmax = HarmonicFit.SupportedHarmonics(band, Math.Clamp(s.MaxRefineHarmonics, 1, 12));
            double bestBic = double.PositiveInfinity;
            for (int k = 1; k <= kmax; k++)
            {
                if (HarmonicFit.Fit(band, fb, k) is not { } c2) continue;
                double bic = c2 + HarmonicFit.ParamCount(k, band.Observers.Length) * Math.Log(band.Count);
                if (bic < bestBic) { bestBic = bic; orders[b] = k; }
            }
        }
        if (orders.All(o => o <= 0)) return Unrefined("too_few_points");

        var sol = FourierRefiner.Fit(data.Bands, orders, fb);
        // A converged solution must stay on the peak it started from.
        if (sol is null || Math.Abs(sol.Frequency - fb) > half || !(sol.Frequency > 0))
            return Unrefined("refinement_failed");

        double freq = sol.Frequency, fErrV = sol.FrequencyErr;
        var offsets = new List<ObserverOffset>();
        for (int b = 0; b < data.Bands.Count; b++)
        {
            int k = orders[b];
            if (k <= 0) continue;
            var band = data.Bands[b];
            offsets.Add(new ObserverOffset(band.Band, band.Observers[0], 0, 0, band.ObserverCounts[0]));
            for (int j = 1; j < band.Observers.Length; j++)
            {
                int idx = 1 + 2 * k + j - 1;
                offsets.Add(new ObserverOffset(band.Band, band.Observers[j], sol.BandParams[b][idx], sol.BandParamErr[b][idx], band.ObserverCounts[j]));
            }
        }

        // PDM on offset-corrected magnitudes, candidates = this period and the search's other peaks.
        var groups = new List<(double[] T, double[] Y)>();
        for (int b = 0; b < data.Bands.Count; b++)
        {
            var band = data.Bands[b];
            var y = (double[])band.Y.Clone();
            int k = orders[b];
            if (k > 0)
                for (int i = 0; i < y.Length; i++)
                    if (band.Obs[i] > 0) y[i] -= sol.BandParams[b][1 + 2 * k + band.Obs[i] - 1];
            groups.Add((band.T, y));
        }
        double tFirst = data.AllT.Length > 0 ? data.AllT.Min() : 0;
        int bins = Math.Clamp(s.PdmBins, 2, 100);
        var pdm = new List<PdmCandidate> { new(1 / freq, SpectralTools.PdmTheta(groups, 1 / freq, bins, tFirst)) };
        if (search?.Peaks is { } peaks)
        {
            foreach (var pk in peaks)
            {
                if (!(pk.Frequency > 0) || Math.Abs(pk.Frequency - freq) <= half) continue;
                pdm.Add(new PdmCandidate(1 / pk.Frequency, SpectralTools.PdmTheta(groups, 1 / pk.Frequency, bins, tFirst)));
            }
        }
        double? theta0 = pdm[0].Theta;
        var best = pdm.Where(c => c.Theta is not null).OrderBy(c => c.Theta).FirstOrDefault();
        bool disagrees = theta0 is { } th && best is not null && !ReferenceEquals(best, pdm[0])
            && best.Theta < th * (1 - Math.Clamp(s.PdmClearMargin, 0, 0.99));

        return new PeriodEstimate
        {
            Frequency = freq, FrequencyErr = fErrV, PeriodDays = 1 / freq, PeriodErrDays = fErrV / (freq * freq),
            Method = "refined", PdmTheta = theta0, PdmPreferredPeriodDays = best?.PeriodDays, PdmDisagrees = disagrees,
            Orders = data.Bands.Select((b, i) => new BandOrder(b.Band, orders[i], b.Count)).ToArray(),
            Chi2Reduced = sol.Chi2Reduced, FrequencyErrMo99 = Mo99ForBestBand(data, orders, sol),
            ReferenceEpochBjd = data.ReferenceEpoch, ObserverOffsets = offsets, PdmCandidates = pdm,
        };
    }

    /// <summary>
    /// Where the search's harmonic model had its minimum for the peak at exactly <paramref name="frequency"/> (the
    /// pipeline refines the search's own peak), when that lies within <paramref name="step"/> of it (the range the full
    /// local scan would cover); null for any other frequency (a reviewer's period), which gets the full scan.
    /// </summary>
    private static double? ModelMinimumNear(PeriodSearchResult? search, double frequency, double step)
    {
        if (search?.Peaks is not { } peaks) return null;
        foreach (var p in peaks)
            if (p.Frequency == frequency && p.ModelFrequency is { } mf && mf > 0 && Math.Abs(mf - frequency) <= step)
                return mf;
        return null;
    }

    /// <summary>Montgomery &amp; O'Donoghue (1999): sigma_f = sqrt(6/N) sigma_m / (pi T A).</summary>
    internal static double Mo99FrequencyError(int n, double sigmaM, double baseline, double amplitude)
        => Math.Sqrt(6.0 / n) * sigmaM / (Math.PI * baseline * amplitude);

    private static double? Mo99ForBestBand(SearchData data, int[] orders, FourierSolution sol)
    {
        double? best = null;
        double bestInfo = 0;
        for (int b = 0; b < data.Bands.Count; b++)
        {
            if (orders[b] <= 0) continue;
            var band = data.Bands[b];
            var x = sol.BandParams[b];
            double amp = Math.Sqrt(x[1] * x[1] + x[2] * x[2]);
            // rms residual of the fitted model (unweighted, per degree of freedom of the linear fit).
            int k = orders[b], p = x.Length;
            double ss = HarmonicFit.ResidualSumOfSquares(band, sol.Frequency, k, x);
            if (band.Count <= p) continue;
            double sigma = Math.Sqrt(ss / (band.Count - p));
            double tb = band.T.Max() - band.T.Min();
            if (!(amp > 0) || !(sigma > 0) || !(tb > 0)) continue;
            double info = band.Count * amp * amp / (sigma * sigma);
            if (info > bestInfo)
            {
                bestInfo = info;
                best = Mo99FrequencyError(band.Count, sigma, tb, amp);
            }
        }
        return best is { } v && double.IsFinite(v) ? v : null;
    }
}
