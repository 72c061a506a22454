using System.Runtime.CompilerServices;
namespace PulseLadder.Kernels;

/// <summary>
/// Exact generalised Lomb-Scargle (weighted, floating mean; same definition and normalisation as
/// <see cref="GlsReference"/>) on the regular grid f_k = F0 + k Df, k in [0, Count), evaluated with
/// trigonometric recurrences across the grid instead of one sin/cos per point and frequency.
/// </summary>
/// <remarks>
/// <para>Per point i the phase step between neighbouring frequencies is x_i = 2 pi Df t_i. Three levels keep the
/// recurrence exact to ~1e-13 in the sums:</para>
/// <list type="bullet">
/// <item>every <see cref="ReseedInterval"/> frequencies the state w_i exp(i omega t_i) is re-seeded with
/// <see cref="Math.SinCos"/> (this is also where parallel chunks start, so output does not depend on threading);</item>
/// <item>every <see cref="SegmentLength"/> frequencies that state is advanced by one complex rotation with
/// exp(i S x_i) (itself computed once per call with <see cref="Math.SinCos"/>);</item>
/// <item>inside a segment the Chebyshev recurrence u_{k+1} = 2 cos(x_i) u_k - u_{k-1} costs one FMA per component
/// (rounding errors grow at most quadratically with the step count, hence the short segments).</item>
/// </list>
/// <para>The state carries the normalised weight (u = w cos, v = w sin), so C and S are plain sums, YC and YS one FMA
/// each with the centred value, and CC, CS one multiply by 1/w plus two FMAs: 15 flops per point-frequency
/// evaluation including the recurrence. <see cref="GlsBlocks.Width"/> frequencies share each pass over the points.</para>
/// <para>A plan owns all buffers (structure-of-arrays, 64-byte aligned, padded to the vector width with zero-weight
/// points); after the first call with a given number of points, <see cref="Execute"/> allocates nothing on the
/// serial path. A plan is not thread-safe: use one plan per concurrent caller.</para>
/// </remarks>
public sealed unsafe class GlsPlan
{
    /// <summary>Frequencies between exact re-seeds with <see cref="Math.SinCos"/> (also the parallel chunk size).</summary>
    public const int ReseedInterval = 2048;

    /// <summary>Frequencies between complex-rotation restarts of the Chebyshev recurrence.</summary>
    public const int SegmentLength = 64;

    private const int Pad = 8;

    // Point data shared by all workers during one call.
    private readonly AlignedBuffer _t = new(), _wn = new(), _yc = new(), _iw = new(), _k2 = new(),
        _cd = new(), _sd = new(), _cS = new(), _sS = new();
    private Worker[] _workers = [];
    private int _n, _np, _chunkCount, _nextChunk;
    private double _yy;
    private readonly int _blockWidth;
    private double* _out;
    private readonly Action<int> _parallelBody;

    /// <summary>Creates a plan for the grid f0 + k df, k in [0, count).</summary>
    /// <param name="f0">First frequency, cycles/day.</param>
    /// <param name="df">Step, cycles/day.</param>
    /// <param name="count">Number of frequencies (&gt;= 0).</param>
    /// <param name="variant">Kernel variant; must be supported by this CPU (<see cref="GlsVariantPicker.IsSupported"/>).</param>
    /// <param name="maxDegreeOfParallelism">Threads used for one call (1 = serial).</param>
    public GlsPlan(double f0, double df, int count, GlsVariant variant, int maxDegreeOfParallelism = 1)
    {
        if (!GlsVariantPicker.IsSupported(variant))
            throw new PlatformNotSupportedException($"GLS variant {variant} is not supported on this CPU.");
        ArgumentOutOfRangeException.ThrowIfLessThan(maxDegreeOfParallelism, 1);
        Variant = variant;
        // Four frequencies per pass need 24 vector accumulators: fine with 32 registers (EVEX), spills with 16.
        _blockWidth = variant == GlsVariant.Avx2 && !System.Runtime.Intrinsics.X86.Avx512F.VL.IsSupported ? 2 : GlsBlocks.Width;
        MaxDegreeOfParallelism = maxDegreeOfParallelism;
        Retarget(f0, df, count);
        _parallelBody = ParallelWorker;
    }

    /// <summary>First frequency, cycles/day.</summary>
    public double F0 { get; private set; }

    /// <summary>Frequency step, cycles/day.</summary>
    public double Df { get; private set; }

    /// <summary>Number of frequencies.</summary>
    public int Count { get; private set; }

