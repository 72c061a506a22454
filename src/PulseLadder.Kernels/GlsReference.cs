namespace PulseLadder.Kernels;

/// <summary>
/// The definition of the generalised Lomb-Scargle periodogram (Zechmeister &amp; Kuerster 2009, A&amp;A 496, 577):
/// weighted least-squares fit of y = a cos wt + b sin wt + c at each trial frequency, power p = 1 - chi2(w)/chi2_0.
/// Plain scalar loops with direct trigonometry; every faster variant is tested against this one.
/// </summary>
public static class GlsReference
{
    /// <summary>
    /// Computes power on the regular grid f_k = f0 + k df, k in [0, power.Length).
    /// </summary>
    /// <param name="t">Times in days, already relative to a reference epoch (subtracting it keeps trig precise).</param>
    /// <param name="y">Values (magnitudes).</param>
    /// <param name="w">Weights 1/sigma^2 (any positive scale; normalised here).</param>
    /// <param name="f0">First frequency, cycles/day.</param>
    /// <param name="df">Frequency step, cycles/day.</param>
    /// <param name="power">Output; 0 where the fit is degenerate (fewer than 3 points or D = 0).</param>
    public static void Compute(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, double f0, double df, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        int n = t.Length;
        if (!GlsMoments.TryCompute(y, w, out double wsum, out double ybar, out double yy)) { power.Clear(); return; }

        for (int k = 0; k < power.Length; k++)
        {
            double omega = 2.0 * Math.PI * (f0 + k * df);
            double c = 0, s = 0, yc = 0, ys = 0, cc = 0, cs = 0;
            for (int i = 0; i < n; i++)
            {
                double wi = w[i] / wsum;
                (double sn, double cn) = Math.SinCos(omega * t[i]);
                // y is centred on its weighted mean, so YC = sum w y cos directly (the -Y C term vanishes).
                double yi = y[i] - ybar;
                c += wi * cn; s += wi * sn;
                yc += wi * yi * cn; ys += wi * yi * sn;
                cc += wi * cn * cn; cs += wi * cn * sn;
            }
            double ss = 1.0 - cc;
            double ccx = cc - c * c, ssx = ss - s * s, csx = cs - c * s;
            double d = ccx * ssx - csx * csx;
            power[k] = d > 0 ? (ssx * yc * yc + ccx * ys * ys - 2.0 * csx * yc * ys) / (yy * d) : 0.0;
        }
    }
}

/// <summary>Throw helpers kept out of the hot loops.</summary>
internal static class KernelThrow
{
    [System.Diagnostics.CodeAnalysis.DoesNotReturn]
    public static void LengthMismatch() => throw new ArgumentException("t, y and w must have the same length.");
}
