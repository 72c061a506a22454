namespace PulseLadder.Core.LightCurves;

/// <summary>
/// Fourier parameters of Simon &amp; Lee (1981): R_k1 = A_k / A_1 and phi_k1 = phi_k - k phi_1 (mod 2 pi), in the
/// sine series m = A0 + sum A_k sin(2 pi k phi + phi_k), phi_k = atan2(a_k, b_k) for
/// m = A0 + sum [a_k cos + b_k sin] (SCIENCE.md 2.2/2.4). Cosine-series values: phi21 + pi/2, phi31 + pi.
/// Errors by linear propagation of the coefficient covariance.
/// </summary>
internal static class FourierParameters
{
    private const double TwoPi = 2 * Math.PI;

    public static double Wrap(double x)
    {
        double r = x % TwoPi;
        return r < 0 ? r + TwoPi : r;
    }

    /// <summary>Sine-series phase of harmonic k from its cosine and sine coefficients.</summary>
    public static double SinePhase(double a, double b) => Math.Atan2(a, b);

    /// <summary>(R_k1, phi_k1 sine) from coefficient arrays; null when the order is below k.</summary>
    public static (double R, double Phi)? Ratio(double[] cos, double[] sin, int k)
    {
        if (cos.Length < k) return null;
        double a1 = Math.Sqrt(cos[0] * cos[0] + sin[0] * sin[0]);
        if (a1 == 0) return null;
        double ak = Math.Sqrt(cos[k - 1] * cos[k - 1] + sin[k - 1] * sin[k - 1]);
        double phi = SinePhase(cos[k - 1], sin[k - 1]) - k * SinePhase(cos[0], sin[0]);
        return (ak / a1, Wrap(phi));
    }

    public static BandFit Apply(BandFit fit, LinearFit.Solution sol, int fixedColumns, int order, double covScale)
    {
        var r2 = Ratio(fit.Cos, fit.Sin, 2);
        var r3 = Ratio(fit.Cos, fit.Sin, 3);
        if (r2 is null) return fit;
        var (r21, p21) = r2.Value;
        var (r21e, p21e) = Errors(fit.Cos, fit.Sin, 2, sol, fixedColumns, covScale);
        fit = fit with
        {
            R21 = r21, Phi21 = p21, Phi21Cosine = Wrap(p21 + Math.PI / 2), R21Err = r21e, Phi21Err = p21e,
        };
        if (r3 is null) return fit;
        var (r31, p31) = r3.Value;
        var (r31e, p31e) = Errors(fit.Cos, fit.Sin, 3, sol, fixedColumns, covScale);
        return fit with { R31 = r31, Phi31 = p31, Phi31Cosine = Wrap(p31 + Math.PI), R31Err = r31e, Phi31Err = p31e };
    }

    // Gradients over (a1, b1, ak, bk): A = sqrt(a^2+b^2), dA/da = a/A; phi = atan2(a, b), dphi/da = b/A^2, dphi/db = -a/A^2.
    private static (double RErr, double PhiErr) Errors(double[] cos, double[] sin, int k, LinearFit.Solution sol, int fixedColumns, double covScale)
    {
        double a1 = cos[0], b1 = sin[0], ak = cos[k - 1], bk = sin[k - 1];
        double A1 = Math.Sqrt(a1 * a1 + b1 * b1), Ak = Math.Sqrt(ak * ak + bk * bk);
        int i1a = fixedColumns, i1b = fixedColumns + 1, ika = fixedColumns + 2 * (k - 1), ikb = ika + 1;
        int[] idx = [i1a, i1b, ika, ikb];
        double r = Ak / A1;
        // R = Ak/A1
        double[] gR = [-r / A1 * a1 / A1, -r / A1 * b1 / A1, ak / Ak / A1, bk / Ak / A1];
        // phi = phi_k - k phi_1
        double[] gP = [-k * b1 / (A1 * A1), k * a1 / (A1 * A1), bk / (Ak * Ak), -ak / (Ak * Ak)];
        double vr = 0, vp = 0;
        for (int i = 0; i < 4; i++)
            for (int j = 0; j < 4; j++)
            {
                double c = sol.Cov(idx[i], idx[j]) * covScale;
                vr += gR[i] * c * gR[j];
                vp += gP[i] * c * gP[j];
            }
        return (Math.Sqrt(Math.Max(0, vr)), Math.Sqrt(Math.Max(0, vp)));
    }
}