    /// <summary>Kernel variant this plan runs.</summary>
    public GlsVariant Variant { get; }

    /// <summary>Threads used for one call.</summary>
    public int MaxDegreeOfParallelism { get; }

    /// <summary>Points the plan's buffers currently hold without growing.</summary>
    public int PointCapacity => _t.Capacity;

    /// <summary>Re-points a pooled plan at another grid; buffers are kept.</summary>
    internal void Retarget(double f0, double df, int count)
    {
        ArgumentOutOfRangeException.ThrowIfNegative(count);
        if (!double.IsFinite(f0) || !double.IsFinite(df)) throw new ArgumentException("f0 and df must be finite.");
        F0 = f0; Df = df; Count = count;
    }

    /// <summary>Computes power; contract as <see cref="GlsReference.Compute"/>, with <c>power.Length == Count</c>.</summary>
    public void Execute(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, Span<double> power)
    {
        if (t.Length != y.Length || t.Length != w.Length) KernelThrow.LengthMismatch();
        if (power.Length != Count) throw new ArgumentException($"power has {power.Length} elements, the plan's grid {Count}.");
        if (Count == 0) return;
        if (!Prepare(t, y, w)) { power.Clear(); return; }

        _chunkCount = (Count + ReseedInterval - 1) / ReseedInterval;
        int workers = Math.Min(MaxDegreeOfParallelism, _chunkCount);
        EnsureWorkers(workers);
        fixed (double* p = power)
        {
            if (workers == 1)
            {
                for (int c = 0; c < _chunkCount; c++) ProcessChunk(c, _workers[0], p);
            }
            else
            {
                _out = p;
                _nextChunk = -1;
                try { Parallel.For(0, workers, new ParallelOptions { MaxDegreeOfParallelism = workers }, _parallelBody); }
                finally { _out = null; }
            }
        }
    }

    private void ParallelWorker(int workerIndex)
    {
        Worker wk = _workers[workerIndex];
        int c;
        while ((c = Interlocked.Increment(ref _nextChunk)) < _chunkCount) ProcessChunk(c, wk, _out);
    }

    private void EnsureWorkers(int count)
    {
        if (_workers.Length < count)
        {
            var ws = new Worker[count];
            for (int i = 0; i < count; i++) ws[i] = i < _workers.Length ? _workers[i] : new Worker();
            _workers = ws;
        }
        for (int i = 0; i < count; i++) _workers[i].EnsureCapacity(_np);
    }

