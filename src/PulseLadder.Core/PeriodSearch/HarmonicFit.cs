namespace PulseLadder.Core.PeriodSearch;

/// <summary>
/// Weighted linear least squares of one band at a fixed frequency:
/// m(t) = c + sum_{k=1..K} [a_k cos(2 pi k f t) + b_k sin(2 pi k f t)] + o_obs,
/// with one zero-point offset per observer other than the band's reference observer (index 0, offset 0).
/// K = 0 gives the frequency-independent reference model (constant plus offsets).
/// Parameter layout: [c, a_1, b_1, ..., a_K, b_K, o_1, ..., o_{m-1}].
/// </summary>
internal static class HarmonicFit
{
    public static int ParamCount(int harmonics, int observers) => 1 + 2 * harmonics + Math.Max(0, observers - 1);

    /// <summary>Highest order the band supports: at least two points per parameter (common practice against
    /// fits that ring through phase gaps), capped at <paramref name="maxHarmonics"/>. 0 when even K = 1 is too much.</summary>
    public static int SupportedHarmonics(BandSeries b, int maxHarmonics)
    {
        int k = maxHarmonics;
        while (k > 0 && b.Count < 2 * ParamCount(k, b.Observers.Length)) k--;
        return k;
    }

    /// <summary>Fills the design row for time <paramref name="t"/> (relative days) of a point of observer <paramref name="obs"/>.</summary>
    public static void Row(double f, double t, int obs, int harmonics, int observers, Span<double> row)
    {
        row[0] = 1;
        if (harmonics > 0)
        {
            (double s1, double c1) = Math.SinCos(2.0 * Math.PI * f * t);
            // Chebyshev recurrence: one SinCos per point whatever the order.
            double cPrev = 1, sPrev = 0, c = c1, s = s1;
            for (int k = 1; k <= harmonics; k++)
            {
                row[2 * k - 1] = c; row[2 * k] = s;
                double cn = 2 * c1 * c - cPrev, sn = 2 * c1 * s - sPrev;
                cPrev = c; sPrev = s; c = cn; s = sn;
            }
        }
        int o0 = 1 + 2 * harmonics;
        for (int j = 1; j < observers; j++) row[o0 + j - 1] = obs == j ? 1 : 0;
    }

    /// <summary>
    /// Fits the band at frequency <paramref name="f"/>. Returns chi2, or null when the normal equations are singular.
    /// <paramref name="param"/> (length ParamCount) and <paramref name="cov"/> (ParamCount^2, the unscaled
    /// (A^T W A)^-1) are filled when given.
    /// </summary>
    public static double? Fit(BandSeries b, double f, int harmonics, Span<double> param = default, Span<double> cov = default)
    {
        int m = b.Observers.Length;
        int p = ParamCount(harmonics, m);
        if (b.Count <= p) return null;
        Span<double> ata = p <= 40 ? stackalloc double[p * p] : new double[p * p];
        Span<double> aty = p <= 40 ? stackalloc double[p] : new double[p];
        Span<double> row = p <= 40 ? stackalloc double[p] : new double[p];
        ata.Clear(); aty.Clear();
        var t = b.T; var y = b.Y; var w = b.W; var o = b.Obs;
        // Magnitudes centred on the band's weighted mean: chi2 = sum w y^2 - x.(A^T W y) then keeps its digits
        // (sum w y^2 is chi2_0, within a factor of a few hundred of the residual chi2), and one pass suffices.
        double mean = b.YMean, yy = 0;
        for (int i = 0; i < t.Length; i++)
        {
            Row(f, t[i], o[i], harmonics, m, row);
            double wi = w[i], yi = y[i] - mean;
            yy += wi * yi * yi;
            for (int r = 0; r < p; r++)
            {
                double wr = wi * row[r];
                if (wr == 0) continue;
                aty[r] += wr * yi;
                int baseIdx = r * p;
                for (int c = r; c < p; c++) ata[baseIdx + c] += wr * row[c];
            }
        }
        SmallMatrix.Symmetrize(ata, p);
        Span<double> x = p <= 40 ? stackalloc double[p] : new double[p];
        aty.CopyTo(x);
        if (!SmallMatrix.Cholesky(ata, p)) return null;
        SmallMatrix.Solve(ata, p, x);
        double explained = 0;
        for (int r = 0; r < p; r++) explained += x[r] * aty[r];
        double chi2 = Math.Max(0, yy - explained);
        x[0] += mean;
        if (!param.IsEmpty) x.CopyTo(param);
        if (!cov.IsEmpty) SmallMatrix.Inverse(ata, p, cov);
        return double.IsFinite(chi2) ? chi2 : null;
    }

    /// <summary>Sum over bands of the chi2 at <paramref name="f"/> with the given per-band orders (order 0 = band left out: its reference chi2 is used).</summary>
    public static double TotalChi2(IReadOnlyList<BandSeries> bands, IReadOnlyList<int> orders, IReadOnlyList<double> refChi2, double f)
    {
        double s = 0;
        for (int i = 0; i < bands.Count; i++)
        {
            if (orders[i] <= 0) { s += refChi2[i]; continue; }
            s += Fit(bands[i], f, orders[i]) ?? refChi2[i];
        }
        return s;
    }
}
