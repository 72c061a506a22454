using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

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
    /// <summary>
    /// Estimated distance to the minimum, in standard errors of every parameter, below which the iteration stops
    /// (common practice: stop once further steps are far below the parameters' errors; here a ten-thousandth).
    /// </summary>
    internal const double StepTolerance = 1e-4;

    public static FourierSolution? Fit(IReadOnlyList<BandSeries> bands, int[] orders, double f0, int maxIter = 60, bool allowVector = true)
    {
        int nb = bands.Count;
        var offsets = new int[nb];
        int np = Offsets(bands, orders, offsets);
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
        double chi2 = Evaluate(bands, orders, offsets, theta, null, null, allowVector);
        if (!double.IsFinite(chi2)) return null;
        double lambda = 1e-3;
        int iter = 0;
        bool converged = false;
        double prevLen = double.NaN;
        bool jtjAtTheta = false;
        for (; iter < maxIter; iter++)
        {
            Evaluate(bands, orders, offsets, theta, jtj, jtr, allowVector);
            jtjAtTheta = true;
            // Undamped Gauss-Newton step from here, its length in standard errors: sqrt(step^T (J^T W J) step)
            // bounds |step_i| / sigma_i for every parameter (Cauchy-Schwarz). With large residuals (chi2_red >> 1)
            // Gauss-Newton converges linearly, so the distance to the minimum is estimated as the geometric series
            // len / (1 - rho), rho the shrink factor of successive lengths. Below StepTolerance the fit stops here
            // and this J^T W J is the covariance's.
            Array.Copy(jtj, a, jtj.Length);
            Array.Copy(jtr, step, np);
            if (SmallMatrix.Cholesky(a, np))
            {
                SmallMatrix.Solve(a, np, step);
                double g = 0;
                for (int i = 0; i < np; i++) g += step[i] * jtr[i];
                double len = Math.Sqrt(Math.Max(g, 0)), rho = len / prevLen;
                prevLen = len;
                if (rho < 1 && len / (1 - rho) < StepTolerance) { converged = true; break; }
            }
            else prevLen = double.NaN;
            bool improved = false;
            for (int attempt = 0; attempt < 12 && !improved; attempt++)
            {
                Array.Copy(jtj, a, jtj.Length);
                for (int i = 0; i < np; i++) a[i * np + i] *= 1 + lambda;
                Array.Copy(jtr, step, np);
                if (!SmallMatrix.Cholesky(a, np)) { lambda *= 10; continue; }
                SmallMatrix.Solve(a, np, step);
                for (int i = 0; i < np; i++) trial[i] = theta[i] + step[i];
                double c2 = Evaluate(bands, orders, offsets, trial, null, null, allowVector);
                if (double.IsFinite(c2) && c2 <= chi2)
                {
                    double rel = (chi2 - c2) / Math.Max(chi2, 1e-300);
                    Array.Copy(trial, theta, np);
                    jtjAtTheta = false;
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
        if (!jtjAtTheta) Evaluate(bands, orders, offsets, theta, jtj, jtr, allowVector);
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

    /// <summary>Start of each band's parameter block in theta (index 0 is the shared frequency); returns the total count.</summary>
    internal static int Offsets(IReadOnlyList<BandSeries> bands, int[] orders, int[] offsets)
    {
        int np = 1;
        for (int b = 0; b < bands.Count; b++)
        {
            offsets[b] = np;
            if (orders[b] > 0) np += HarmonicFit.ParamCount(orders[b], bands[b].Observers.Length);
        }
        return np;
    }

    /// <summary>
    /// chi2 at <paramref name="theta"/>; when <paramref name="jtj"/> is given also J^T W J and J^T W r. Four points at
    /// a time where Vector256 is accelerated (<paramref name="allowVector"/> false forces the scalar definition).
    /// </summary>
    internal static double Evaluate(IReadOnlyList<BandSeries> bands, int[] orders, int[] offsets, double[] theta, double[]? jtj, double[]? jtr, bool allowVector = true)
    {
        int np = theta.Length;
        if (jtj is not null) { Array.Clear(jtj); Array.Clear(jtr!); }
        double chi2 = 0;
        for (int b = 0; b < bands.Count; b++)
        {
            if (orders[b] <= 0) continue;
            var s = bands[b];
            int start = 0;
            if (allowVector && Vector256.IsHardwareAccelerated && s.Count >= Vector256<double>.Count)
                chi2 += EvaluateBandVector(s, orders[b], offsets[b], theta, jtj, jtr, out start);
            if (start < s.Count) chi2 += EvaluateBandScalar(s, orders[b], offsets[b], theta, start, jtj, jtr);
        }
        // Accumulated into the upper triangle in global indices (each band's are increasing), mirror it.
        if (jtj is not null) SmallMatrix.Symmetrize(jtj, np);
        return chi2;
    }

    /// <summary>
    /// Adds points [<paramref name="start"/>, Count) of one band to chi2 and, when given, to the upper triangle of
    /// J^T W J and to J^T W r. The definition the vector path must match.
    /// </summary>
    internal static double EvaluateBandScalar(BandSeries s, int k, int off, double[] theta, int start, double[]? jtj, double[]? jtr)
    {
        int np = theta.Length, m = s.Observers.Length, p = HarmonicFit.ParamCount(k, m);
        double f = theta[0], chi2 = 0;
        Span<double> row = p < 64 ? stackalloc double[p + 1] : new double[p + 1];
        Span<int> idx = p < 64 ? stackalloc int[p + 1] : new int[p + 1];
        // Global index of each local column: 0 is f, then the band's block.
        idx[0] = 0;
        for (int j = 0; j < p; j++) idx[1 + j] = off + j;
        var x = theta.AsSpan(off, p);
        for (int i = start; i < s.Count; i++)
        {
            var r = row;
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
            for (int u = 0; u <= p; u++)
            {
                double wu = w * r[u];
                if (wu == 0) continue;
                jtr![idx[u]] += wu * res;
                for (int v = u; v <= p; v++) jtj[idx[u] * np + idx[v]] += wu * r[v];
            }
        }
        return chi2;
    }

    /// <summary>
    /// <see cref="EvaluateBandScalar"/> four points at a time over the first Count - Count % 4 points
    /// (<paramref name="end"/> is where the scalar remainder starts). As in HarmonicFit.AccumulateVector the observer
    /// columns are indicators: only the frequency column and the 1 + 2K harmonic columns are formed per point, the
    /// observer block is diagonal and its cross terms are masked sums. Sums run in another order than the scalar
    /// path, so results agree to rounding, not bit for bit.
    /// </summary>
    internal static double EvaluateBandVector(BandSeries s, int k, int off, double[] theta, double[]? jtj, double[]? jtr, out int end)
    {
        int np = theta.Length, m = s.Observers.Length, nObs = m - 1;
        int q = 1 + 2 * k, d = q + 1; // dense columns: f, constant, a_1, b_1, ..., a_K, b_K
        bool full = jtj is not null;
        int nTri = d * (d + 1) / 2, jtr0 = nTri, obs0 = nTri + d;
        int nAcc = full ? obs0 + nObs * (d + 1) : 0;
        Span<Vector256<double>> acc = nAcc <= 256 ? stackalloc Vector256<double>[nAcc] : new Vector256<double>[nAcc];
        Span<Vector256<double>> r = d <= 64 ? stackalloc Vector256<double>[d] : new Vector256<double>[d];
        Span<Vector256<double>> wr = d <= 64 ? stackalloc Vector256<double>[d] : new Vector256<double>[d];
        // Offsets looked up per point (index 0 = reference observer, offset 0), the model's indicator term.
        Span<double> offTab = m <= 64 ? stackalloc double[m] : new double[m];
        offTab[0] = 0;
        for (int j = 1; j < m; j++) offTab[j] = theta[off + q + j - 1];
        acc.Clear();
        var x = theta.AsSpan(off, q);
        ref double t0 = ref MemoryMarshal.GetArrayDataReference(s.T);
        ref double y0 = ref MemoryMarshal.GetArrayDataReference(s.Y);
        ref double w0 = ref MemoryMarshal.GetArrayDataReference(s.W);
        var o = s.Obs;
        var omega = Vector256.Create(2.0 * Math.PI * theta[0]);
        var twoPi = Vector256.Create(2.0 * Math.PI);
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        var chi = Vector256<double>.Zero;
        int n = s.Count, i = 0;
        for (; i <= n - 4; i += 4)
        {
            var tv = Vector256.LoadUnsafe(ref t0, (nuint)i);
            var wv = Vector256.LoadUnsafe(ref w0, (nuint)i);
            var (s1, c1) = Vector256.SinCos(omega * tv);
            r[1] = one;
            var mdl = Vector256.Create(x[0]);
            var dsum = Vector256<double>.Zero;
            Vector256<double> cPrev = one, sPrev = Vector256<double>.Zero, c = c1, sn = s1;
            for (int h = 1; h <= k; h++)
            {
                r[2 * h] = c; r[2 * h + 1] = sn;
                var a = Vector256.Create(x[2 * h - 1]); var bb = Vector256.Create(x[2 * h]);
                mdl += a * c + bb * sn;
                dsum += Vector256.Create((double)h) * (bb * c - a * sn);
                var cNext = two * c1 * c - cPrev; var sNext = two * c1 * sn - sPrev;
                cPrev = c; sPrev = sn; c = cNext; sn = sNext;
            }
            if (nObs > 0) mdl += Vector256.Create(offTab[o[i]], offTab[o[i + 1]], offTab[o[i + 2]], offTab[o[i + 3]]);
            var res = Vector256.LoadUnsafe(ref y0, (nuint)i) - mdl;
            var wres = wv * res;
            chi += wres * res;
            if (!full) continue;
            r[0] = twoPi * tv * dsum;
            int ti = 0;
            for (int a = 0; a < d; a++)
            {
                var wa = wv * r[a];
                wr[a] = wa;
                acc[jtr0 + a] += wa * res;
                for (int cc = a; cc < d; cc++) acc[ti++] += wa * r[cc];
            }
            if (nObs > 0)
            {
                var ov = Vector256.Create((double)o[i], o[i + 1], o[i + 2], o[i + 3]);
                for (int j = 1; j <= nObs; j++)
                {
                    var mask = Vector256.Equals(ov, Vector256.Create((double)j));
                    if (Vector256.ExtractMostSignificantBits(mask) == 0) continue;
                    int ob = obs0 + (j - 1) * (d + 1);
                    for (int a = 0; a < d; a++) acc[ob + a] += wr[a] & mask;
                    acc[ob + d] += wres & mask;
                }
            }
        }
        end = i;
        if (full)
        {
            // Local dense column a sits at global 0 (a = 0) or off + a - 1; observer j at off + q + j - 1.
            int ti = 0;
            for (int a = 0; a < d; a++)
            {
                int ga = a == 0 ? 0 : off + a - 1;
                jtr![ga] += Vector256.Sum(acc[jtr0 + a]);
                for (int cc = a; cc < d; cc++) jtj![ga * np + (cc == 0 ? 0 : off + cc - 1)] += Vector256.Sum(acc[ti++]);
            }
            for (int j = 1; j <= nObs; j++)
            {
                int ob = obs0 + (j - 1) * (d + 1), gj = off + q + j - 1;
                for (int a = 0; a < d; a++) jtj![(a == 0 ? 0 : off + a - 1) * np + gj] += Vector256.Sum(acc[ob + a]);
                // The indicator's own diagonal is its cross term with the constant column (local 1, entry 1).
                jtj![gj * np + gj] += Vector256.Sum(acc[ob + 1]);
                jtr![gj] += Vector256.Sum(acc[ob + d]);
            }
        }
        return Vector256.Sum(chi);
    }
}
