namespace PulseLadder.Core.PeriodSearch;

/// <summary>
/// Dense symmetric positive-definite solves for the small normal equations of the Fourier fits (n up to a few
/// dozen), row-major in a flat array. Allocation-free so the many trial frequencies cost no garbage.
/// </summary>
internal static class SmallMatrix
{
    /// <summary>In-place Cholesky A = L L^T (lower triangle overwritten). False when A is not numerically positive definite.</summary>
    public static bool Cholesky(Span<double> a, int n)
    {
        for (int j = 0; j < n; j++)
        {
            double d = a[j * n + j];
            for (int k = 0; k < j; k++) d -= a[j * n + k] * a[j * n + k];
            // Relative pivot test: a collinear column (an observer seen at one phase only, too few points for the order)
            // shows up as a pivot that has lost almost all of its original size.
            if (!(d > 1e-13 * Math.Abs(a[j * n + j])) || !double.IsFinite(d)) return false;
            double l = Math.Sqrt(d);
            a[j * n + j] = l;
            for (int i = j + 1; i < n; i++)
            {
                double s = a[i * n + j];
                for (int k = 0; k < j; k++) s -= a[i * n + k] * a[j * n + k];
                a[i * n + j] = s / l;
            }
        }
        return true;
    }

    /// <summary>Solves L L^T x = b in place (b becomes x) with the factor from <see cref="Cholesky"/>.</summary>
    public static void Solve(ReadOnlySpan<double> l, int n, Span<double> b)
    {
        for (int i = 0; i < n; i++)
        {
            double s = b[i];
            for (int k = 0; k < i; k++) s -= l[i * n + k] * b[k];
            b[i] = s / l[i * n + i];
        }
        for (int i = n - 1; i >= 0; i--)
        {
            double s = b[i];
            for (int k = i + 1; k < n; k++) s -= l[k * n + i] * b[k];
            b[i] = s / l[i * n + i];
        }
    }

    /// <summary>Inverse of A from its Cholesky factor, written to <paramref name="inv"/> (n x n, full).</summary>
    public static void Inverse(ReadOnlySpan<double> l, int n, Span<double> inv)
    {
        Span<double> col = n <= 64 ? stackalloc double[n] : new double[n];
        for (int j = 0; j < n; j++)
        {
            col.Clear();
            col[j] = 1;
            Solve(l, n, col);
            for (int i = 0; i < n; i++) inv[i * n + j] = col[i];
        }
    }

    /// <summary>Copies the upper triangle onto the lower one (the accumulators fill only i &lt;= j).</summary>
    public static void Symmetrize(Span<double> a, int n)
    {
        for (int i = 0; i < n; i++)
            for (int j = i + 1; j < n; j++)
                a[j * n + i] = a[i * n + j];
    }
}
