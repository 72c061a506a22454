using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
namespace PulseLadder.Kernels;

/// <summary>
/// In-place complex FFT on interleaved (re, im) doubles, positive exponent:
/// A_k = sum_m a_m exp(+2 pi i k m / n), no scaling. n must be a power of two.
/// Twiddles come from <see cref="Math.SinCos"/> (tables per size, no recurrence), so the error stays at the
/// O(eps log n) level of the butterflies.
/// Two paths, chosen at run time: on x86 with AVX2 and FMA a vector path (two complex numbers per
/// <see cref="Vector256{T}"/>, radix-4 passes, a cache-friendly tiled bit reversal); elsewhere the portable scalar
/// radix-2 path, which is also the reference the vector path is tested against.
/// </summary>
internal sealed class Fft
{
    private readonly double[]? _tw;  // scalar path: per stage of length len (offset len/2 complex): interleaved exp(+2 pi i j / len), j < len/2
    private readonly int[]? _rev;    // scalar path: bit-reversal partner of every index
    private readonly bool _vector;
    private readonly VectorPlan? _vplan;

    /// <summary>Plan for size n; allowVector false forces the scalar path (tests and benchmarks).</summary>
    public Fft(int n, bool allowVector = true)
    {
        if (n < 2 || (n & (n - 1)) != 0) throw new ArgumentException("FFT size must be a power of two >= 2.", nameof(n));
        Size = n;
        (double[] cos, double[] sin) = Roots(n);
        _vector = allowVector && VectorSupported && n >= 4;
        if (_vector)
        {
            _vplan = new VectorPlan(n, cos, sin);
            return;
        }
        // Contiguous table per stage so every stage reads its twiddles sequentially.
        _tw = new double[2 * n];
        for (int len = 2; len <= n; len <<= 1)
            for (int j = 0; j < len / 2; j++)
            {
                _tw[2 * (len / 2 + j)] = cos[j * (n / len)]; _tw[2 * (len / 2 + j) + 1] = sin[j * (n / len)];
            }
        _rev = BitReversal(n);
    }

    /// <summary>
    /// exp(2 pi i k / n) for k &lt; n: Math.SinCos for the first octant, the rest by the exact symmetries
    /// (swap of cos and sin about pi/4, multiplication by i per quadrant), so the plan costs n/8 SinCos calls, not
    /// several n (plans are built per grid size and the NUFFT grid changes with the star), at the same accuracy.
    /// </summary>
    private static (double[] Cos, double[] Sin) Roots(int n)
    {
        var c = new double[n];
        var s = new double[n];
        if (n < 16)
        {
            for (int k = 0; k < n; k++) (s[k], c[k]) = Math.SinCos(2.0 * Math.PI * k / n);
            return (c, s);
        }
        int q = n / 4, o = n / 8;
        for (int k = 0; k <= o; k++) (s[k], c[k]) = Math.SinCos(2.0 * Math.PI * k / n);
        for (int k = o + 1; k < q; k++) { c[k] = s[q - k]; s[k] = c[q - k]; }
        for (int k = q; k < n; k++) { c[k] = -s[k - q]; s[k] = c[k - q]; }   // times i
        return (c, s);
    }

    /// <summary>rev(i) over log2 n bits, built from rev(i / 2).</summary>
    private static int[] BitReversal(int n)
    {
        int bits = System.Numerics.BitOperations.Log2((uint)n);
        var rev = new int[n];
        for (int i = 1; i < n; i++) rev[i] = (rev[i >> 1] >> 1) | ((i & 1) << (bits - 1));
        return rev;
    }

    /// <summary>True when this CPU runs the vector path (AVX2 + FMA).</summary>
    public static bool VectorSupported => Vector256.IsHardwareAccelerated && Avx2.IsSupported && Fma.IsSupported;

    /// <summary>Which path a default plan uses on this CPU.</summary>
    public static string VectorPathName => VectorSupported ? "avx2-fma radix-4" : "scalar radix-2";

    /// <summary>True when this plan runs the vector path.</summary>
    public bool UsesVectorPath => _vector;

