using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace PulseLadder.Kernels;

/// <summary>
/// Inner loops of the exact GLS kernel on 512-bit vectors (8 points per lane group).
/// State per point: u = w cos(theta), v = w sin(theta) at the current frequency and at the previous one (Chebyshev pair).
/// One call evaluates <see cref="GlsBlocks.Width"/> consecutive frequencies in one pass over the points and leaves the
/// state advanced by that many frequencies.
/// </summary>
internal static unsafe class GlsBlocks512
{
    public const int Lanes = 8;

    /// <summary>Accumulates the six sums for 4 frequencies into <paramref name="sums"/>[6 j + q].</summary>
    [SkipLocalsInit]
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Block(double* up, double* u, double* vp, double* v, double* k2, double* yv, double* iw, int np, double* sums)
    {
        Vector512<double> c0 = default, s0 = default, yc0 = default, ys0 = default, cc0 = default, cs0 = default;
        Vector512<double> c1 = default, s1 = default, yc1 = default, ys1 = default, cc1 = default, cs1 = default;
        Vector512<double> c2 = default, s2 = default, yc2 = default, ys2 = default, cc2 = default, cs2 = default;
        Vector512<double> c3 = default, s3 = default, yc3 = default, ys3 = default, cc3 = default, cs3 = default;
        for (int i = 0; i < np; i += Lanes)
        {
            Vector512<double> a = Vector512.Load(u + i), ap = Vector512.Load(up + i);
            Vector512<double> b = Vector512.Load(v + i), bp = Vector512.Load(vp + i);
            Vector512<double> k = Vector512.Load(k2 + i), y = Vector512.Load(yv + i), q = Vector512.Load(iw + i);
            Vector512<double> t, an, bn;

            c0 += a; s0 += b;
            yc0 = Vector512.FusedMultiplyAdd(y, a, yc0); ys0 = Vector512.FusedMultiplyAdd(y, b, ys0);
            t = a * q; cc0 = Vector512.FusedMultiplyAdd(t, a, cc0); cs0 = Vector512.FusedMultiplyAdd(t, b, cs0);
            an = Vector512.FusedMultiplyAdd(k, a, -ap); bn = Vector512.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c1 += a; s1 += b;
            yc1 = Vector512.FusedMultiplyAdd(y, a, yc1); ys1 = Vector512.FusedMultiplyAdd(y, b, ys1);
            t = a * q; cc1 = Vector512.FusedMultiplyAdd(t, a, cc1); cs1 = Vector512.FusedMultiplyAdd(t, b, cs1);
            an = Vector512.FusedMultiplyAdd(k, a, -ap); bn = Vector512.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c2 += a; s2 += b;
            yc2 = Vector512.FusedMultiplyAdd(y, a, yc2); ys2 = Vector512.FusedMultiplyAdd(y, b, ys2);
            t = a * q; cc2 = Vector512.FusedMultiplyAdd(t, a, cc2); cs2 = Vector512.FusedMultiplyAdd(t, b, cs2);
            an = Vector512.FusedMultiplyAdd(k, a, -ap); bn = Vector512.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c3 += a; s3 += b;
            yc3 = Vector512.FusedMultiplyAdd(y, a, yc3); ys3 = Vector512.FusedMultiplyAdd(y, b, ys3);
            t = a * q; cc3 = Vector512.FusedMultiplyAdd(t, a, cc3); cs3 = Vector512.FusedMultiplyAdd(t, b, cs3);
            an = Vector512.FusedMultiplyAdd(k, a, -ap); bn = Vector512.FusedMultiplyAdd(k, b, -bp);

            Vector512.Store(a, up + i); Vector512.Store(an, u + i);
            Vector512.Store(b, vp + i); Vector512.Store(bn, v + i);
        }
        Store(sums, 0, c0, s0, yc0, ys0, cc0, cs0);
        Store(sums, 1, c1, s1, yc1, ys1, cc1, cs1);
        Store(sums, 2, c2, s2, yc2, ys2, cc2, cs2);
        Store(sums, 3, c3, s3, yc3, ys3, cc3, cs3);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Store(double* sums, int j, Vector512<double> c, Vector512<double> s, Vector512<double> yc,
        Vector512<double> ys, Vector512<double> cc, Vector512<double> cs)
    {
        double* p = sums + 6 * j;
        p[0] = Vector512.Sum(c); p[1] = Vector512.Sum(s); p[2] = Vector512.Sum(yc);
        p[3] = Vector512.Sum(ys); p[4] = Vector512.Sum(cc); p[5] = Vector512.Sum(cs);
    }

    /// <summary>
    /// Starts a segment: the Chebyshev pair is taken from the accurately rotated state z = (zu, zv) and, when
    /// <paramref name="advance"/>, z is rotated by the segment step (cS, sS) for the next segment.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void SegmentStart(double* zu, double* zv, double* cd, double* sd, double* cS, double* sS,
        double* up, double* u, double* vp, double* v, int np, bool advance)
    {
        for (int i = 0; i < np; i += Lanes)
        {
            Vector512<double> a = Vector512.Load(zu + i), b = Vector512.Load(zv + i);
            Vector512<double> c = Vector512.Load(cd + i), s = Vector512.Load(sd + i);
            Vector512.Store(a, u + i); Vector512.Store(b, v + i);
            Vector512.Store(Vector512.FusedMultiplyAdd(a, c, b * s), up + i);
            Vector512.Store(Vector512.FusedMultiplyAdd(b, c, -(a * s)), vp + i);
            if (advance)
            {
                Vector512<double> cs = Vector512.Load(cS + i), ss = Vector512.Load(sS + i);
                Vector512.Store(Vector512.FusedMultiplyAdd(a, cs, -(b * ss)), zu + i);
                Vector512.Store(Vector512.FusedMultiplyAdd(b, cs, a * ss), zv + i);
            }
        }
    }
}
