using System.Buffers;
namespace PulseLadder.Core.PeriodSearch;

/// <summary>Spectral window, plot thinning and phase dispersion minimisation.</summary>
internal static class SpectralTools
{
    /// <summary>Buckets used by <see cref="Thin"/>; two points each, so plots stay at or below 2 x this.</summary>
    public const int PlotBuckets = 1000;

    /// <summary>
    /// Spectral window of the sampling (Deeming 1975): W(f) = |(1/N) sum_k exp(-2 pi i f t_k)|^2, W(0) = 1.
    /// Unweighted: it describes where the observations are, not how good they are.
    /// </summary>
    public static void Window(ReadOnlySpan<double> t, ReadOnlySpan<double> freqs, Span<double> result)
    {
        int n = t.Length;
        if (n == 0) { result.Clear(); return; }
        for (int j = 0; j < freqs.Length; j++)
        {
            double w = 2 * Math.PI * freqs[j], re = 0, im = 0;
            for (int k = 0; k < n; k++)
            {
                (double s, double c) = Math.SinCos(w * t[k]);
                re += c; im -= s;
            }
            re /= n; im /= n;
            result[j] = re * re + im * im;
        }
    }

    /// <summary>
    /// The same window at grid indices <paramref name="indices"/> (increasing) of the regular grid f0 + k df. Each
    /// point's phasor is rotated from one requested index to the next by a table of its step powers
    /// exp(-2 pi i g df t), g up to the largest gap: one complex multiply per point and plotted frequency instead of a
    /// sin/cos pair; re-seeded exactly every 128 plotted frequencies so rounding cannot accumulate. Falls back to
    /// <see cref="Window"/> when the table would be large (very long grids thinned hard).
    /// </summary>
    public static void WindowOnGrid(ReadOnlySpan<double> t, double f0, double df, ReadOnlySpan<int> indices, Span<double> result)
    {
        int n = t.Length, m = indices.Length;
        if (n == 0 || m == 0) { result.Clear(); return; }
        int maxGap = 1;
        for (int j = 1; j < m; j++) maxGap = Math.Max(maxGap, indices[j] - indices[j - 1]);
        if ((long)maxGap * n > 2_000_000)
        {
            var f = new double[m];
            for (int j = 0; j < m; j++) f[j] = f0 + indices[j] * df;
            Window(t, f, result);
            return;
        }
        // Powers s^g, g = 1..maxGap, of each point's one-step phasor s = exp(-2 pi i df t), row g-1.
        // Up to 2e6 doubles each: pooled (large-object-heap size; fresh arrays per star cost full collections).
        double[] prBuf = ArrayPool<double>.Shared.Rent(maxGap * n), piBuf = ArrayPool<double>.Shared.Rent(maxGap * n);
        try { WindowByPhasors(t, f0, df, indices, result, maxGap, prBuf.AsSpan(0, maxGap * n), piBuf.AsSpan(0, maxGap * n)); }
        finally
        {
            ArrayPool<double>.Shared.Return(piBuf);
            ArrayPool<double>.Shared.Return(prBuf);
        }
    }

    private static void WindowByPhasors(ReadOnlySpan<double> t, double f0, double df, ReadOnlySpan<int> indices, Span<double> result,
        int maxGap, Span<double> pr, Span<double> pi)
    {
        int n = t.Length, m = indices.Length;
        for (int i = 0; i < n; i++)
        {
            (double s, double c) = Math.SinCos(2 * Math.PI * df * t[i]);
            pr[i] = c; pi[i] = -s;
        }
        for (int g = 1; g < maxGap; g++)
        {
            int o = g * n, p = (g - 1) * n;
            for (int i = 0; i < n; i++)
            {
                pr[o + i] = pr[p + i] * pr[i] - pi[p + i] * pi[i];
                pi[o + i] = pr[p + i] * pi[i] + pi[p + i] * pr[i];
            }
        }
        var re = new double[n]; var im = new double[n];
        for (int j = 0; j < m; j++)
        {
            double a, b;
            if (j % 128 == 0)
            {
                double w = 2 * Math.PI * (f0 + indices[j] * df);
                for (int i = 0; i < n; i++)
                {
                    (double s, double c) = Math.SinCos(w * t[i]);
                    re[i] = c; im[i] = -s;
                }
                (a, b) = (Sum(re), Sum(im));
            }
            else
            {
                int g = indices[j] - indices[j - 1];
                (a, b) = RotateAndSum(re, im, pr.Slice((g - 1) * n, n), pi.Slice((g - 1) * n, n));
            }
            a /= n; b /= n;
            result[j] = a * a + b * b;
        }
    }

    private static double Sum(ReadOnlySpan<double> x)
    {
        var acc = System.Numerics.Vector<double>.Zero;
        var vx = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(x);
        foreach (var v in vx) acc += v;
        double s = System.Numerics.Vector.Sum(acc);
        for (int i = vx.Length * System.Numerics.Vector<double>.Count; i < x.Length; i++) s += x[i];
        return s;
    }