    public int Size { get; }

    public unsafe void Transform(Span<double> a)
    {
        if (a.Length < 2 * Size) throw new ArgumentException("buffer shorter than 2 n.", nameof(a));
        if (_vector)
        {
            fixed (double* pa = a) _vplan!.Transform(pa);
        }
        else TransformScalar(a);
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private unsafe void TransformScalar(Span<double> a)
    {
        int n = Size;
        int[] rev = _rev!;
        for (int i = 0; i < n; i++)
        {
            int r = rev[i];
            if (r > i)
            {
                (a[2 * i], a[2 * r]) = (a[2 * r], a[2 * i]);
                (a[2 * i + 1], a[2 * r + 1]) = (a[2 * r + 1], a[2 * i + 1]);
            }
        }
        // First two stages together as radix-4 without multiplications (w = 1, i).
        if (n >= 4)
        {
            for (int i = 0; i < 2 * n; i += 8)
            {
                double r0 = a[i], i0 = a[i + 1], r1 = a[i + 2], i1 = a[i + 3], r2 = a[i + 4], i2 = a[i + 5], r3 = a[i + 6], i3 = a[i + 7];
                double ar = r0 + r1, ai = i0 + i1, br = r0 - r1, bi = i0 - i1;
                double cr = r2 + r3, ci = i2 + i3, dr = r2 - r3, di = i2 - i3;
                // second stage: (a, c) with w = 1; (b, d) with w = +i: i*d = (-di, dr)
                a[i] = ar + cr; a[i + 1] = ai + ci; a[i + 4] = ar - cr; a[i + 5] = ai - ci;
                a[i + 2] = br - di; a[i + 3] = bi + dr; a[i + 6] = br + di; a[i + 7] = bi - dr;
            }
        }
        else
        {
            double r0 = a[0], i0 = a[1];
            a[0] = r0 + a[2]; a[1] = i0 + a[3]; a[2] = r0 - a[2]; a[3] = i0 - a[3];
            return;
        }
        // Stages whose butterflies stay inside one cache-sized block run block by block (one pass over memory for
        // all of them); the remaining large stages stream the whole array once each.
        int block = Math.Min(n, CacheBlock);
        fixed (double* pa = a, ptw = _tw!)
        {
            for (int b0 = 0; b0 < n; b0 += block)
                for (int len = 8; len <= block; len <<= 1) Stage(pa + 2 * b0, block, len, ptw + len);
            // Large stages in pairs (radix-4 pass): half the passes over memory, 3 instead of 4 complex products.
            int l = 2 * block;
            for (; 2 * l <= n; l <<= 2) StagePair(pa, n, l, ptw + l, ptw + 2 * l);
            if (l <= n) Stage(pa, n, l, ptw + l);
        }
    }

    private const int CacheBlock = 1 << 11;

    /// <summary>Radix-2 stages of lengths len and 2 len in one pass (twiddles tw1 for len, tw2 for 2 len).</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static unsafe void StagePair(double* a, int count, int len, double* tw1, double* tw2)
    {
        int h = len >> 1;
        for (int i = 0; i < count; i += 2 * len)
        {
            double* pa = a + 2 * i, pb = pa + 2 * h, pc = pa + 2 * len, pd = pc + 2 * h;
            for (int j = 0; j < h; j++)
            {
                int r = 2 * j, q = r + 1;
                double w1r = tw1[r], w1i = tw1[q], w2r = tw2[r], w2i = tw2[q];
                double ar = pa[r], ai = pa[q];
                double br = pb[r] * w1r - pb[q] * w1i, bi = pb[r] * w1i + pb[q] * w1r;
                double cr = pc[r], ci = pc[q];
                double dr = pd[r] * w1r - pd[q] * w1i, di = pd[r] * w1i + pd[q] * w1r;
                double a1r = ar + br, a1i = ai + bi, b1r = ar - br, b1i = ai - bi;
                double c1r = cr + dr, c1i = ci + di, d1r = cr - dr, d1i = ci - di;
                double t1r = c1r * w2r - c1i * w2i, t1i = c1r * w2i + c1i * w2r;
                // twiddle of the second half is w2 * i: (d1 * w2) * i = (-im, re)
                double ur = d1r * w2r - d1i * w2i, ui = d1r * w2i + d1i * w2r;
                double t2r = -ui, t2i = ur;
                pa[r] = a1r + t1r; pa[q] = a1i + t1i; pc[r] = a1r - t1r; pc[q] = a1i - t1i;
                pb[r] = b1r + t2r; pb[q] = b1i + t2i; pd[r] = b1r - t2r; pd[q] = b1i - t2i;
            }
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static unsafe void Stage(double* a, int count, int len, double* tw)
    {
        int half = len >> 1;
        for (int i = 0; i < count; i += len)
        {
            double* lo = a + 2 * i, hi = lo + len;
            for (int j = 0; j < half; j++)
            {
                double wr = tw[2 * j], wi = tw[2 * j + 1];
                double xr = hi[2 * j], xi = hi[2 * j + 1];
                double vr = xr * wr - xi * wi, vi = xr * wi + xi * wr;
                double ur = lo[2 * j], ui = lo[2 * j + 1];
                lo[2 * j] = ur + vr; lo[2 * j + 1] = ui + vi;
                hi[2 * j] = ur - vr; hi[2 * j + 1] = ui - vi;
            }
        }
    }

    /// <summary>
    /// The AVX2 + FMA path. Decimation in time like the scalar path: bit reversal fused with stages 1-2 (radix 4, no
    /// multiplications) in one cache-friendly pass, one radix-2 stage when the remaining count is odd, then radix-4
    /// passes (two stages, three complex products per butterfly instead of four). Passes whose butterflies stay
    /// inside one cache block run block by block. Twiddles are stored per pass in the
    /// order the loop reads them, with real and imaginary parts already duplicated for the vector product.
    /// </summary>
    private sealed class VectorPlan
    {
        private const int Block = 1 << 11;   // complex; 32 KiB of data, the L1 size of the target CPUs (2^10 .. 2^14 measured alike)
        private readonly int _n;
        private readonly int[] _swaps;       // (i, rev(i)) for i < rev(i), interleaved (n < 16)
        private readonly int[] _tiles;       // (m, rev(m)) for m <= rev(m) over the middle bits (n >= 16), see ReverseAndFirst
        private readonly double[] _tw;
        private readonly int[] _passLen;     // radix-4 pass: L (stages L and 2 L); radix-2 stage: -L
        private readonly int[] _passTw;      // offset of each pass's twiddles in _tw
        private readonly int _blockedPasses; // passes [0, _blockedPasses) span at most one block

        public VectorPlan(int n, double[] cos, double[] sin)
        {
            _n = n;
            int bits = System.Numerics.BitOperations.Log2((uint)n);
            var swaps = new List<int>();
            var tiles = new List<int>();
            if (bits >= 4)
            {
                int[] mrev = BitReversal(n >> 4);   // middle bits; n = 16 gives the single tile (0, 0)
                for (int m = 0; m < n >> 4; m++)
                    if (mrev[m] >= m) { tiles.Add(m); tiles.Add(mrev[m]); }
            }
            else
            {
                int[] rev = BitReversal(n);
                for (int i = 0; i < n; i++)
                    if (rev[i] > i) { swaps.Add(i); swaps.Add(rev[i]); }
            }
            _swaps = swaps.ToArray();
            _tiles = tiles.ToArray();
            var lens = new List<int>();
            int s = 3;
            if (((bits - 2) & 1) == 1) { lens.Add(-8); s = 4; }
            for (; s < bits; s += 2) lens.Add(1 << s);
            _passLen = lens.ToArray();
            _passTw = new int[_passLen.Length];
            int size = 0;
            for (int p = 0; p < _passLen.Length; p++) { _passTw[p] = size; size += _passLen[p] < 0 ? -2 * _passLen[p] : 6 * _passLen[p]; }
            _tw = new double[size];
            int block = Math.Min(n, Block);
            for (int p = 0; p < _passLen.Length; p++)
            {
                int len = _passLen[p], at = _passTw[p];
                if (len < 0)
                {
                    // radix-2 stage of length L = -len: w^j = exp(2 pi i j / L), j < L/2
                    int l = -len, step = n / l;
                    for (int j = 0; j < l / 2; j += 2, at += 8) Put(_tw, at, cos, sin, j * step, (j + 1) * step);
                }
                else
                {
                    // radix-4 pass of span M = 2 L: per pair of j < L/2, W^j, W^2j, W^3j with W = exp(2 pi i / M)
                    int step = n / (2 * len);
                    for (int j = 0; j < len / 2; j += 2, at += 24)
                    {
                        Put(_tw, at, cos, sin, j * step, (j + 1) * step);
                        Put(_tw, at + 8, cos, sin, 2 * j * step, (2 * j + 2) * step);
                        Put(_tw, at + 16, cos, sin, 3 * j * step, (3 * j + 3) * step);
                    }
                }
                if (Span(p) <= block) _blockedPasses = p + 1;
            }
        }

        private int Span(int p) => _passLen[p] < 0 ? -_passLen[p] : 2 * _passLen[p];

        /// <summary>Writes (re k0, re k0, re k1, re k1, im k0, im k0, im k1, im k1) of the roots k0, k1 at tw[at].</summary>
        private static void Put(double[] tw, int at, double[] cos, double[] sin, int k0, int k1)
        {
            tw[at] = tw[at + 1] = cos[k0]; tw[at + 2] = tw[at + 3] = cos[k1];
            tw[at + 4] = tw[at + 5] = sin[k0]; tw[at + 6] = tw[at + 7] = sin[k1];
        }

        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        public unsafe void Transform(double* a)
        {
            int n = _n;
            if (_tiles.Length > 0)
            {
                fixed (int* tp = _tiles) ReverseAndFirst(a, n, tp, _tiles.Length);
            }
            else
            {
                fixed (int* sw = _swaps)
                    for (int k = 0; k < _swaps.Length; k += 2)
                    {
                        double* x = a + 2 * sw[k], y = a + 2 * sw[k + 1];
                        Vector128<double> u = Vector128.Load(x), v = Vector128.Load(y);
                        v.Store(x); u.Store(y);
                    }
                First(a, n);
            }
            int block = Math.Min(n, Block);
            fixed (double* tw = _tw)
            {
                for (int b0 = 0; b0 < n; b0 += block)
                    for (int p = 0; p < _blockedPasses; p++) Pass(a + 2 * b0, block, p, tw);
                for (int p = _blockedPasses; p < _passLen.Length; p++) Pass(a, n, p, tw);
            }
        }

        private unsafe void Pass(double* a, int count, int p, double* tw)
        {
            int len = _passLen[p];
            if (len < 0) Radix2(a, count, -len, tw + _passTw[p]);
            else Radix4(a, count, len, tw + _passTw[p]);
        }

        /// <summary>x * w for two complex numbers, w given as duplicated real parts wr and imaginary parts wi.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static Vector256<double> Mul(Vector256<double> x, Vector256<double> wr, Vector256<double> wi)
            => Fma.MultiplyAddSubtract(x, wr, Avx.Multiply(Avx.Permute(x, 0b0101), wi));

        /// <summary>
        /// Bit reversal fused with stages 1 and 2. With i = (h, m, l), h and l two bits each, rev(i) = (rev l, rev m, rev h):
        /// the 16 elements (h, m, .) - four cache lines - go to (., rev m, .) as a 4 x 4 transpose with rows and columns
        /// in bit-reversed order, so every line is read and written once (a swap per element misses the cache on one
        /// side). Each new row of four is one radix-4 group of the first two stages, done before the store.
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private static unsafe void ReverseAndFirst(double* a, int n, int* tiles, int count)
        {
            int st = n >> 1;   // doubles between rows h and h + 1 (n / 4 complex)
            Vector256<double> one = Vector256.Create(1.0);
            for (int k = 0; k < count; k += 2)
            {
                int m = tiles[k], mr = tiles[k + 1];
                double* x = a + 8 * m;
                Vector256<double> x00 = Avx.LoadVector256(x), x01 = Avx.LoadVector256(x + 4);
                Vector256<double> x10 = Avx.LoadVector256(x + st), x11 = Avx.LoadVector256(x + st + 4);
                Vector256<double> x20 = Avx.LoadVector256(x + 2 * st), x21 = Avx.LoadVector256(x + 2 * st + 4);
                Vector256<double> x30 = Avx.LoadVector256(x + 3 * st), x31 = Avx.LoadVector256(x + 3 * st + 4);
                if (mr == m)
                {
                    WriteTile(x, st, x00, x01, x10, x11, x20, x21, x30, x31, one);
                }
                else
                {
                    double* y = a + 8 * mr;
                    Vector256<double> y00 = Avx.LoadVector256(y), y01 = Avx.LoadVector256(y + 4);
                    Vector256<double> y10 = Avx.LoadVector256(y + st), y11 = Avx.LoadVector256(y + st + 4);
                    Vector256<double> y20 = Avx.LoadVector256(y + 2 * st), y21 = Avx.LoadVector256(y + 2 * st + 4);
                    Vector256<double> y30 = Avx.LoadVector256(y + 3 * st), y31 = Avx.LoadVector256(y + 3 * st + 4);
                    WriteTile(y, st, x00, x01, x10, x11, x20, x21, x30, x31, one);
                    WriteTile(x, st, y00, y01, y10, y11, y20, y21, y30, y31, one);
                }
            }
        }

        /// <summary>
        /// Row p of the new tile is column c = rev p of the old one in row order 0, 2, 1, 3, i.e. (x0, x1, x2, x3) =
        /// old rows (0, 2, 1, 3). Stages 1 and 2 therefore combine whole old rows (two columns per vector, no shuffle);
        /// only the final transpose crosses 128-bit lanes.
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static unsafe void WriteTile(double* d, int st, Vector256<double> x00, Vector256<double> x01, Vector256<double> x10,
            Vector256<double> x11, Vector256<double> x20, Vector256<double> x21, Vector256<double> x30, Vector256<double> x31, Vector256<double> one)
        {
            Half(d, d + 2 * st, x00, x10, x20, x30, one);        // columns 0, 1 -> new rows 0, 2
            Half(d + st, d + 3 * st, x01, x11, x21, x31, one);   // columns 2, 3 -> new rows 1, 3
        }

        /// <summary>Stages 1-2 on two columns (old rows v0..v3), then the two new rows stored at r0 and r1.</summary>
        [MethodImpl(MethodImplOptions.AggressiveInlining)]
        private static unsafe void Half(double* r0, double* r1, Vector256<double> v0, Vector256<double> v1, Vector256<double> v2,
            Vector256<double> v3, Vector256<double> one)
        {
            Vector256<double> s02 = Avx.Add(v0, v2), d02 = Avx.Subtract(v0, v2);     // x0 + x1, x0 - x1
            Vector256<double> s13 = Avx.Add(v1, v3), d13 = Avx.Permute(Avx.Subtract(v1, v3), 0b0101);  // x2 + x3, (x2 - x3) as (im, re)
            Vector256<double> t0 = Avx.Add(s02, s13), t2 = Avx.Subtract(s02, s13);
            Vector256<double> t1 = Avx.AddSubtract(d02, d13), t3 = Fma.MultiplySubtractAdd(d02, one, d13);  // d02 +- i (x2 - x3)
            Avx.Store(r0, Avx.Permute2x128(t0, t1, 0x20));
            Avx.Store(r0 + 4, Avx.Permute2x128(t2, t3, 0x20));
            Avx.Store(r1, Avx.Permute2x128(t0, t1, 0x31));
            Avx.Store(r1 + 4, Avx.Permute2x128(t2, t3, 0x31));
        }

        /// <summary>Stages 1 and 2 (lengths 2 and 4, twiddles 1 and i) on each group of four complex numbers.</summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private static unsafe void First(double* a, int n)
        {
            Vector256<double> sign = Vector256.Create(0.0, 0.0, -0.0, 0.0);
            for (double* p = a, end = a + 2 * n; p < end; p += 8)
            {
                Vector256<double> v0 = Avx.LoadVector256(p), v1 = Avx.LoadVector256(p + 4);
                Vector256<double> lo = Avx.Permute2x128(v0, v1, 0x20), hi = Avx.Permute2x128(v0, v1, 0x31);
                Vector256<double> s = Avx.Add(lo, hi), d = Avx.Subtract(lo, hi);       // (x0+x1, x2+x3), (x0-x1, x2-x3)
                Vector256<double> pp = Avx.Permute2x128(s, d, 0x20), q = Avx.Permute2x128(s, d, 0x31);
                q = Avx.Xor(Avx.Permute(q, 0b0110), sign);                              // (x2+x3, i (x2-x3))
                Avx.Store(p, Avx.Add(pp, q));
                Avx.Store(p + 4, Avx.Subtract(pp, q));
            }
        }

        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private static unsafe void Radix2(double* a, int count, int len, double* tw)
        {
            int half = len >> 1;
            for (int i = 0; i < count; i += len)
            {
                double* lo = a + 2 * i, hi = lo + len;
                for (int j = 0; j < half; j += 2)
                {
                    Vector256<double> v = Mul(Avx.LoadVector256(hi + 2 * j), Avx.LoadVector256(tw + 4 * j), Avx.LoadVector256(tw + 4 * j + 4));
                    Vector256<double> u = Avx.LoadVector256(lo + 2 * j);
                    Avx.Store(lo + 2 * j, Avx.Add(u, v));
                    Avx.Store(hi + 2 * j, Avx.Subtract(u, v));
                }
            }
        }

        /// <summary>
        /// Stages of lengths L and 2 L in one pass. With A, B, C, D the length-L/2 sub-transforms at offsets 0, L/2,
        /// L, 3L/2 (bit-reversed order) and W = exp(2 pi i / 2L): B~ = W^2j B, C~ = W^j C, D~ = W^3j D;
        /// outputs (A + B~) +- (C~ + D~) at 0 and L, (A - B~) +- i (C~ - D~) at L/2 and 3L/2.
        /// </summary>
        [MethodImpl(MethodImplOptions.AggressiveOptimization)]
        private static unsafe void Radix4(double* a, int count, int len, double* tw)
        {
            int h = len >> 1;
            Vector256<double> one = Vector256.Create(1.0);
            for (int i = 0; i < count; i += 2 * len)
            {
                double* pa = a + 2 * i, pb = pa + 2 * h, pc = pa + 2 * len, pd = pc + 2 * h;
                double* t = tw;
                for (int j = 0; j < 2 * h; j += 4, t += 24)
                {
                    Vector256<double> va = Avx.LoadVector256(pa + j);
                    Vector256<double> vb = Mul(Avx.LoadVector256(pb + j), Avx.LoadVector256(t + 8), Avx.LoadVector256(t + 12));
                    Vector256<double> vc = Mul(Avx.LoadVector256(pc + j), Avx.LoadVector256(t), Avx.LoadVector256(t + 4));
                    Vector256<double> vd = Mul(Avx.LoadVector256(pd + j), Avx.LoadVector256(t + 16), Avx.LoadVector256(t + 20));
                    Vector256<double> s0 = Avx.Add(va, vb), d0 = Avx.Subtract(va, vb);
                    Vector256<double> s1 = Avx.Add(vc, vd), d1 = Avx.Permute(Avx.Subtract(vc, vd), 0b0101);  // (im, re)
                    Avx.Store(pa + j, Avx.Add(s0, s1));
                    Avx.Store(pc + j, Avx.Subtract(s0, s1));
                    Avx.Store(pb + j, Avx.AddSubtract(d0, d1));                  // d0 + i (C~ - D~)
                    Avx.Store(pd + j, Fma.MultiplySubtractAdd(d0, one, d1));     // d0 - i (C~ - D~)
                }
            }
        }
    }
}
