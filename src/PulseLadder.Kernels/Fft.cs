namespace PulseLadder.Kernels;

/// <summary>
/// In-place radix-2 complex FFT on interleaved (re, im) doubles, positive exponent:
/// A_k = sum_m a_m exp(+2 pi i k m / n), no scaling. n must be a power of two.
/// Twiddles come from <see cref="Math.SinCos"/> (one table per size, no recurrence), so the error stays at the
/// O(eps log n) level of the butterflies.
/// </summary>
internal sealed class Fft
{
    private readonly double[] _tw;   // interleaved exp(+2 pi i j / n), j < n/2
    private readonly int[] _rev;     // bit-reversal partner for the first level of the permutation

    public Fft(int n)
    {
        if (n < 2 || (n & (n - 1)) != 0) throw new ArgumentException("FFT size must be a power of two >= 2.", nameof(n));
        Size = n;
        _tw = new double[n];
        for (int j = 0; j < n / 2; j++)
        {
            (double s, double c) = Math.SinCos(2.0 * Math.PI * j / n);
            _tw[2 * j] = c; _tw[2 * j + 1] = s;
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

    public void Transform(Span<double> a)
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
        double[] tw = _tw;
        for (int len = 8; len <= n; len <<= 1)
        {
            int half = len >> 1, step = n / len;
            for (int i = 0; i < n; i += len)
            {
                Span<double> lo = a.Slice(2 * i, len), hi = a.Slice(2 * i + len, len);
                for (int j = 0, tj = 0; j < half; j++, tj += step)
                {
                    double wr = tw[2 * tj], wi = tw[2 * tj + 1];
                    double xr = hi[2 * j], xi = hi[2 * j + 1];
                    double vr = xr * wr - xi * wi, vi = xr * wi + xi * wr;
                    double ur = lo[2 * j], ui = lo[2 * j + 1];
                    lo[2 * j] = ur + vr; lo[2 * j + 1] = ui + vi;
                    hi[2 * j] = ur - vr; hi[2 * j + 1] = ui - vi;
                }
            }
        }
    }
}
