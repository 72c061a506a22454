using System.Globalization;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>
/// Labels a peak by its relation to the peaks ranked above it (SCIENCE.md 1.7). Label format:
/// "&lt;relation&gt;_of:&lt;frequency of the stronger peak, c/d, 5 decimals&gt;", e.g. "1d_alias_of:0.18605".
/// Relations, for a peak f and a stronger peak g (tolerance: half the peak width, 0.5/T, but at least two grid steps):
///   1sd_alias, 2sd_alias  |f - g| = k * 1.0027379 or f + g = k * 1.0027379, k = 1, 2 (single site, observed at
///                         the same sidereal time every night: the dominant ground-based alias)
///   1d_alias, 2d_alias    the same with k * 1 c/d (sampling at a fixed clock time)
///   annual_alias          |f - g| = 1/365.25 c/d
///   lunar_alias           |f - g| = 1/29.53 c/d
///   half_period           f = 2g   (also a harmonic: the period is half of the stronger one)
///   harmonic3             f = 3g
///   double_period         f = g/2
///   third_period_sub      f = g/3  (a subharmonic: the period is three times the stronger one)
/// Solar and sidereal are both listed when the baseline cannot tell them apart.
/// </summary>
internal static class AliasLabels
{
    public const double Sidereal = 1.0027379;
    public const double Solar = 1.0;
    public const double Annual = 1.0 / 365.25;
    public const double Lunar = 1.0 / 29.53;

    public static IReadOnlyList<string> For(double f, IReadOnlyList<double> stronger, double tolerance)
    {
        var labels = new List<string>();
        foreach (double g in stronger)
        {
            string gs = g.ToString("F5", CultureInfo.InvariantCulture);
            void Check(bool ok, string rel)
            {
                if (ok) labels.Add(rel + "_of:" + gs);
            }
            double diff = Math.Abs(f - g), sum = f + g;
            for (int k = 1; k <= 2; k++)
            {
                Check(Math.Abs(diff - k * Sidereal) <= tolerance || Math.Abs(sum - k * Sidereal) <= tolerance, $"{k}sd_alias");
                Check(Math.Abs(diff - k * Solar) <= tolerance || Math.Abs(sum - k * Solar) <= tolerance, k == 1 ? "1d_alias" : "2d_alias");
            }
            Check(Math.Abs(diff - Annual) <= tolerance, "annual_alias");
            Check(Math.Abs(diff - Lunar) <= tolerance, "lunar_alias");
            Check(Math.Abs(f - 2 * g) <= tolerance, "half_period");
            Check(Math.Abs(f - 3 * g) <= tolerance, "harmonic3");
            Check(Math.Abs(f - g / 2) <= tolerance, "double_period");
            Check(Math.Abs(f - g / 3) <= tolerance, "third_period_sub");
        }
        return labels;
    }
}
