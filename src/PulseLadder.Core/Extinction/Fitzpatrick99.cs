namespace PulseLadder.Core.Extinction;

/// <summary>
/// Fitzpatrick 1999 (PASP 111, 63) R_V-dependent curve. For x = 1/lambda &gt;= 1/0.27 um^-1 the Fitzpatrick-Massa
/// (1990) UV form k(x) = c1 + c2 x + c3 D(x) + c4 F(x) with x0 = 4.596, gamma = 0.99, c3 = 3.23, c4 = 0.41,
/// c2 = -0.824 + 4.717/R_V, c1 = 2.030 - 3.007 c2; below, a natural cubic spline in x through nine anchors of
/// A/E(B-V): x = 0 (value 0), 1/2.65 and 1/1.22 um (0.26469 R_V/3.1, 0.82925 R_V/3.1), 1/0.60, 1/0.547, 1/0.467,
/// 1/0.411 um (R_V polynomials below), and the UV form evaluated at 1/0.27 and 1/0.26 um. The anchor values are
/// those of the published paper as reproduced, identically, by several independent public implementations
/// (see docs/calibrations.md); the paper's own table was not read.
/// </summary>
internal static class Fitzpatrick99
{
    private const double X0 = 4.596, Gamma = 0.99, C3 = 3.23, C4 = 0.41;

    private static readonly double[] Knots =
        [0.0, 1.0 / 2.65, 1.0 / 1.22, 1.0 / 0.60, 1.0 / 0.547, 1.0 / 0.467, 1.0 / 0.411, 1.0 / 0.27, 1.0 / 0.26];

    /// <summary>A(x)/E(B-V) at x in um^-1 (0 &lt;= x &lt;= 10).</summary>
    public static double AOverEbv(double x, double rv)
    {
        if (x < 0 || x > 10.0) throw new ArgumentOutOfRangeException(nameof(x), x, "F99 is implemented for 0 <= 1/lambda <= 10 um^-1");
        if (x >= Knots[7]) return Uv(x, rv) + rv;
        Span<double> y = stackalloc double[9];
        AnchorValues(rv, y);
        return NaturalSpline(Knots, y, x);
    }

    /// <summary>The nine anchor values of A/E(B-V) for <paramref name="rv"/> (written into <paramref name="y"/>).</summary>
    internal static void AnchorValues(double rv, Span<double> y)
    {
        double r2 = rv * rv;
        y[0] = 0.0;
        y[1] = 0.26469 * rv / 3.1;
        y[2] = 0.82925 * rv / 3.1;
        y[3] = -0.422809 + 1.00270 * rv + 2.13572e-4 * r2;
        y[4] = -5.13540e-2 + 1.00216 * rv - 7.35778e-5 * r2;
        y[5] = 0.700127 + 1.00184 * rv - 3.32598e-5 * r2;
        y[6] = 1.19456 + 1.01707 * rv - 5.46959e-3 * r2 + 7.97809e-4 * r2 * rv - 4.45636e-5 * r2 * r2;
        y[7] = Uv(Knots[7], rv) + rv;
        y[8] = Uv(Knots[8], rv) + rv;
    }

    internal static ReadOnlySpan<double> KnotPositions => Knots;

    /// <summary>True when x lies on the FM90 (UV) branch rather than the spline.</summary>
    internal static bool IsUv(double x) => x >= Knots[7];

    /// <summary>
    /// Weights w_k with spline(x) = sum_k w_k y_k for any anchor values y (the natural spline is linear in them), so
    /// that A/E(B-V) at a fixed wavelength costs nine multiply-adds per R_V.
    /// </summary>
    internal static double[] CardinalWeights(double x)
    {
        var w = new double[9];
        Span<double> e = stackalloc double[9];
        for (int k = 0; k < 9; k++)
        {
            e.Clear();
            e[k] = 1;
            w[k] = NaturalSpline(Knots, e, x);
        }
        return w;
    }

    /// <summary>A/E(B-V) from precomputed cardinal weights (x on the spline branch).</summary>
    internal static double AOverEbvFromWeights(ReadOnlySpan<double> w, double rv)
    {
        Span<double> y = stackalloc double[9];
        AnchorValues(rv, y);
        double s = 0;
        for (int k = 0; k < 9; k++) s += w[k] * y[k];
        return s;
    }

    /// <summary>A/E(B-V) on the UV branch.</summary>
    internal static double AOverEbvUv(double x, double rv) => Uv(x, rv) + rv;

    /// <summary>E(x - V)/E(B - V) of the FM90 form.</summary>
    private static double Uv(double x, double rv)
    {
        double c2 = -0.824 + 4.717 / rv;
        double c1 = 2.030 - 3.007 * c2;
        double x2 = x * x;
        double d = x2 / ((x2 - X0 * X0) * (x2 - X0 * X0) + x2 * Gamma * Gamma);
        double f = 0;
        if (x >= 5.9)
        {
            double t = x - 5.9;
            f = 0.5392 * t * t + 0.05644 * t * t * t;
        }
        return c1 + c2 * x + C3 * d + C4 * f;
    }

    /// <summary>Natural cubic spline (second derivative zero at both ends) through (xs, ys), evaluated at x.</summary>
    private static double NaturalSpline(ReadOnlySpan<double> xs, ReadOnlySpan<double> ys, double x)
    {
        int n = xs.Length;
        Span<double> m = stackalloc double[n];   // second derivatives
        Span<double> c = stackalloc double[n];   // Thomas-algorithm scratch
        m[0] = 0; c[0] = 0;
        for (int i = 1; i < n - 1; i++)
        {
            double h0 = xs[i] - xs[i - 1], h1 = xs[i + 1] - xs[i];
            double rhs = 6.0 * ((ys[i + 1] - ys[i]) / h1 - (ys[i] - ys[i - 1]) / h0);
            double diag = 2.0 * (h0 + h1) - h0 * c[i - 1];
            c[i] = h1 / diag;
            m[i] = (rhs - h0 * m[i - 1]) / diag;
        }
        m[n - 1] = 0;
        for (int i = n - 2; i >= 1; i--) m[i] -= c[i] * m[i + 1];

        int k = 0;
        while (k < n - 2 && x > xs[k + 1]) k++;
        double h = xs[k + 1] - xs[k];
        double a = (xs[k + 1] - x) / h, b = (x - xs[k]) / h;
        return a * ys[k] + b * ys[k + 1] + ((a * a * a - a) * m[k] + (b * b * b - b) * m[k + 1]) * h * h / 6.0;
    }
}