    /// <summary>
    /// (re, im) *= (sr, si) elementwise, returning the sums of the new re and im; System.Numerics vectors where the
    /// CPU has them (the sums in vector lanes: a scalar running sum would be a latency chain as long as the data).
    /// </summary>
    private static (double Re, double Im) RotateAndSum(Span<double> re, Span<double> im, ReadOnlySpan<double> sr, ReadOnlySpan<double> si)
    {
        int n = re.Length, i = 0;
        double sumRe = 0, sumIm = 0;
        if (System.Numerics.Vector.IsHardwareAccelerated)
        {
            int width = System.Numerics.Vector<double>.Count;
            var vre = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(re);
            var vim = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(im);
            var vsr = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(sr);
            var vsi = System.Runtime.InteropServices.MemoryMarshal.Cast<double, System.Numerics.Vector<double>>(si);
            var accRe = System.Numerics.Vector<double>.Zero;
            var accIm = System.Numerics.Vector<double>.Zero;
            for (int v = 0; v < vre.Length; v++)
            {
                var r0 = vre[v];
                var r1 = r0 * vsr[v] - vim[v] * vsi[v];
                var i1 = r0 * vsi[v] + vim[v] * vsr[v];
                vre[v] = r1; vim[v] = i1;
                accRe += r1; accIm += i1;
            }
            sumRe = System.Numerics.Vector.Sum(accRe);
            sumIm = System.Numerics.Vector.Sum(accIm);
            i = vre.Length * width;
        }
        for (; i < n; i++)
        {
            double r0 = re[i];
            re[i] = r0 * sr[i] - im[i] * si[i];
            im[i] = r0 * si[i] + im[i] * sr[i];
            sumRe += re[i]; sumIm += im[i];
        }
        return (sumRe, sumIm);
    }

    /// <summary>
    /// Indices of a min/max decimation of <paramref name="y"/>: the series is cut into <see cref="PlotBuckets"/>
    /// buckets and the lowest and highest point of each are kept in order, so every peak that is the highest of its
    /// bucket survives and the plot shows the true envelope. Short series are returned whole.
    /// </summary>
    public static int[] Thin(ReadOnlySpan<double> y)
    {
        int n = y.Length;
        if (n <= 2 * PlotBuckets)
        {
            var all = new int[n];
            for (int i = 0; i < n; i++) all[i] = i;
            return all;
        }
        var keep = new List<int>(2 * PlotBuckets);
        for (int b = 0; b < PlotBuckets; b++)
        {
            int lo = (int)((long)b * n / PlotBuckets), hi = (int)((long)(b + 1) * n / PlotBuckets);
            if (hi <= lo) continue;
            int iMin = lo, iMax = lo;
            for (int i = lo + 1; i < hi; i++)
            {
                if (y[i] < y[iMin]) iMin = i;
                if (y[i] > y[iMax]) iMax = i;
            }
            if (iMin == iMax) keep.Add(iMin);
            else { keep.Add(Math.Min(iMin, iMax)); keep.Add(Math.Max(iMin, iMax)); }
        }
        return keep.ToArray();
    }

    /// <summary>
    /// Stellingwerf (1978) theta = s^2 / sigma^2 with <paramref name="bins"/> equal phase bins and one cover, phase
    /// zero at <paramref name="phaseZero"/>. Several groups (bands) are pooled: each group has its own mean and its
    /// own bins, within-bin and total sums of squares are added over groups and their degrees of freedom likewise
    /// (one group gives Stellingwerf's definition exactly). Unweighted, as in the original. Null when undefined
    /// (no variance, or no bin with two points).
    /// </summary>
    public static double? PdmTheta(IReadOnlyList<(double[] T, double[] Y)> groups, double period, int bins, double phaseZero)
    {
        if (!(period > 0) || bins < 2) return null;
        Span<double> sum = bins <= 256 ? stackalloc double[bins] : new double[bins];
        Span<double> sum2 = bins <= 256 ? stackalloc double[bins] : new double[bins];
        Span<int> cnt = bins <= 256 ? stackalloc int[bins] : new int[bins];
        double within = 0, total = 0;
        int withinDof = 0, totalDof = 0;
        foreach (var (t, y) in groups)
        {
            int n = t.Length;
            if (n < 2) continue;
            sum.Clear(); sum2.Clear(); cnt.Clear();
            double mean = 0;
            for (int i = 0; i < n; i++) mean += y[i];
            mean /= n;
            for (int i = 0; i < n; i++)
            {
                double d = y[i] - mean;
                total += d * d;
                double ph = (t[i] - phaseZero) / period;
                ph -= Math.Floor(ph);
                int b = Math.Min(bins - 1, (int)(ph * bins));
                // Sums about the group mean keep the bin variances free of cancellation.
                sum[b] += d; sum2[b] += d * d; cnt[b]++;
            }
            totalDof += n - 1;
            for (int b = 0; b < bins; b++)
            {
                if (cnt[b] < 2) continue;
                within += sum2[b] - sum[b] * sum[b] / cnt[b];
                withinDof += cnt[b] - 1;
            }
        }
        if (withinDof <= 0 || totalDof <= 0 || !(total > 0)) return null;
        double theta = (within / withinDof) / (total / totalDof);
        return double.IsFinite(theta) ? theta : null;
    }
}
