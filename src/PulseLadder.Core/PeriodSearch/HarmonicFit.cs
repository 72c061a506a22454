using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

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
        double mean = b.YMean;
        double yy = Vector256.IsHardwareAccelerated && b.Count >= Vector256<double>.Count
            ? AccumulateVector(b, f, harmonics, m, p, ata, aty)
            : AccumulateScalar(b, f, harmonics, m, p, 0, ata, aty, row);
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

    /// <summary>
    /// Adds points [<paramref name="start"/>, Count) to the upper triangle of A^T W A and to A^T W y, magnitudes
    /// centred on the band's weighted mean; returns their sum w y^2. The definition the vector path must match.
    /// </summary>
    internal static double AccumulateScalar(BandSeries b, double f, int harmonics, int m, int p, int start, Span<double> ata, Span<double> aty, Span<double> row)
    {
        var t = b.T; var y = b.Y; var w = b.W; var o = b.Obs;
        // Magnitudes centred on the band's weighted mean: chi2 = sum w y^2 - x.(A^T W y) then keeps its digits
        // (sum w y^2 is chi2_0, within a factor of a few hundred of the residual chi2), and one pass suffices.
        double mean = b.YMean, yy = 0;
        for (int i = start; i < t.Length; i++)
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
        return yy;
    }

    /// <summary>
    /// <see cref="AccumulateScalar"/> four points at a time. The observer columns are indicators, so their block is
    /// diagonal and their cross terms are masked sums of the harmonic columns: only (1 + 2K) columns are formed per
    /// point. Sums are added in a different order than the scalar path, so results agree to rounding (~1e-15
    /// relative), not bit for bit. The remainder (fewer than four points) goes through the scalar path.
    /// </summary>
    internal static double AccumulateVector(BandSeries b, double f, int harmonics, int m, int p, Span<double> ata, Span<double> aty)
    {
        int q = 1 + 2 * harmonics, nTri = q * (q + 1) / 2, nObs = m - 1;
        int nAcc = nTri + q + 1 + nObs * (q + 1);
        Span<Vector256<double>> acc = nAcc <= 256 ? stackalloc Vector256<double>[nAcc] : new Vector256<double>[nAcc];
        Span<Vector256<double>> r = q <= 64 ? stackalloc Vector256<double>[q] : new Vector256<double>[q];
        Span<Vector256<double>> wr = q <= 64 ? stackalloc Vector256<double>[q] : new Vector256<double>[q];
        acc.Clear();
        ref double t0 = ref MemoryMarshal.GetArrayDataReference(b.T);
        ref double y0 = ref MemoryMarshal.GetArrayDataReference(b.Y);
        ref double w0 = ref MemoryMarshal.GetArrayDataReference(b.W);
        var o = b.Obs;
        var omega = Vector256.Create(2.0 * Math.PI * f);
        var mean = Vector256.Create(b.YMean);
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        int aty0 = nTri, yyIdx = nTri + q, obs0 = nTri + q + 1;
        int n = b.Count, i = 0;
        for (; i <= n - 4; i += 4)
        {
            var tv = Vector256.LoadUnsafe(ref t0, (nuint)i);
            var wv = Vector256.LoadUnsafe(ref w0, (nuint)i);
            var yv = Vector256.LoadUnsafe(ref y0, (nuint)i) - mean;
            r[0] = one;
            if (harmonics > 0)
            {
                var (s1, c1) = Vector256.SinCos(omega * tv);
                Vector256<double> cPrev = one, sPrev = Vector256<double>.Zero, c = c1, s = s1;
                for (int k = 1; k <= harmonics; k++)
                {
                    r[2 * k - 1] = c; r[2 * k] = s;
                    var cn = two * c1 * c - cPrev; var sn = two * c1 * s - sPrev;
                    cPrev = c; sPrev = s; c = cn; s = sn;
                }
            }
            for (int a = 0; a < q; a++) wr[a] = wv * r[a];
            int idx = 0;
            for (int a = 0; a < q; a++)
            {
                var wa = wr[a];
                acc[aty0 + a] += wa * yv;
                for (int c = a; c < q; c++) acc[idx++] += wa * r[c];
            }
            var wy = wv * yv;
            acc[yyIdx] += wy * yv;
            if (nObs > 0)
            {
                var ov = Vector256.Create((double)o[i], o[i + 1], o[i + 2], o[i + 3]);
                for (int j = 1; j <= nObs; j++)
                {
                    var mask = Vector256.Equals(ov, Vector256.Create((double)j));
                    if (Vector256.ExtractMostSignificantBits(mask) == 0) continue;
                    int ob = obs0 + (j - 1) * (q + 1);
                    for (int a = 0; a < q; a++) acc[ob + a] += wr[a] & mask;
                    acc[ob + q] += wy & mask;
                }
            }
        }

        int ti = 0;
        for (int a = 0; a < q; a++)
        {
            aty[a] = Vector256.Sum(acc[aty0 + a]);
            for (int c = a; c < q; c++) ata[a * p + c] = Vector256.Sum(acc[ti++]);
        }
        for (int j = 1; j <= nObs; j++)
        {
            int ob = obs0 + (j - 1) * (q + 1), col = q + j - 1;
            for (int a = 0; a < q; a++) ata[a * p + col] = Vector256.Sum(acc[ob + a]);
            // The indicator's own diagonal is its cross term with the constant column (row entry 1).
            ata[col * p + col] = ata[col];
            aty[col] = Vector256.Sum(acc[ob + q]);
        }
        double yy = Vector256.Sum(acc[yyIdx]);
        if (i < n)
        {
            Span<double> row = p <= 40 ? stackalloc double[p] : new double[p];
            yy += AccumulateScalar(b, f, harmonics, m, p, i, ata, aty, row);
        }
        return yy;
    }

    /// <summary>
    /// Unweighted sum of squared residuals of the band about the model with parameters <paramref name="x"/> (layout
    /// as <see cref="Fit"/>) at frequency <paramref name="f"/>. Four points at a time where Vector256 is accelerated;
    /// the scalar loop (<paramref name="allowVector"/> false, and the remainder) is the definition.
    /// </summary>
    internal static double ResidualSumOfSquares(BandSeries b, double f, int harmonics, ReadOnlySpan<double> x, bool allowVector = true)
    {
        int m = b.Observers.Length, p = ParamCount(harmonics, m), i = 0;
        double ss = 0;
        if (allowVector && Vector256.IsHardwareAccelerated && b.Count >= Vector256<double>.Count)
            ss = ResidualSumOfSquaresVector(b, f, harmonics, x, out i);
        Span<double> row = p <= 64 ? stackalloc double[p] : new double[p];
        for (; i < b.Count; i++)
        {
            Row(f, b.T[i], b.Obs[i], harmonics, m, row);
            double mdl = 0;
            for (int j = 0; j < p; j++) mdl += row[j] * x[j];
            double d = b.Y[i] - mdl;
            ss += d * d;
        }
        return ss;
    }

    private static double ResidualSumOfSquaresVector(BandSeries b, double f, int harmonics, ReadOnlySpan<double> x, out int end)
    {
        int m = b.Observers.Length, q = 1 + 2 * harmonics;
        // The observer columns are indicators: their model term is the point's observer offset (0 for the reference).
        Span<double> offTab = m <= 64 ? stackalloc double[m] : new double[m];
        offTab[0] = 0;
        for (int j = 1; j < m; j++) offTab[j] = x[q + j - 1];
        ref double t0 = ref MemoryMarshal.GetArrayDataReference(b.T);
        ref double y0 = ref MemoryMarshal.GetArrayDataReference(b.Y);
        var o = b.Obs;
        var omega = Vector256.Create(2.0 * Math.PI * f);
        var one = Vector256.Create(1.0);
        var two = Vector256.Create(2.0);
        var ss = Vector256<double>.Zero;
        int n = b.Count, i = 0;
        for (; i <= n - 4; i += 4)
        {
            var mdl = Vector256.Create(x[0]);
            if (harmonics > 0)
            {
                var (s1, c1) = Vector256.SinCos(omega * Vector256.LoadUnsafe(ref t0, (nuint)i));
                Vector256<double> cPrev = one, sPrev = Vector256<double>.Zero, c = c1, s = s1;
                for (int k = 1; k <= harmonics; k++)
                {
                    mdl += Vector256.Create(x[2 * k - 1]) * c + Vector256.Create(x[2 * k]) * s;
                    var cn = two * c1 * c - cPrev; var sn = two * c1 * s - sPrev;
                    cPrev = c; sPrev = s; c = cn; s = sn;
                }
            }
            if (m > 1) mdl += Vector256.Create(offTab[o[i]], offTab[o[i + 1]], offTab[o[i + 2]], offTab[o[i + 3]]);
            var d = Vector256.LoadUnsafe(ref y0, (nuint)i) - mdl;
            ss += d * d;
        }
        end = i;
        return Vector256.Sum(ss);
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
