namespace PulseLadder.Core.LightCurves;

/// <summary>
/// Weighted linear least squares on a row-major design matrix whose first <c>p</c> columns are used, so nested
/// models (Fourier orders 1..n sharing leading columns) reuse one design matrix. Normal equations with Cholesky:
/// the problems here are small (p &lt;= ~40) and well conditioned once the mean is removed from the data.
/// </summary>
internal static class LinearFit
{
    /// <summary>Fit result: coefficients, unscaled covariance (X^T W X)^-1, weighted chi-square and used count.</summary>
    internal sealed record Solution(double[] Beta, double[] Covariance, int P, double ChiSquare, int Used)
    {
        public double Cov(int i, int j) => Covariance[i * P + j];
    }

    /// <summary>
    /// Solves for the first <paramref name="p"/> columns of <paramref name="x"/> (row-major, <paramref name="stride"/>
    /// columns per row) over rows with <paramref name="active"/> set; null when the normal matrix is not positive definite.
    /// </summary>
    public static Solution? Solve(double[] x, int stride, int p, ReadOnlySpan<double> y, ReadOnlySpan<double> w, ReadOnlySpan<bool> active)
    {
        int n = y.Length;
        var a = new double[p * p];
        var b = new double[p];
        int used = 0;
        for (int i = 0; i < n; i++)
        {
            if (!active[i]) continue;
            used++;
            int row = i * stride;
            double wi = w[i], yi = y[i];
            for (int j = 0; j < p; j++)
            {
                double wxj = wi * x[row + j];
                if (wxj == 0) continue;
                b[j] += wxj * yi;
                int aj = j * p;
                for (int k = 0; k <= j; k++) a[aj + k] += wxj * x[row + k];
            }
        }
        if (used < p) return null;
        for (int j = 0; j < p; j++)
            for (int k = 0; k < j; k++) a[k * p + j] = a[j * p + k];

        var l = Cholesky(a, p);
        if (l is null) return null;
        var beta = CholeskySolve(l, p, b);
        var inv = new double[p * p];
        var e = new double[p];
        for (int c = 0; c < p; c++)
        {
            Array.Clear(e);
            e[c] = 1;
            var col = CholeskySolve(l, p, e);
            for (int r = 0; r < p; r++) inv[r * p + c] = col[r];
        }
        double chi2 = 0;
        for (int i = 0; i < n; i++)
        {
            if (!active[i]) continue;
            double r = y[i] - Predict(x, stride, i, beta, p);
            chi2 += w[i] * r * r;
        }
        return new Solution(beta, inv, p, chi2, used);
    }

    public static double Predict(double[] x, int stride, int row, double[] beta, int p)
    {
        double s = 0;
        int o = row * stride;
        for (int j = 0; j < p; j++) s += x[o + j] * beta[j];
        return s;
    }

    private static double[]? Cholesky(double[] a, int p)
    {
        var l = new double[p * p];
        for (int j = 0; j < p; j++)
        {
            double d = a[j * p + j];
            for (int k = 0; k < j; k++) d -= l[j * p + k] * l[j * p + k];
            // Relative pivot test: a column that is (nearly) a combination of earlier ones makes the model degenerate.
            if (!(d > 1e-12 * Math.Abs(a[j * p + j])) || !(d > 0)) return null;
            double ljj = Math.Sqrt(d);
            l[j * p + j] = ljj;
            for (int i = j + 1; i < p; i++)
            {
                double s = a[i * p + j];
                for (int k = 0; k < j; k++) s -= l[i * p + k] * l[j * p + k];
                l[i * p + j] = s / ljj;
            }
        }
        return l;
    }

    private static double[] CholeskySolve(double[] l, int p, double[] b)
    {
        var z = new double[p];
        for (int i = 0; i < p; i++)
        {
            double s = b[i];
            for (int k = 0; k < i; k++) s -= l[i * p + k] * z[k];
            z[i] = s / l[i * p + i];
        }
        var x = new double[p];
        for (int i = p - 1; i >= 0; i--)
        {
            double s = z[i];
            for (int k = i + 1; k < p; k++) s -= l[k * p + i] * x[k];
            x[i] = s / l[i * p + i];
        }
        return x;
    }
}
