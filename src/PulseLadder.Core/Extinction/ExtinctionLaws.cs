using System.Text.Json.Serialization;

namespace PulseLadder.Core.Extinction;

/// <summary>Interstellar extinction laws PulseLadder implements (all one-parameter families in R_V).</summary>
[JsonConverter(typeof(JsonStringEnumConverter<ExtinctionLaw>))]
public enum ExtinctionLaw
{
    /// <summary>Cardelli, Clayton &amp; Mathis 1989, ApJ 345, 245.</summary>
    Ccm89,
    /// <summary>CCM89 with the optical/NIR polynomial replaced by O'Donnell 1994, ApJ 422, 158.</summary>
    Odonnell94,
    /// <summary>Fitzpatrick 1999, PASP 111, 63: FM90-form UV plus a natural cubic spline through optical/IR anchors.</summary>
    Fitzpatrick99,
}

/// <summary>
/// A_lambda/A_V as a function of wavelength for the laws of <see cref="ExtinctionLaw"/>.
/// Wavelengths in micrometres; valid 0.1 to 3.33 um (x = 1/lambda from 0.3 to 10 um^-1) for CCM89/O'Donnell and
/// 0.1 um to infinity for F99 (its spline is anchored at x = 0). Outside the valid range the methods throw:
/// a band wavelength is configuration, not data.
/// </summary>
public static class ExtinctionLaws
{
    public static string ToCode(this ExtinctionLaw law) => law switch
    {
        ExtinctionLaw.Ccm89 => "ccm89",
        ExtinctionLaw.Odonnell94 => "odonnell94",
        ExtinctionLaw.Fitzpatrick99 => "f99",
        _ => throw new ArgumentOutOfRangeException(nameof(law)),
    };

    public static bool TryParse(string? code, out ExtinctionLaw law)
    {
        switch (code?.Trim().ToLowerInvariant())
        {
            case "ccm89" or "ccm" or "cardelli": law = ExtinctionLaw.Ccm89; return true;
            case "odonnell94" or "od94" or "odonnell": law = ExtinctionLaw.Odonnell94; return true;
            case "f99" or "fitzpatrick99" or "fitzpatrick": law = ExtinctionLaw.Fitzpatrick99; return true;
            default: law = ExtinctionLaw.Ccm89; return false;
        }
    }

    /// <summary>A_lambda / A_V at <paramref name="lambdaMicron"/> for total-to-selective ratio <paramref name="rv"/> (&gt; 0).</summary>
    public static double AOverAv(ExtinctionLaw law, double lambdaMicron, double rv)
    {
        if (!(lambdaMicron > 0) || !double.IsFinite(lambdaMicron)) throw new ArgumentOutOfRangeException(nameof(lambdaMicron));
        if (!(rv > 0) || !double.IsFinite(rv)) throw new ArgumentOutOfRangeException(nameof(rv));
        double x = 1.0 / lambdaMicron;
        return law switch
        {
            ExtinctionLaw.Ccm89 => Ccm(x, rv, odonnell: false),
            ExtinctionLaw.Odonnell94 => Ccm(x, rv, odonnell: true),
            ExtinctionLaw.Fitzpatrick99 => Fitzpatrick99.AOverEbv(x, rv) / rv,
            _ => throw new ArgumentOutOfRangeException(nameof(law)),
        };
    }

    /// <summary>A_lambda / E(B-V) = R_V * A_lambda/A_V.</summary>
    public static double AOverEbv(ExtinctionLaw law, double lambdaMicron, double rv) => rv * AOverAv(law, lambdaMicron, rv);

    private static double Ccm(double x, double rv, bool odonnell)
    {
        var (a, b) = CcmAB(x, odonnell);
        return a + b / rv;
    }

    /// <summary>CCM89/O'Donnell a(x), b(x): A/A_V = a + b/R_V.</summary>
    internal static (double A, double B) CcmAB(double x, bool odonnell)
    {
        double a, b;
        if (x < 0.3 || x > 10.0) throw new ArgumentOutOfRangeException(nameof(x), x, "CCM89 is defined for 0.3 <= 1/lambda <= 10 um^-1");
        if (x <= 1.1)
        {
            double p = Math.Pow(x, 1.61);
            a = 0.574 * p;
            b = -0.527 * p;
        }
        else if (x <= 3.3)
        {
            double y = x - 1.82;
            if (odonnell)
            {
                a = Poly(y, 1.0, 0.104, -0.609, 0.701, 1.137, -1.718, -0.827, 1.647, -0.505);
                b = Poly(y, 0.0, 1.952, 2.908, -3.989, -7.985, 11.102, 5.491, -10.805, 3.347);
            }
            else
            {
                a = Poly(y, 1.0, 0.17699, -0.50447, -0.02427, 0.72085, 0.01979, -0.77530, 0.32999);
                b = Poly(y, 0.0, 1.41338, 2.28305, 1.07233, -5.38434, -0.62251, 5.30260, -2.09002);
            }
        }
        else if (x <= 8.0)
        {
            double fa = 0, fb = 0;
            if (x >= 5.9)
            {
                double y = x - 5.9;
                fa = -0.04473 * y * y - 0.009779 * y * y * y;
                fb = 0.2130 * y * y + 0.1207 * y * y * y;
            }
            a = 1.752 - 0.316 * x - 0.104 / ((x - 4.67) * (x - 4.67) + 0.341) + fa;
            b = -3.090 + 1.825 * x + 1.206 / ((x - 4.62) * (x - 4.62) + 0.263) + fb;
        }
        else
        {
            double y = x - 8.0;
            a = Poly(y, -1.073, -0.628, 0.137, -0.070);
            b = Poly(y, 13.670, 4.257, -0.420, 0.374);
        }
        return (a, b);
    }

    private static double Poly(double y, params ReadOnlySpan<double> c)
    {
        double s = 0;
        for (int i = c.Length - 1; i >= 0; i--) s = s * y + c[i];
        return s;
    }
}

/// <summary>
/// A_lambda/A_V at one fixed wavelength as a fast function of R_V (for Monte Carlo loops): CCM89/O'Donnell are
/// exactly a + b/R_V; F99 is linear in its anchor values, so nine precomputed spline weights suffice.
/// </summary>
internal sealed class FixedWavelengthLaw
{
    private readonly ExtinctionLaw _law;
    private readonly double _x, _a, _b;
    private readonly double[]? _w;

    public FixedWavelengthLaw(ExtinctionLaw law, double lambdaMicron)
    {
        _law = law;
        _x = 1.0 / lambdaMicron;
        _ = ExtinctionLaws.AOverAv(law, lambdaMicron, 3.1); // validates the range once
        if (law == ExtinctionLaw.Fitzpatrick99)
        {
            if (!Fitzpatrick99.IsUv(_x)) _w = Fitzpatrick99.CardinalWeights(_x);
        }
        else (_a, _b) = ExtinctionLaws.CcmAB(_x, law == ExtinctionLaw.Odonnell94);
    }

    public double AOverAv(double rv)
    {
        if (_law != ExtinctionLaw.Fitzpatrick99) return _a + _b / rv;
        return (_w is null ? Fitzpatrick99.AOverEbvUv(_x, rv) : Fitzpatrick99.AOverEbvFromWeights(_w, rv)) / rv;
    }
}
