using System.Runtime.CompilerServices;
namespace PulseLadder.Kernels;

/// <summary>
/// In-place radix-2 complex FFT on interleaved (re, im) doubles, positive exponent:
/// A_k = sum_m a_m exp(+2 pi i k m / n), no scaling. n must be a power of two.
/// Twiddles come from <see cref="Math.SinCos"/> (one table per size, no recurrence), so the error stays at the
/// O(eps log n) level of the butterflies.
/// </summary>
internal sealed class Fft
{
    private readonly double[] _tw;   // per stage of length len (offset len/2 complex): interleaved exp(+2 pi i j / len), j < len/2
    private readonly int[] _rev;     // bit-reversal partner for the first level of the permutation

    public Fft(int n)
    {
        if (n < 2 || (n & (n - 1)) != 0) throw new ArgumentException("FFT size must be a power of two >= 2.", nameof(n));
        Size = n;
        // Contiguous table per stage so every stage reads its twiddles sequentially.
        _tw = new double[2 * n];
        for (int len = 2; len <= n; len <<= 1)
            for (int j = 0; j < len / 2; j++)
            {
                (double s, double c) = Math.SinCos(2.0 * Math.PI * j / len);
                _tw[2 * (len / 2 + j)] = c; _tw[2 * (len / 2 + j) + 1] = s;
            }
        int bits = System.Numerics.BitOperations.Log2((uint)n);
        _rev = new int[n];
        for (int i = 0; i < n; i++)
        {
            int r = 0, v = i;
            for (int b = 0; b < bits; b++) { r = (r << 1) | (v & 1); v >>= 1; }
            _rev[i] = r;
        }
    }

    public int Size { get; }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public unsafe void Transform(Span<double> a)
    {
        int n = Size;
        if (a.Length < 2 * n) throw new ArgumentException("buffer shorter than 2 n.", nameof(a));
        int[] rev = _rev;
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
        fixed (double* pa = a, ptw = _tw)
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
}
