using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
namespace PulseLadder.Core.LightCurves;

/// <summary>
/// Weighted linear least squares on a row-major design matrix whose leading <c>p</c> columns form nested models
/// (Fourier orders 1..n share their first columns). The normal matrix is accumulated once for all columns and
/// factored once: the Cholesky factor of a leading block is the leading block of the full factor, so every order
/// costs only a triangular solve. The problems are small (p &lt;= ~40) and well conditioned once the mean is removed.
/// </summary>
internal static class LinearFit
{
    /// <summary>Fit result: coefficients, unscaled covariance (X^T W X)^-1, weighted chi-square and used count.</summary>
    internal sealed record Solution(double[] Beta, double[] Covariance, int P, double ChiSquare, int Used)
    {
        public double Cov(int i, int j) => Covariance[i * P + j];
    }

    /// <summary>Normal equations of all <see cref="P"/> columns over the active rows, factored.</summary>
    internal sealed class Normal
    {
        public int P { get; }
        public int Used { get; }
        /// <summary>Number of leading columns whose block is positive definite (models up to this size are solvable).</summary>
        public int Valid { get; }
        private readonly double[] _l;
        private readonly double[] _b;
        private readonly double _yWy;

        public Normal(double[] x, int stride, int p, ReadOnlySpan<double> y, ReadOnlySpan<double> w, ReadOnlySpan<bool> active)
        {
            P = p;
            var a = new double[p * p];
            _b = new double[p];
            int n = y.Length, used = 0;
            double yWy = 0;
            for (int i = 0; i < n; i++)
            {
                if (!active[i]) continue;
                used++;
                int row = i * stride;
                double wi = w[i], yi = y[i];
                yWy += wi * yi * yi;
                ref double xr = ref x[row];
                for (int j = 0; j < p; j++)
                {
                    double wxj = wi * x[row + j];
                    if (wxj == 0) continue;
                    _b[j] += wxj * yi;
                    // Row j of the lower triangle, four at a time: a multiply then an add per element, as in the
                    // scalar tail (no fused multiply-add), so the sums are the same bits either way.
                    ref double ar = ref a[j * p];
                    int k = 0;
                    if (Vector256.IsHardwareAccelerated)
                    {
                        var wv = Vector256.Create(wxj);
                        for (; k + 4 <= j + 1; k += 4)
                            (Vector256.LoadUnsafe(ref ar, (nuint)k) + wv * Vector256.LoadUnsafe(ref xr, (nuint)k)).StoreUnsafe(ref ar, (nuint)k);
                    }
                    for (; k <= j; k++) Unsafe.Add(ref ar, k) += wxj * Unsafe.Add(ref xr, k);
                }
            }
            Used = used;
            _yWy = yWy;
            _l = new double[p * p];
            Valid = Factor(a, _l, p);
        }

        /// <summary>Solution with the first <paramref name="p"/> columns; null when that block is singular or under-determined.</summary>
        public Solution? Solve(int p, bool withCovariance = true)
        {
            if (p > Valid || Used < p) return null;
            var beta = Substitute(_b, p);
            double fit = 0;
            for (int j = 0; j < p; j++) fit += beta[j] * _b[j];
            // chi2 = y'Wy - beta'X'Wy at the optimum (data are mean-removed, so no catastrophic cancellation).
            double chi2 = Math.Max(0, _yWy - fit);
            var inv = withCovariance ? Inverse(p) : [];
            return new Solution(beta, inv, p, chi2, Used);
        }

        private double[] Inverse(int p)
        {
            var inv = new double[p * p];
            var e = new double[p];
            for (int c = 0; c < p; c++)
            {
                Array.Clear(e);
                e[c] = 1;
                var col = Substitute(e, p);
                for (int r = 0; r < p; r++) inv[r * p + c] = col[r];
            }
            return inv;
        }

        private double[] Substitute(double[] rhs, int p)
        {
            int s = P;
            var z = new double[p];
            for (int i = 0; i < p; i++)
            {
                double v = rhs[i];
                for (int k = 0; k < i; k++) v -= _l[i * s + k] * z[k];
                z[i] = v / _l[i * s + i];
            }
            var x = new double[p];
            for (int i = p - 1; i >= 0; i--)
            {
                double v = z[i];
                for (int k = i + 1; k < p; k++) v -= _l[k * s + i] * x[k];
                x[i] = v / _l[i * s + i];
            }
            return x;
        }

        // Cholesky, stopping at the first column that is (nearly) a combination of earlier ones; returns the count of good columns.
        private static int Factor(double[] a, double[] l, int p)
        {
            for (int j = 0; j < p; j++)
            {
                double d = a[j * p + j];
                for (int k = 0; k < j; k++) d -= l[j * p + k] * l[j * p + k];
                if (!(d > 1e-12 * Math.Abs(a[j * p + j])) || !(d > 0)) return j;
                double ljj = Math.Sqrt(d);
                l[j * p + j] = ljj;
                for (int i = j + 1; i < p; i++)
                {
                    double v = a[i * p + j];
                    for (int k = 0; k < j; k++) v -= l[i * p + k] * l[j * p + k];
                    l[i * p + j] = v / ljj;
                }
            }
            return p;
        }
    }

    /// <summary>One-shot solve of the first <paramref name="p"/> columns.</summary>
    public static Solution? Solve(double[] x, int stride, int p, ReadOnlySpan<double> y, ReadOnlySpan<double> w, ReadOnlySpan<bool> active) =>
        new Normal(x, stride, p, y, w, active).Solve(p);

    public static double Predict(double[] x, int stride, int row, double[] beta, int p)
    {
        double s = 0;
        int o = row * stride;
        for (int j = 0; j < p; j++) s += x[o + j] * beta[j];
        return s;
    }
}
