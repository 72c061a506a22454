using MathNet.Numerics;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>
/// False-alarm probabilities of periodogram peaks (SCIENCE.md 1.6). All in log space so that the very small values
/// of strong signals (1e-21 and below) keep their digits; results are clamped to [0, 1].
/// </summary>
internal static class FalseAlarm
{
    public const string BaluevMethod = "baluev2008";
    public const string MultibandMethod = "multiband_beta_naive_neff";
    public const string BootstrapMethod = "bootstrap";

    /// <summary>
    /// Baluev (2008) "alias-free" approximation for the highest GLS (standard normalisation) peak of power
    /// <paramref name="z"/> found in [0, <paramref name="fMax"/>], for <paramref name="n"/> points whose
    /// weighted time variance is <paramref name="timeVariance"/> (days^2).
    /// </summary>
    public static double Baluev(double z, int n, double timeVariance, double fMax)
    {
        if (!(z > 0) || n < 4 || !(timeVariance > 0) || !(fMax > 0)) return 1.0;
        if (z >= 1) return 0.0;
        double nh = n - 1, nk = n - 3;
        double tEff = Math.Sqrt(4 * Math.PI * timeVariance);
        double wBand = fMax * tEff;
        double logGammaH = 0.5 * Math.Log(2.0 / nh) + SpecialFunctions.GammaLn(nh / 2) - SpecialFunctions.GammaLn((nh - 1) / 2);
        double log1mz = Log1P(-z);
        double logTau = logGammaH + Math.Log(wBand) + 0.5 * (nk - 1) * log1mz + 0.5 * Math.Log(nh * z / 2);
        double logFs = 0.5 * nk * log1mz;
        double tau = Math.Exp(logTau);
        // 1 - (1 - Fs) e^-tau, written so that tiny tau and tiny Fs keep their digits.
        double fap = -ExpM1(-tau) + Math.Exp(logFs - tau);
        return Clamp(fap);
    }

    /// <summary>Single-frequency Baluev FAP (1 - z)^(N_K/2), exposed for the checks in SCIENCE.md CV-17.</summary>
    public static double BaluevSingle(double z, int n) => z >= 1 ? 0 : z <= 0 ? 1 : Clamp(Math.Exp(0.5 * (n - 3) * Log1P(-z)));

    /// <summary>
    /// FAP of the chi2-weighted multiband power (shared frequency, an independent sinusoid per band: N_base = 0,
    /// N_band = 1). Under pure Gaussian noise the power z = delta-chi2 / chi2_0 follows Beta(B, (N - 3B)/2) for B bands,
    /// so the single-frequency FAP is I_{1-z}((N-3B)/2, B) = (1-z)^a sum_{j&lt;B} Gamma(a+j)/(Gamma(a) j!) z^j with
    /// a = (N-3B)/2 (closed form for integer B; B = 1 gives the GLS value). The search over frequencies uses the
    /// naive count of independent frequencies N_eff = f_max T (SCIENCE.md 1.6, "naive alternative").
    /// </summary>
    public static double Multiband(double z, int n, int bands, double fMax, double baseline)
        => BetaNaive(z, 0.5 * (n - 3.0 * bands), bands, Math.Max(1.0, fMax * baseline));

    /// <summary>
    /// FAP of the harmonic model's power z = 1 - chi2/chi2_ref against the constants-and-offsets model:
    /// <paramref name="freeParams"/> (even) frequency-dependent parameters, <paramref name="totalParams"/> in all.
    /// Same Beta argument as <see cref="Multiband"/>; the naive frequency count is multiplied by the highest
    /// harmonic (its k f terms scan k times the range).
    /// </summary>
    public static double Model(double z, int n, int freeParams, int totalParams, int maxHarmonic, double fMax, double baseline)
        => freeParams < 2 ? 1.0 : BetaNaive(z, 0.5 * (n - totalParams), freeParams / 2, Math.Max(1.0, Math.Max(1, maxHarmonic) * fMax * baseline));

    private static double BetaNaive(double z, double a, int bands, double nEff)
    {
        if (bands < 1) return 1.0;
        if (!(z > 0) || !(a > 0)) return 1.0;
        if (z >= 1) return 0.0;
        double log1mz = Log1P(-z), logz = Math.Log(z);
        // log-sum-exp over the terms of the finite series.
        double maxLog = double.NegativeInfinity;
        Span<double> terms = bands <= 64 ? stackalloc double[bands] : new double[bands];
        for (int j = 0; j < bands; j++)
        {
            terms[j] = a * log1mz + SpecialFunctions.GammaLn(a + j) - SpecialFunctions.GammaLn(a) - SpecialFunctions.FactorialLn(j) + j * logz;
            maxLog = Math.Max(maxLog, terms[j]);
        }
        double sum = 0;
        foreach (double tj in terms) sum += Math.Exp(tj - maxLog);
        double single = Math.Min(1.0, Math.Exp(maxLog + Math.Log(sum)));
        if (single >= 1) return 1.0;
        return Clamp(-ExpM1(nEff * Log1P(-single)));
    }

    /// <summary>log(1 + x) accurate for tiny x (Kahan's trick; the BCL's LogP1 is the naive form).</summary>
    internal static double Log1P(double x)
    {
        double u = 1.0 + x;
        return u == 1.0 ? x : Math.Log(u) * x / (u - 1.0);
    }

    /// <summary>exp(x) - 1 accurate for tiny x (Kahan's trick).</summary>
    internal static double ExpM1(double x)
    {
        double u = Math.Exp(x);
        if (u == 1.0) return x;
        double um1 = u - 1.0;
        if (um1 == -1.0) return -1.0;
        return um1 * x / Math.Log(u);
    }

    private static double Clamp(double v) => double.IsNaN(v) ? 1.0 : Math.Clamp(v, 0.0, 1.0);
}
