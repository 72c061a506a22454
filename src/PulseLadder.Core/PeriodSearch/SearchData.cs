using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.PeriodSearch;

/// <summary>The points of one band, times relative to the common reference epoch, ready for the kernels.</summary>
internal sealed class BandSeries
{
    public required string Band { get; init; }
    public required double[] T { get; init; }
    public required double[] Y { get; init; }
    /// <summary>Weights 1/sigma^2.</summary>
    public required double[] W { get; init; }
    /// <summary>Index into <see cref="Observers"/> for each point; 0 is the band's reference observer (most points).</summary>
    public required int[] Obs { get; init; }
    public required string[] Observers { get; init; }
    public required int[] ObserverCounts { get; init; }
    public int Count => T.Length;

    /// <summary>Weighted chi2 about the weighted mean (the GLS chi2_0).</summary>
    public double Chi2Mean { get; init; }
    /// <summary>Weighted mean magnitude.</summary>
    public double YMean { get; init; }
}

/// <summary>
/// Input of the period search after the defensive checks: finite values only, errors floored, grouped by band.
/// </summary>
internal sealed class SearchData
{
    /// <summary>Smallest per-point error used for the weight (mag). Keeps one point with a tiny claimed error from
    /// dominating every fit (common practice; photometric errors below a millimag are not believable).</summary>
    public const double ErrorFloor = 0.001;

    /// <summary>Bands with fewer points than this do not enter the search (a 3-parameter sinusoid needs margin).</summary>
    public const int MinBandPoints = 8;

    public required IReadOnlyList<BandSeries> Bands { get; init; }
    public required double ReferenceEpoch { get; init; }
    public required double Baseline { get; init; }
    public required int UsablePoints { get; init; }
    public required IReadOnlyList<string> SkippedBands { get; init; }

    public int Count { get; init; }

    /// <summary>All times of the bands used (relative), for the spectral window and Baluev's D_t.</summary>
    public required double[] AllT { get; init; }
    public required double[] AllW { get; init; }

    public static SearchData Prepare(IReadOnlyList<LightCurvePoint> points)
    {
        var good = new List<LightCurvePoint>(points?.Count ?? 0);
        if (points is not null)
        {
            foreach (var p in points)
            {
                if (double.IsFinite(p.Bjd) && double.IsFinite(p.Mag) && double.IsFinite(p.MagErr) && p.MagErr > 0)
                    good.Add(p);
            }
        }

        // Weighted mean time as the reference epoch: decorrelates frequency from phase and keeps trig arguments small.
        double sw = 0, swt = 0, t0 = good.Count > 0 ? good[0].Bjd : 0;
        foreach (var p in good)
        {
            double w = Weight(p.MagErr);
            sw += w; swt += w * (p.Bjd - t0);
        }
        double tref = sw > 0 ? t0 + swt / sw : 0;

        var bands = new List<BandSeries>();
        var skipped = new List<string>();
        foreach (var g in good.GroupBy(p => p.Band ?? "", StringComparer.Ordinal).OrderBy(g => g.Key, StringComparer.Ordinal))
        {
            var list = g.OrderBy(p => p.Bjd).ToList();
            if (list.Count < MinBandPoints) { skipped.Add(g.Key); continue; }
            var obsNames = list.GroupBy(p => p.Observer ?? "", StringComparer.Ordinal)
                .Select(o => (Name: o.Key, N: o.Count()))
                .OrderByDescending(o => o.N).ThenBy(o => o.Name, StringComparer.Ordinal).ToArray();
            var index = new Dictionary<string, int>(StringComparer.Ordinal);
            for (int i = 0; i < obsNames.Length; i++) index[obsNames[i].Name] = i;
            int n = list.Count;
            var t = new double[n]; var y = new double[n]; var w = new double[n]; var o = new int[n];
            double ws = 0, wy = 0;
            for (int i = 0; i < n; i++)
            {
                t[i] = list[i].Bjd - tref; y[i] = list[i].Mag; w[i] = Weight(list[i].MagErr);
                o[i] = index[list[i].Observer ?? ""];
                ws += w[i]; wy += w[i] * y[i];
            }
            double ybar = wy / ws, chi0 = 0;
            for (int i = 0; i < n; i++) { double d = y[i] - ybar; chi0 += w[i] * d * d; }
            bands.Add(new BandSeries
            {
                Band = g.Key, T = t, Y = y, W = w, Obs = o,
                Observers = obsNames.Select(x => x.Name).ToArray(), ObserverCounts = obsNames.Select(x => x.N).ToArray(),
                Chi2Mean = chi0, YMean = ybar,
            });
        }

        int count = bands.Sum(b => b.Count);
        var allT = new double[count]; var allW = new double[count];
        int k = 0;
        foreach (var b in bands)
        {
            b.T.CopyTo(allT, k); b.W.CopyTo(allW, k); k += b.Count;
        }
        double baseline = count > 0 ? allT.Max() - allT.Min() : 0;
        return new SearchData
        {
            Bands = bands, ReferenceEpoch = tref, Baseline = baseline, UsablePoints = good.Count, SkippedBands = skipped,
            Count = count, AllT = allT, AllW = allW,
        };
    }

    /// <summary>A copy with each point's observer offset (per band) subtracted from its magnitude.</summary>
    public SearchData WithOffsetsRemoved(IReadOnlyList<LightCurves.ObserverOffset> offsets)
    {
        var bands = Bands.Select(b =>
        {
            var o = new double[b.Observers.Length];
            foreach (var x in offsets)
                if (x.Band == b.Band) { int j = Array.IndexOf(b.Observers, x.Observer); if (j >= 0) o[j] = x.Offset; }
            var y = new double[b.Count];
            double ws = 0, wy = 0;
            for (int i = 0; i < y.Length; i++) { y[i] = b.Y[i] - o[b.Obs[i]]; ws += b.W[i]; wy += b.W[i] * y[i]; }
            double ybar = wy / ws, chi0 = 0;
            for (int i = 0; i < y.Length; i++) { double d = y[i] - ybar; chi0 += b.W[i] * d * d; }
            return new BandSeries
            {
                Band = b.Band, T = b.T, Y = y, W = b.W, Obs = b.Obs, Observers = b.Observers,
                ObserverCounts = b.ObserverCounts, Chi2Mean = chi0, YMean = ybar,
            };
        }).ToArray();
        return new SearchData
        {
            Bands = bands, ReferenceEpoch = ReferenceEpoch, Baseline = Baseline, UsablePoints = UsablePoints,
            SkippedBands = SkippedBands, Count = Count, AllT = AllT, AllW = AllW,
        };
    }

    public static double Weight(double magErr)
    {
        double s = Math.Max(magErr, ErrorFloor);
        return 1.0 / (s * s);
    }
}
