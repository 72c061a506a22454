namespace PulseLadder.Core.PeriodSearch;

/// <summary>Outcome of the nonlinear fit with the frequency free.</summary>
internal sealed record FourierSolution(
    double Frequency,
    double FrequencyErr,
    double Chi2,
    int Dof,
    double Chi2Reduced,
    int[] Orders,
    double[][] BandParams,
    double[][] BandParamErr,
    int Iterations,
    bool Converged);

/// <summary>
/// Levenberg-Marquardt fit of the multiband Fourier model with one shared frequency (SCIENCE.md 1.10):
/// per band m_b(t) = c_b + sum_k [a_bk cos 2 pi k f t + b_bk sin 2 pi k f t] + o_(b,observer), t relative to the
/// weighted mean time. Covariance (J^T W J)^-1 scaled by max(1, chi2_red).
/// </summary>
internal static class FourierRefiner
{
    public static FourierSolution? Fit(IReadOnlyList<BandSeries> bands, int[] orders, double f0, int maxIter = 60)
    {
        int nb = bands.Count;
        var offsets = new int[nb];
        int np = 1;
        for (int b = 0; b < nb; b++)
        {
            offsets[b] = np;
            if (orders[b] > 0) np += HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length);
        }
        var theta = new double[np];
        theta[0] = f0;
        int nPoints = 0;
        for (int b = 0; b < nb; b++)
        {
            if (orders[b] <= 0) continue;
            int p = HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length);
            if (HarmonicFit.Fit(bands[b], f0, orders[b], theta.AsSpan(offsets[b], p)) is null) return null;
            nPoints += bands[b].Count;
        }
        if (nPoints <= np) return null;

        var jtj = new double[np * np];
        var jtr = new double[np];
        var trial = new double[np];
        var step = new double[np];
        var a = new double[np * np];
        double chi2 = Evaluate(bands, orders, offsets, theta, null, null);
        if (!double.IsFinite(chi2)) return null;
        double lambda = 1e-3;
        int iter = 0;
        bool converged = false;
        for (; iter < maxIter; iter++)
        {
            Evaluate(bands, orders, offsets, theta, jtj, jtr);
            bool improved = false;
            for (int attempt = 0; attempt < 12 && !improved; attempt++)
            {
                Array.Copy(jtj, a, jtj.Length);
                for (int i = 0; i < np; i++) a[i * np + i] *= 1 + lambda;
                Array.Copy(jtr, step, np);
                if (!SmallMatrix.Cholesky(a, np)) { lambda *= 10; continue; }
                SmallMatrix.Solve(a, np, step);
                for (int i = 0; i < np; i++) trial[i] = theta[i] + step[i];
                double c2 = Evaluate(bands, orders, offsets, trial, null, null);
                if (double.IsFinite(c2) && c2 <= chi2)
                {
                    double rel = (chi2 - c2) / Math.Max(chi2, 1e-300);
                    Array.Copy(trial, theta, np);
                    chi2 = c2;
                    lambda = Math.Max(lambda / 10, 1e-12);
                    improved = true;
                    if (rel < 1e-13) converged = true;
                }
                else lambda *= 10;
            }
            if (!improved) { converged = true; break; }
            if (converged) break;
        }

        // Covariance at the solution, undamped.
        Evaluate(bands, orders, offsets, theta, jtj, jtr);
        if (!SmallMatrix.Cholesky(jtj, np)) return null;
        var cov = new double[np * np];
        SmallMatrix.Inverse(jtj, np, cov);
        int dof = nPoints - np;
        double red = chi2 / dof;
        double scale = Math.Max(1.0, red);
        double fErr = Math.Sqrt(cov[0] * scale);
        var bp = new double[nb][];
        var be = new double[nb][];
        for (int b = 0; b < nb; b++)
        {
            if (orders[b] <= 0) { bp[b] = []; be[b] = []; continue; }
            int p = HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length);
            bp[b] = theta.AsSpan(offsets[b], p).ToArray();
            be[b] = new double[p];
            for (int i = 0; i < p; i++) be[b][i] = Math.Sqrt(cov[(offsets[b] + i) * np + offsets[b] + i] * scale);
        }
        if (!double.IsFinite(fErr) || !double.IsFinite(theta[0])) return null;
        return new FourierSolution(theta[0], fErr, chi2, dof, red, orders, bp, be, iter, converged);
    }

    /// <summary>chi2 at <paramref name="theta"/>; when <paramref name="jtj"/> is given also J^T W J and J^T W r.</summary>
    private static double Evaluate(IReadOnlyList<BandSeries> bands, int[] orders, int[] offsets, double[] theta, double[]? jtj, double[]? jtr)
    {
        int np = theta.Length;
        if (jtj is not null) { Array.Clear(jtj); Array.Clear(jtr!); }
        double f = theta[0], chi2 = 0;
        int width = 1;
        for (int b = 0; b < bands.Count; b++)
            if (orders[b] > 0) width = Math.Max(width, 1 + HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length));
        Span<double> row = width <= 64 ? stackalloc double[width] : new double[width];
        Span<int> idx = width <= 64 ? stackalloc int[width] : new int[width];
        for (int b = 0; b < bands.Count; b++)
        {
            int k = orders[b];
            if (k <= 0) continue;
            var s = bands[b];
            int m = s.Observers.Length;
            int p = HarmonicFit.ParamCount(k, m);
            int off = offsets[b];
            var x = theta.AsSpan(off, p);
            for (int i = 0; i < s.Count; i++)
            {
                var r = row[..(p + 1)];
                HarmonicFit.Row(f, s.T[i], s.Obs[i], k, m, r[1..]);
                double mdl = 0, dmdf = 0;
                for (int j = 0; j < p; j++) mdl += r[1 + j] * x[j];
                for (int h = 1; h <= k; h++)
                {
                    // d/df [a cos(2 pi h f t) + b sin(2 pi h f t)] = 2 pi h t (-a sin + b cos)
                    dmdf += 2 * Math.PI * h * s.T[i] * (-x[2 * h - 1] * r[1 + 2 * h] + x[2 * h] * r[2 * h]);
                }
                r[0] = dmdf;
                double res = s.Y[i] - mdl, w = s.W[i];
                chi2 += w * res * res;
                if (jtj is null) continue;
                // Global index of each local column: 0 is f, then the band's block.
                idx[0] = 0;
                for (int j = 0; j < p; j++) idx[1 + j] = off + j;
                for (int u = 0; u <= p; u++)
                {
                    double wu = w * r[u];
                    if (wu == 0) continue;
                    jtr![idx[u]] += wu * res;
                    for (int v = u; v <= p; v++) jtj[idx[u] * np + idx[v]] += wu * r[v];
                }
            }
        }
        if (jtj is not null)
        {
            // Accumulated into the upper triangle in global indices (idx is increasing), mirror it.
            SmallMatrix.Symmetrize(jtj, np);
        }
        return chi2;
    }
}