    /// <summary>Normalises weights, centres values and fills the point buffers; false when the fit is degenerate.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private bool Prepare(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w)
    {
        // The same moments as GlsReference, so the normalisation constants are bit-identical.
        int n = t.Length;
        if (!GlsMoments.TryCompute(y, w, out double wsum, out double ybar, out double yy)) return false;

        _n = n;
        _np = (n + Pad - 1) / Pad * Pad;
        foreach (AlignedBuffer b in (ReadOnlySpan<AlignedBuffer>)[_t, _wn, _yc, _iw, _k2, _cd, _sd, _cS, _sS]) b.EnsureCapacity(_np);
        double* pt = _t.Pointer, pw = _wn.Pointer, py = _yc.Pointer, pq = _iw.Pointer, pk = _k2.Pointer,
            pc = _cd.Pointer, ps = _sd.Pointer, pcS = _cS.Pointer, psS = _sS.Pointer;
        double step = 2.0 * Math.PI * Df, segStep = 2.0 * Math.PI * (SegmentLength * Df);
        for (int i = 0; i < _np; i++)
        {
            if (i < n)
            {
                double wi = w[i] / wsum;
                pt[i] = t[i]; pw[i] = wi; py[i] = y[i] - ybar;
                // A zero weight gives u = v = 0; its 1/w factor must then be 0 as well (not infinity) so t = u/w stays 0.
                pq[i] = wi != 0 ? 1.0 / wi : 0.0;
                (double sn, double cn) = Math.SinCos(step * t[i]);
                pc[i] = cn; ps[i] = sn; pk[i] = 2.0 * cn;
                (sn, cn) = Math.SinCos(segStep * t[i]);
                pcS[i] = cn; psS[i] = sn;
            }
            else
            {
                pt[i] = 0; pw[i] = 0; py[i] = 0; pq[i] = 0; pk[i] = 0; pc[i] = 1; ps[i] = 0; pcS[i] = 1; psS[i] = 0;
            }
        }
        _yy = yy;
        return true;
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private void ProcessChunk(int chunk, Worker wk, double* power)
    {
        int k0 = chunk * ReseedInterval;
        int len = Math.Min(ReseedInterval, Count - k0);
        int np = _np;
        double* zu = wk.Zu.Pointer, zv = wk.Zv.Pointer, up = wk.Up.Pointer, u = wk.U.Pointer,
            vp = wk.Vp.Pointer, v = wk.V.Pointer, sums = wk.Sums;
        double* pt = _t.Pointer, pw = _wn.Pointer;
        double omega = 2.0 * Math.PI * (F0 + k0 * Df);
        for (int i = 0; i < np; i++)
        {
            (double sn, double cn) = Math.SinCos(omega * pt[i]);
            zu[i] = pw[i] * cn; zv[i] = pw[i] * sn;
        }
        double* k2 = _k2.Pointer, yc = _yc.Pointer, iw = _iw.Pointer;
        for (int seg = 0; seg < len; seg += SegmentLength)
        {
            bool advance = seg + SegmentLength < len;
            switch (Variant)
            {
                case GlsVariant.Avx512: GlsBlocks512.SegmentStart(zu, zv, _cd.Pointer, _sd.Pointer, _cS.Pointer, _sS.Pointer, up, u, vp, v, np, advance); break;
                case GlsVariant.Avx2: GlsBlocks256.SegmentStart(zu, zv, _cd.Pointer, _sd.Pointer, _cS.Pointer, _sS.Pointer, up, u, vp, v, np, advance); break;
                default: GlsBlocksScalar.SegmentStart(zu, zv, _cd.Pointer, _sd.Pointer, _cS.Pointer, _sS.Pointer, up, u, vp, v, np, advance); break;
            }
            int segEnd = Math.Min(seg + SegmentLength, len);
            for (int blk = seg; blk < segEnd; blk += _blockWidth)
            {
                switch (Variant)
                {
                    case GlsVariant.Avx512: GlsBlocks512.Block(up, u, vp, v, k2, yc, iw, np, sums); break;
                    case GlsVariant.Avx2 when _blockWidth == 2: GlsBlocks256.Block2(up, u, vp, v, k2, yc, iw, np, sums); break;
                    case GlsVariant.Avx2: GlsBlocks256.Block(up, u, vp, v, k2, yc, iw, np, sums); break;
                    default: GlsBlocksScalar.Block(up, u, vp, v, k2, yc, iw, np, sums); break;
                }
                int m = Math.Min(_blockWidth, segEnd - blk);
                for (int j = 0; j < m; j++) power[k0 + blk + j] = PowerFromSums(sums + 6 * j, _yy);
            }
        }
    }

    /// <summary>ZK09 power from C, S, YC, YS, CC, CS (normalised weights; SS = 1 - CC as in the reference).</summary>
    internal static double PowerFromSums(double* p, double yy)
    {
        double c = p[0], s = p[1], yc = p[2], ys = p[3], cc = p[4], cs = p[5];
        double ss = 1.0 - cc;
        double ccx = cc - c * c, ssx = ss - s * s, csx = cs - c * s;
        double d = ccx * ssx - csx * csx;
        return d > 0 ? (ssx * yc * yc + ccx * ys * ys - 2.0 * csx * yc * ys) / (yy * d) : 0.0;
    }

    /// <summary>Per-thread recurrence state.</summary>
    private sealed class Worker
    {
        public readonly AlignedBuffer Zu = new(), Zv = new(), Up = new(), U = new(), Vp = new(), V = new(), SumBuf = new();

        public Worker() => SumBuf.EnsureCapacity(6 * GlsBlocks.Width);

        public double* Sums => SumBuf.Pointer;

        public void EnsureCapacity(int np)
        {
            Zu.EnsureCapacity(np); Zv.EnsureCapacity(np); Up.EnsureCapacity(np);
            U.EnsureCapacity(np); Vp.EnsureCapacity(np); V.EnsureCapacity(np);
        }
    }
}

/// <summary>Operation counts of the exact kernel, for reports (an FMA counts as two flops).</summary>
public static class GlsFlops
{
    /// <summary>
    /// Flops per point-frequency evaluation in the inner loop: C += u, S += v (2 adds); YC, YS (2 FMA = 4);
    /// t = u/w (1 mul); CC, CS (2 FMA = 4); Chebyshev step of u and v (2 FMA = 4). Total 15, of which 7 issue on
    /// the FMA/multiply ports and 2 on the add ports. Segment restarts and re-seeds add well under 1% for N*M large.
    /// </summary>
    public const int PerEvaluation = 15;
}
