using System.Runtime.CompilerServices;
namespace PulseLadder.Kernels;

/// <summary>
/// Fast approximate generalised Lomb-Scargle (same definition as <see cref="GlsReference"/>) for large inputs:
/// the sums are type-1 non-uniform FFTs by Gaussian gridding (Dutt &amp; Rokhlin 1993; Greengard &amp; Lee 2004,
/// SIAM Rev. 46, 443), cost O(N Msp + M log M) instead of O(N M).
/// </summary>
/// <remarks>
/// <para>With x_i = 2 pi Df t_i and the band centre fc = F0 + (Mm/2) Df, the sums needed at f_k are
/// sum h_i exp(i 2 pi fc t_i) exp(i k' x_i) for k' = k - Mm/2: one transform for h = w (C, S), one for h = w (y - ybar)
/// (YC, YS), and one at the doubled points 2 x_i for CC = (1 + C2)/2 and CS = S2/2.</para>
/// <para>Each transform spreads onto Mr = 2^p &gt;= 2 Mm grid points with a Gaussian exp(-d^2/(4 tau)) over 2 Msp
/// points, tau = pi Msp / (Mm^2 R (R - 1/2)), R = Mr/Mm, then one complex FFT and a division by the Gaussian's
/// Fourier coefficients. With Msp = 12 the sums are accurate to ~1e-12 of sum |h| (measured: see the accuracy tests and
/// docs/PERFORMANCE.md), which keeps the power within ~1e-10 of the exact kernel.</para>
/// <para>The plan owns its buffers (grid, FFT tables, per-point scratch); a plan is not thread-safe.</para>
/// </remarks>
public sealed class GlsNufftPlan
{
    /// <summary>Default half-width of the Gaussian spreading kernel in grid points.</summary>
    public const int DefaultSpread = 12;

    private readonly int _msp;
    private readonly int _mm, _mr;
    private readonly double _tau;
    private readonly Fft _fft;
    private readonly double[] _grid;            // interleaved complex, Mr
    private readonly double[] _f1, _f2;         // interleaved complex, Mm: (C, S), (YC, YS)
    private readonly double[] _e3;              // exp(-(l h)^2 / (4 tau)), l = -Msp+1 .. Msp
    private readonly double[] _deconv;          // sqrt(pi/tau) exp(k'^2 tau) / Mr, k' = -Mm/2 .. Mm/2-1
    private double[] _qr = [], _qi = [], _x = [];

    /// <summary>Largest spreading half-width accepted (wide kernels go with small oversampling ratios).</summary>
    public const int MaxSpread = 24;

    /// <summary>Default smallest ratio of FFT length to grid length (the Gaussian's classic choice, R &gt;= 2).</summary>
    public const double DefaultOversampling = 2;

