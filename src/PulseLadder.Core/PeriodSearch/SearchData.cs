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
        // Grouped by band (ordinal order), each band in time order (stable: equal times keep their input order),
        // observers by count then name. Index arrays instead of LINQ groupings: this runs twice per star.
        var byBand = new Dictionary<string, List<int>>(StringComparer.Ordinal);
        for (int i = 0; i < good.Count; i++)
        {
            string key = good[i].Band ?? "";
            if (!byBand.TryGetValue(key, out var members)) byBand.Add(key, members = []);
            members.Add(i);
        }
        var bandNames = byBand.Keys.ToArray();
        Array.Sort(bandNames, StringComparer.Ordinal);
        foreach (string bandName in bandNames)
        {
            var members = byBand[bandName];
            if (members.Count < MinBandPoints) { skipped.Add(bandName); continue; }
            int n = members.Count;
            var order = members.ToArray();
            var keys = new double[n];
            for (int i = 0; i < n; i++) keys[i] = good[order[i]].Bjd;
            if (!IsSorted(keys)) Array.Sort(order, (a, b) => good[a].Bjd.CompareTo(good[b].Bjd) is var c && c != 0 ? c : a.CompareTo(b));
            var counts = new Dictionary<string, int>(StringComparer.Ordinal);
            foreach (int i in order)
            {
                string name = good[i].Observer ?? "";
                counts[name] = counts.GetValueOrDefault(name) + 1;
            }
            var obsNames = counts.Keys.ToArray();
            Array.Sort(obsNames, (a, b) => counts[b].CompareTo(counts[a]) is var c && c != 0 ? c : string.CompareOrdinal(a, b));
            var index = new Dictionary<string, int>(StringComparer.Ordinal);
            for (int i = 0; i < obsNames.Length; i++) index[obsNames[i]] = i;
            var t = new double[n]; var y = new double[n]; var w = new double[n]; var o = new int[n];
            double ws = 0, wy = 0;
            for (int i = 0; i < n; i++)
            {
                var p = good[order[i]];
                t[i] = p.Bjd - tref; y[i] = p.Mag; w[i] = Weight(p.MagErr);
                o[i] = index[p.Observer ?? ""];
                ws += w[i]; wy += w[i] * y[i];
            }
            double ybar = wy / ws, chi0 = 0;
            for (int i = 0; i < n; i++) { double d = y[i] - ybar; chi0 += w[i] * d * d; }
            var observerCounts = new int[obsNames.Length];
            for (int i = 0; i < obsNames.Length; i++) observerCounts[i] = counts[obsNames[i]];
            bands.Add(new BandSeries
            {
                Band = bandName, T = t, Y = y, W = w, Obs = o,
                Observers = obsNames, ObserverCounts = observerCounts,
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

    private static bool IsSorted(double[] x)
    {
        for (int i = 1; i < x.Length; i++) if (!(x[i] >= x[i - 1])) return false;
        return true;
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
