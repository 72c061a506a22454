using System.Globalization;
using System.Security.Cryptography;
using System.Text;
using PulseLadder.Core.Calibration;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Classification;

/// <summary>Fits a field's apparent period-luminosity lines for the classifier's PL-plane test.</summary>
public static class FieldPl
{
    /// <summary>Clipping limit in robust sigmas (common practice, as the field summary, SCIENCE.md 5.2).</summary>
    internal const double ClipSigma = 3.0;
    internal const int MaxIterations = 5;
    /// <summary>Fewest kept stars and smallest log P span for a free slope; below either the slope is held fixed.</summary>
    internal const int MinStarsForSlope = 8;
    internal const double MinLogPSpanForSlope = 0.5;
    /// <summary>Floor of the line's scatter (mag): a few stars must not make the test over-confident.</summary>
    internal const double MinScatter = 0.05;

    /// <summary>
    /// One line per band holding at least <see cref="FieldContext.MinStars"/> fundamental-mode classical Cepheids
    /// (finite period &gt; 0 and magnitude). Start: the slope of the embedded LMC relation of that band (Udalski 1999 V
    /// and I, Persson et al. 2004 J, H, K; see relations.csv) held fixed and the median zero point; then stars beyond
    /// 3 robust sigmas are clipped and the line refitted, with a free least-squares slope once at least 8 stars
    /// spanning 0.5 dex in log P remain, up to 5 times. Clipping keeps a Type II Cepheid (1.5-2 mag below) or a
    /// blend from pulling the line it is tested against. Deterministic; bands in ordinal order. Empty input: no lines.
    /// </summary>
    public static IReadOnlyList<FieldPlLine> Fit(IReadOnlyList<FieldStar> stars)
    {
        ArgumentNullException.ThrowIfNull(stars);
        var lines = new List<FieldPlLine>();
        var byBand = stars.Where(s => s.Class == PulsatorClass.ClassicalCepheidFundamental && s.PeriodDays > 0
                && double.IsFinite(s.PeriodDays) && double.IsFinite(s.IntensityMeanMag))
            .GroupBy(s => s.Band, StringComparer.Ordinal)
            .OrderBy(g => g.Key, StringComparer.Ordinal);
        foreach (var g in byBand)
        {
            var pts = g.OrderBy(s => s.Name, StringComparer.Ordinal).Select(s => (X: Math.Log10(s.PeriodDays), Y: s.IntensityMeanMag)).ToArray();
            if (pts.Length < FieldContext.MinStars) continue;
            if (FitBand(g.Key, pts) is { } line) lines.Add(line);
        }
        return lines;
    }

    private static FieldPlLine? FitBand(string band, (double X, double Y)[] pts)
    {
        var (fixedSlope, slopeId) = DefaultSlope(band);
        var keep = Enumerable.Repeat(true, pts.Length).ToArray();
        double slope = fixedSlope, zp = 0, scatter = MinScatter;
        string source = slopeId;
        for (int iter = 0; iter <= MaxIterations; iter++)
        {
            var kept = pts.Where((_, i) => keep[i]).ToArray();
            if (kept.Length < FieldContext.MinStars) return null;
            bool free = iter > 0 && kept.Length >= MinStarsForSlope && kept.Max(p => p.X) - kept.Min(p => p.X) >= MinLogPSpanForSlope;
            if (free)
            {
                double mx = kept.Average(p => p.X), my = kept.Average(p => p.Y), sxy = 0, sxx = 0;
                foreach (var p in kept) { sxy += (p.X - mx) * (p.Y - my); sxx += (p.X - mx) * (p.X - mx); }
                slope = sxy / sxx;
                zp = my - slope * mx;
                source = "fitted";
            }
            else
            {
                slope = fixedSlope;
                source = slopeId;
                zp = Median(kept.Select(p => p.Y - slope * p.X));
            }
            double z = zp, b = slope;
            scatter = Math.Max(MinScatter, 1.4826 * Median(kept.Select(p => Math.Abs(p.Y - z - b * p.X))));
            var next = pts.Select(p => Math.Abs(p.Y - z - b * p.X) <= ClipSigma * scatter).ToArray();
            if (next.SequenceEqual(keep) && iter > 0) break;
            keep = next;
        }
        int count = keep.Count(k => k);
        if (count < FieldContext.MinStars) return null;
        return new FieldPlLine(band, zp, slope, source, scatter, count, pts.Length - count);
    }

    /// <summary>Slope of the embedded single-band LMC relation for fundamental-mode Cepheids in this band; I-band Udalski 1999 otherwise.</summary>
    private static (double Slope, string Id) DefaultSlope(string band)
    {
        var reg = CalibrationRegistry.Embedded;
        var rel = reg.Relations.FirstOrDefault(r => r.Kind == RelationKind.Apparent && !r.IsWesenheit && !r.UserSupplied
            && r.Classes.Contains(PulsatorClass.ClassicalCepheidFundamental) && BandMatch.Find(r.Mag, [band]) is not null);
        if (rel is not null) return (rel.B, rel.Id);
        return reg.TryGet("udalski1999_i", out var i) ? (i.B, i.Id) : (-2.962, "udalski1999_i");
    }

    private static double Median(IEnumerable<double> values)
    {
        var a = values.OrderBy(v => v).ToArray();
        int n = a.Length;
        return n % 2 == 1 ? a[n / 2] : 0.5 * (a[n / 2 - 1] + a[n / 2]);
    }

    /// <summary>SHA-256 (lower-case hex) over the stars sorted by name and band: name, class, band, period and magnitude ("R" format).</summary>
    public static string HashOf(IReadOnlyList<FieldStar> stars)
    {
        ArgumentNullException.ThrowIfNull(stars);
        var sb = new StringBuilder();
        foreach (var s in stars.OrderBy(s => s.Name, StringComparer.Ordinal).ThenBy(s => s.Band, StringComparer.Ordinal))
            sb.Append(s.Name).Append('|').Append(s.Class.ToCode()).Append('|').Append(s.Band).Append('|')
              .Append(s.PeriodDays.ToString("R", CultureInfo.InvariantCulture)).Append('|')
              .Append(s.IntensityMeanMag.ToString("R", CultureInfo.InvariantCulture)).Append('\n');
        return Convert.ToHexString(SHA256.HashData(Encoding.UTF8.GetBytes(sb.ToString()))).ToLowerInvariant();
    }
}