    /// <summary>Creates a plan for the grid f0 + k df, k in [0, count).</summary>
    /// <param name="f0">First frequency, cycles/day.</param>
    /// <param name="df">Step, cycles/day (&gt; 0).</param>
    /// <param name="count">Number of frequencies (&gt;= 1).</param>
    /// <param name="spread">Gaussian half-width Msp (4..<see cref="MaxSpread"/>); 12 for ~1e-12 sums at R &gt;= 2.</param>
    /// <param name="oversampling">Smallest ratio R of the FFT length (a power of two) to the grid length, 1.2..4.
    /// The sums' error falls like exp(-pi Msp (1 - 1/(2R - 1))) (Dutt &amp; Rokhlin 1993): a small R with a wider
    /// kernel halves the FFT, which is most of the cost, at a chosen accuracy (see <see cref="ForAccuracy"/>).</param>
    public GlsNufftPlan(double f0, double df, int count, int spread = DefaultSpread, double oversampling = DefaultOversampling)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(count, 1);
        ArgumentOutOfRangeException.ThrowIfLessThan(spread, 4);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(spread, MaxSpread);
        if (!(oversampling >= 1.2 && oversampling <= 4)) throw new ArgumentOutOfRangeException(nameof(oversampling), oversampling, "must be in [1.2, 4].");
        if (!double.IsFinite(f0) || !(df > 0) || !double.IsFinite(df)) throw new ArgumentException("f0 must be finite and df finite and > 0.");
        F0 = f0; Df = df; Count = count; _msp = spread;
        _mm = count + (count & 1);
        _mr = FftLength(_mm, spread, oversampling);
        double r = (double)_mr / _mm;
        _tau = Math.PI * _msp / ((double)_mm * _mm * r * (r - 0.5));
        _fft = new Fft(_mr);
        _grid = new double[2 * _mr];
        _f1 = new double[2 * _mm];
        _f2 = new double[2 * _mm];
        double h = 2.0 * Math.PI / _mr;
        _e3 = new double[2 * _msp];
        for (int l = -_msp + 1; l <= _msp; l++) _e3[l + _msp - 1] = Math.Exp(-(l * h) * (l * h) / (4.0 * _tau));
        _deconv = new double[_mm];
        double scale = Math.Sqrt(Math.PI / _tau) / _mr;
        for (int k = 0; k < _mm; k++)
        {
            double kk = k - _mm / 2;
            _deconv[k] = scale * Math.Exp(kk * kk * _tau);
        }
    }

    /// <summary>FFT length for a grid of <paramref name="mm"/> (even) frequencies: the smallest power of two >= R mm and >= 4 Msp.</summary>
    internal static int FftLength(long mm, int spread, double oversampling)
    {
        long mr = 1;
        while (mr < oversampling * mm || mr < 4 * spread) mr <<= 1;
        if (mr > 1 << 30) throw new ArgumentOutOfRangeException(nameof(mm), mm, "grid too long for one transform.");
        return (int)mr;
    }

    /// <summary>Smallest oversampling ratio <see cref="ForAccuracy"/> uses.</summary>
    internal const double MinSearchOversampling = 1.25;

    /// <summary>
    /// Plan with the smallest FFT that keeps the transformed sums within about <paramref name="relativeError"/> of
    /// sum |h| (the power then within a small multiple of it), for grids of up to <see cref="Capacity"/> frequencies:
    /// the FFT length is the smallest power of two >= 1.25 count, the plan's own grid length is that over 1.25 (so one
    /// plan serves every count that maps to the same FFT, and its tables are built once), and Msp the narrowest with
    /// exp(-pi Msp (1 - 1/(2R - 1))) below the target. At 1e-9 the FFT is about half the default's (1e-12, R >= 2).
    /// </summary>
    public static GlsNufftPlan ForAccuracy(double f0, double df, int count, double relativeError)
    {
        var (capacity, spread, ratio) = ChooseKernel(count, relativeError);
        var plan = new GlsNufftPlan(f0, df, capacity, spread, ratio);
        plan.Retarget(f0, df, count);
        return plan;
    }

    /// <summary>Grid capacity, Msp and R chosen by <see cref="ForAccuracy"/>.</summary>
    internal static (int Capacity, int Spread, double Oversampling) ChooseKernel(int count, double relativeError)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(count, 1);
        if (!(relativeError >= 1e-13 && relativeError < 1)) throw new ArgumentOutOfRangeException(nameof(relativeError), relativeError, "must be in [1e-13, 1).");
        double ratio = MinSearchOversampling;
        while (true)
        {
            double decay = Math.PI * (1 - 1 / (2 * ratio - 1));
            int spread = Math.Max(4, (int)Math.Ceiling(Math.Log(1 / relativeError) / decay));
            if (spread <= MaxSpread || ratio >= 4)
            {
                long mm = count + (count & 1);
                int mr = FftLength(mm, spread, ratio);
                int capacity = (int)Math.Floor(mr / ratio) & ~1;
                return (Math.Max(capacity, (int)mm), Math.Min(spread, MaxSpread), ratio);
            }
            ratio *= 2;
        }
    }

    /// <summary>Grid length the plan's tables are built for; <see cref="Count"/> may be any length up to it.</summary>
    public int Capacity => _mm;

    /// <summary>First frequency, cycles/day.</summary>
    public double F0 { get; private set; }

    /// <summary>Frequency step, cycles/day.</summary>
    public double Df { get; private set; }

    /// <summary>Re-points a pooled plan at another grid with the same <see cref="Count"/> (tables depend on the capacity only).</summary>
    internal void Retarget(double f0, double df) => Retarget(f0, df, Count);

    /// <summary>Re-points a pooled plan at the grid f0 + k df, k in [0, count), count up to <see cref="Capacity"/>.</summary>
    internal void Retarget(double f0, double df, int count)
    {
        if (!double.IsFinite(f0) || !(df > 0) || !double.IsFinite(df)) throw new ArgumentException("f0 must be finite and df finite and > 0.");
        ArgumentOutOfRangeException.ThrowIfLessThan(count, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(count, _mm);
        F0 = f0; Df = df; Count = count;
    }

    /// <summary>Estimated seconds for one call on this machine class (FFT and spreading terms; see <see cref="Periodogram.GlsAuto"/>).</summary>
    internal static double EstimatedSeconds(long n, long count)
    {
        long mm = count + (count & 1);
        long mr = FftLength(mm, DefaultSpread, DefaultOversampling);
        double log2 = Math.Log2(mr);
        // Calibrated on the 2-core AVX-512 machine of docs/PERFORMANCE.md: per element and FFT stage ~1.5 ns while a
        // grid fits in cache (<= 2^18 complex, 4 MB) and ~3.5 ns beyond (three transforms); ~1.5 ns per spread update
        // (2 Msp updates per point and transform); ~10 ns per output frequency.
        double perStage = mr <= 1 << 18 ? 1.5e-9 : 3.5e-9;
        return 3.0 * mr * log2 * perStage + 3.0 * n * 2 * DefaultSpread * 1.5e-9 + count * 10e-9;
    }

    /// <summary>Number of frequencies.</summary>
    public int Count { get; private set; }

    /// <summary>FFT length per transform (three transforms per call).</summary>
    public int GridSize => _mr;

    /// <summary>Method name recorded with results, e.g. "gls-nufft-gauss12".</summary>
    public string MethodName => "gls-nufft-gauss" + _msp.ToString(System.Globalization.CultureInfo.InvariantCulture);

    /// <summary>Computes power; contract as <see cref="GlsReference.Compute"/>, with <c>power.Length == Count</c>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Execute(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        if (power.Length != Count) throw new ArgumentException($"power has {power.Length} elements, the plan's grid {Count}.");
        int n = t.Length;
        if (!GlsMoments.TryCompute(y, w, out double wsum, out double ybar, out double yy)) { power.Clear(); return; }

        if (_x.Length < n) { _x = new double[n]; _qr = new double[n]; _qi = new double[n]; }
        double twoPi = 2.0 * Math.PI;
        double fc = F0 + (_mm / 2) * Df;

        // Transform 1: h = w, points x. Phases are reduced modulo 2 pi before use; the premultiplier is exact SinCos.
        for (int i = 0; i < n; i++)
        {
            double x = twoPi * Df * t[i];
            x -= twoPi * Math.Floor(x / twoPi);
            _x[i] = x;
            (double s, double c) = Math.SinCos(twoPi * fc * t[i]);
            double wi = w[i] / wsum;
            _qr[i] = wi * c; _qi[i] = wi * s;
        }
        SpreadAndTransform(n);
        Extract(_f1);

        // Transform 2: h = w (y - ybar).
        for (int i = 0; i < n; i++)
        {
            (double s, double c) = Math.SinCos(twoPi * fc * t[i]);
            double wy = w[i] / wsum * (y[i] - ybar);
            _qr[i] = wy * c; _qi[i] = wy * s;
        }
        SpreadAndTransform(n);
        Extract(_f2);

        // Transform 3: h = w, doubled phases (double-angle sums for CC and CS).
        for (int i = 0; i < n; i++)
        {
            double x = 2.0 * _x[i];
            if (x >= twoPi) x -= twoPi;
            _x[i] = x;
            (double s, double c) = Math.SinCos(2.0 * (twoPi * fc * t[i]));
            double wi = w[i] / wsum;
            _qr[i] = wi * c; _qi[i] = wi * s;
        }
        SpreadAndTransform(n);

        int mr = _mr, half = _mm / 2;
        for (int k = 0; k < Count; k++)
        {
            int kk = k - half;
            int g = kk < 0 ? kk + mr : kk;
            double dc = _deconv[k];
            double c2 = _grid[2 * g] * dc, s2 = _grid[2 * g + 1] * dc;
            double c = _f1[2 * k], s = _f1[2 * k + 1], yc = _f2[2 * k], ys = _f2[2 * k + 1];
            double cc = 0.5 * (1.0 + c2), cs = 0.5 * s2;
            double ss = 1.0 - cc;
            double ccx = cc - c * c, ssx = ss - s * s, csx = cs - c * s;
            double d = ccx * ssx - csx * csx;
            double p = d > 0 ? (ssx * yc * yc + ccx * ys * ys - 2.0 * csx * yc * ys) / (yy * d) : 0.0;
            power[k] = p;
        }
    }

    /// <summary>
    /// Spectral window of the times on this plan's grid: W(f_k) = |(1/N) sum_i exp(2 pi i f_k t_i)|^2 (Deeming 1975;
    /// unweighted), one transform instead of three. Accurate to about the plan's sum error (relative to 1 = W(0)).
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public void Window(ReadOnlySpan<double> t, Span<double> window)
    {
        if (window.Length != Count) throw new ArgumentException($"window has {window.Length} elements, the plan's grid {Count}.");
        int n = t.Length;
        if (n == 0) { window.Clear(); return; }
        if (_x.Length < n) { _x = new double[n]; _qr = new double[n]; _qi = new double[n]; }
        double twoPi = 2.0 * Math.PI, fc = F0 + (_mm / 2) * Df, inv = 1.0 / n;
        for (int i = 0; i < n; i++)
        {
            double x = twoPi * Df * t[i];
            x -= twoPi * Math.Floor(x / twoPi);
            _x[i] = x;
            (double s, double c) = Math.SinCos(twoPi * fc * t[i]);
            _qr[i] = inv * c; _qi[i] = inv * s;
        }
        SpreadAndTransform(n);
        Extract(_f1);
        for (int k = 0; k < Count; k++) window[k] = _f1[2 * k] * _f1[2 * k] + _f1[2 * k + 1] * _f1[2 * k + 1];
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private void Extract(double[] dst)
    {
        int mr = _mr, half = _mm / 2;
        for (int k = 0; k < Count; k++)
        {
            int kk = k - half;
            int g = kk < 0 ? kk + mr : kk;
            dst[2 * k] = _grid[2 * g] * _deconv[k];
            dst[2 * k + 1] = _grid[2 * g + 1] * _deconv[k];
        }
    }

    /// <summary>Gaussian gridding of (qr, qi) at x onto the periodic grid, then the FFT.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private void SpreadAndTransform(int n)
    {
        Array.Clear(_grid);
        int mr = _mr, msp = _msp, mask = mr - 1;
        double h = 2.0 * Math.PI / mr, inv4Tau = 1.0 / (4.0 * _tau);
        double[] grid = _grid, e3 = _e3;
        Span<double> wts = stackalloc double[2 * MaxSpread];
        wts = wts[..(2 * msp)];
        for (int i = 0; i < n; i++)
        {
            double x = _x[i];
            int m0 = (int)(x / h);
            if (m0 >= mr) m0 = mr - 1;
            double delta = x - m0 * h;  // in [0, h)
            // exp(-(delta - l h)^2/4tau) = exp(-delta^2/4tau) * exp(delta h / 2tau)^l * exp(-(l h)^2/4tau)
            double e1 = Math.Exp(-delta * delta * inv4Tau);
            double e2 = Math.Exp(delta * h * 2.0 * inv4Tau);
            double inv2 = 1.0 / e2;
            // l = 0 .. msp and l = -1 .. -msp+1
            double p = e1;
            for (int l = 0; l <= msp; l++) { wts[l + msp - 1] = p * e3[l + msp - 1]; p *= e2; }
            p = e1 * inv2;
            for (int l = -1; l >= -msp + 1; l--) { wts[l + msp - 1] = p * e3[l + msp - 1]; p *= inv2; }
            double qr = _qr[i], qi = _qi[i];
            int start = m0 - msp + 1;
            for (int j = 0; j < 2 * msp; j++)
            {
                int g = (start + j) & mask;
                double wt = wts[j];
                grid[2 * g] += qr * wt;
                grid[2 * g + 1] += qi * wt;
            }
        }
        _fft.Transform(grid);
    }
}
