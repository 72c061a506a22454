namespace PulseLadder.Core.PeriodSearch;

/// <summary>Brent's one-dimensional minimisation (golden section with parabolic steps) on a bracket [a, b].</summary>
internal static class Brent
{
    /// <summary>
    /// Minimum of <paramref name="fn"/> in [a, b] to absolute tolerance <paramref name="tol"/> in x.
    /// Non-finite function values are treated as +infinity, so a degenerate fit never wins.
    /// </summary>
    public static (double X, double Value) Minimize(Func<double, double> fn, double a, double b, double tol, int maxIter = 100)
    {
        const double golden = 0.3819660112501051;
        double F(double x) { double v = fn(x); return double.IsFinite(v) ? v : double.PositiveInfinity; }
        if (a > b) (a, b) = (b, a);
        double x = a + golden * (b - a), w = x, v = x;
        double fx = F(x), fw = fx, fv = fx;
        double d = 0, e = 0;
        for (int iter = 0; iter < maxIter; iter++)
        {
            double m = 0.5 * (a + b);
            double tol1 = tol + 1e-15 * Math.Abs(x), tol2 = 2 * tol1;
            if (Math.Abs(x - m) <= tol2 - 0.5 * (b - a)) break;
            bool golden_step = true;
            if (Math.Abs(e) > tol1)
            {
                double r = (x - w) * (fx - fv), q = (x - v) * (fx - fw), p = (x - v) * q - (x - w) * r;
                q = 2 * (q - r);
                if (q > 0) p = -p; else q = -q;
                if (Math.Abs(p) < Math.Abs(0.5 * q * e) && p > q * (a - x) && p < q * (b - x) && double.IsFinite(p / q))
                {
                    e = d; d = p / q;
                    double u0 = x + d;
                    if (u0 - a < tol2 || b - u0 < tol2) d = x < m ? tol1 : -tol1;
                    golden_step = false;
                }
            }
            if (golden_step) { e = (x < m ? b : a) - x; d = golden * e; }
            double u = Math.Abs(d) >= tol1 ? x + d : x + (d > 0 ? tol1 : -tol1);
            double fu = F(u);
            if (fu <= fx)
            {
                if (u < x) b = x; else a = x;
                v = w; fv = fw; w = x; fw = fx; x = u; fx = fu;
            }
            else
            {
                if (u < x) a = u; else b = u;
                if (fu <= fw || w == x) { v = w; fv = fw; w = u; fw = fu; }
                else if (fu <= fv || v == x || v == w) { v = u; fv = fu; }
            }
        }
        return (x, fx);
    }

    /// <summary>
    /// Minimum near <paramref name="x0"/> of a function that is close to a parabola there: three points h apart (the
    /// value at x0, <paramref name="f0"/>, is given), moved by h towards the lower end while an end is lower (at most
    /// <paramref name="maxShifts"/> times), then the vertex of the parabola through them. Returns the lowest point
    /// evaluated. For a peak of width W sampled at h the vertex is within ~h^2/(6 W) of the minimum; three or four
    /// evaluations where a bracketing search needs a dozen.
    /// </summary>
    public static (double X, double Value) ParabolicNear(Func<double, double> fn, double x0, double f0, double h, int maxShifts)
    {
        double F(double x) { double v = fn(x); return double.IsFinite(v) ? v : double.PositiveInfinity; }
        double xc = x0, fc = double.IsFinite(f0) ? f0 : double.PositiveInfinity;
        double fm = F(xc - h), fp = F(xc + h);
        for (int i = 0; i < maxShifts && (fm < fc || fp < fc); i++)
        {
            if (fm < fp) { fp = fc; fc = fm; xc -= h; fm = F(xc - h); }
            else { fm = fc; fc = fp; xc += h; fp = F(xc + h); }
        }
        double bestX = xc, bestF = fc;
        if (fm < bestF) { bestX = xc - h; bestF = fm; }
        if (fp < bestF) { bestX = xc + h; bestF = fp; }
        double denom = fm - 2 * fc + fp;
        if (denom > 0 && double.IsFinite(denom))
        {
            double xv = xc + 0.5 * h * (fm - fp) / denom;
            if (Math.Abs(xv - xc) <= h)
            {
                double fv = F(xv);
                if (fv < bestF) { bestX = xv; bestF = fv; }
            }
        }
        return (bestX, bestF);
    }
}
