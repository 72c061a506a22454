namespace PulseLadder.Core.LightCurves;

/// <summary>Helpers on m(phi) = A0 + sum_k [a_k cos 2 pi k phi + b_k sin 2 pi k phi] (phi in cycles).</summary>
internal static class FourierSeries
{
    public static double Evaluate(double a0, ReadOnlySpan<double> cos, ReadOnlySpan<double> sin, double phase)
    {
        double x = 2 * Math.PI * phase;
        double c1 = Math.Cos(x), s1 = Math.Sin(x);
        double ck = c1, sk = s1, m = a0;
        for (int k = 0; k < cos.Length; k++)
        {
            m += cos[k] * ck + sin[k] * sk;
            double cn = ck * c1 - sk * s1;
            sk = sk * c1 + ck * s1;
            ck = cn;
        }
        return m;
    }

    /// <summary>First and second derivatives with respect to phase (cycles).</summary>
    public static (double D1, double D2) Derivatives(ReadOnlySpan<double> cos, ReadOnlySpan<double> sin, double phase)
    {
        double d1 = 0, d2 = 0;
        for (int k = 1; k <= cos.Length; k++)
        {
            double w = 2 * Math.PI * k;
            double c = Math.Cos(w * phase), s = Math.Sin(w * phase);
            d1 += w * (-cos[k - 1] * s + sin[k - 1] * c);
            d2 += -w * w * (cos[k - 1] * c + sin[k - 1] * s);
        }
        return (d1, d2);
    }

    /// <summary>Phase of the minimum (<paramref name="findMinimum"/>) or maximum of the curve, in [0, 1).</summary>
    public static double Extremum(double a0, double[] cos, double[] sin, bool findMinimum, int grid = 1000)
    {
        double best = findMinimum ? double.PositiveInfinity : double.NegativeInfinity;
        double bestPhase = 0;
        for (int i = 0; i < grid; i++)
        {
            double ph = (double)i / grid;
            double m = Evaluate(a0, cos, sin, ph);
            if (findMinimum ? m < best : m > best) { best = m; bestPhase = ph; }
        }
        // Newton on the derivative, kept inside the grid cell so it cannot jump to another extremum.
        double x = bestPhase, lo = bestPhase - 1.0 / grid, hi = bestPhase + 1.0 / grid;
        for (int it = 0; it < 20; it++)
        {
            var (d1, d2) = Derivatives(cos, sin, x);
            if (d2 == 0) break;
            double nx = x - d1 / d2;
            if (nx < lo || nx > hi) break;
            if (Math.Abs(nx - x) < 1e-13) { x = nx; break; }
            x = nx;
        }
        double vx = Evaluate(a0, cos, sin, x);
        if (findMinimum ? vx > best : vx < best) x = bestPhase;
        x %= 1.0;
        return x < 0 ? x + 1 : x;
    }

    /// <summary>Coefficients of the same curve with the phase origin moved forward by <paramref name="delta"/> cycles.</summary>
    public static (double[] Cos, double[] Sin) Shift(double[] cos, double[] sin, double delta)
    {
        var c2 = new double[cos.Length];
        var s2 = new double[sin.Length];
        for (int k = 1; k <= cos.Length; k++)
        {
            double d = 2 * Math.PI * k * delta;
            double cd = Math.Cos(d), sd = Math.Sin(d);
            c2[k - 1] = cos[k - 1] * cd + sin[k - 1] * sd;
            s2[k - 1] = -cos[k - 1] * sd + sin[k - 1] * cd;
        }
        return (c2, s2);
    }

    /// <summary>Intensity mean -2.5 log10 of the cycle mean of 10^(-0.4 m); trapezoid rule, spectrally accurate for a periodic curve.</summary>
    public static double IntensityMean(double a0, double[] cos, double[] sin, int grid = 1024)
    {
        double sum = 0;
        for (int i = 0; i < grid; i++)
            sum += Math.Pow(10.0, -0.4 * (Evaluate(a0, cos, sin, (double)i / grid) - a0));
        return a0 - 2.5 * Math.Log10(sum / grid);
    }
}
