namespace PulseLadder.Core.Distances;

/// <summary>Trigonometric-parallax distances (SCIENCE 5.1): d = 1000/pi[mas] pc, trusted only for sigma_pi/pi &lt;= 0.1.</summary>
public static class Parallax
{
    /// <summary>Distance in parsecs for a parallax in milliarcseconds (&gt; 0).</summary>
    public static double DistancePc(double parallaxMas)
    {
        if (!(parallaxMas > 0) || !double.IsFinite(parallaxMas)) throw new ArgumentOutOfRangeException(nameof(parallaxMas));
        return 1000.0 / parallaxMas;
    }

    /// <summary>True when the fractional error is small enough that 1/pi is not badly biased (Lutz-Kelker).</summary>
    public static bool IsReliable(double parallaxMas, double parallaxErrMas) => parallaxMas > 0 && parallaxErrMas >= 0 && parallaxErrMas / parallaxMas <= 0.1;
}
