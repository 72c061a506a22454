using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;

namespace PulseLadder.Kernels;

/// <summary>
/// Inner loops of the exact GLS kernel on 256-bit vectors (4 points per lane group).
/// State per point: u = w cos(theta), v = w sin(theta) at the current frequency and at the previous one (Chebyshev pair).
/// One call evaluates <see cref="GlsBlocks.Width"/> consecutive frequencies in one pass over the points and leaves the
/// state advanced by that many frequencies.
/// </summary>
internal static unsafe class GlsBlocks256
{
    public const int Lanes = 4;

    /// <summary>Accumulates the six sums for 4 frequencies into <paramref name="sums"/>[6 j + q].</summary>
    [SkipLocalsInit]
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Block(double* up, double* u, double* vp, double* v, double* k2, double* yv, double* iw, int np, double* sums)
    {
        Vector256<double> c0 = default, s0 = default, yc0 = default, ys0 = default, cc0 = default, cs0 = default;
        Vector256<double> c1 = default, s1 = default, yc1 = default, ys1 = default, cc1 = default, cs1 = default;
        Vector256<double> c2 = default, s2 = default, yc2 = default, ys2 = default, cc2 = default, cs2 = default;
        Vector256<double> c3 = default, s3 = default, yc3 = default, ys3 = default, cc3 = default, cs3 = default;
        for (int i = 0; i < np; i += Lanes)
        {
            Vector256<double> a = Vector256.Load(u + i), ap = Vector256.Load(up + i);
            Vector256<double> b = Vector256.Load(v + i), bp = Vector256.Load(vp + i);
            Vector256<double> k = Vector256.Load(k2 + i), y = Vector256.Load(yv + i), q = Vector256.Load(iw + i);
            Vector256<double> t, an, bn;

            c0 += a; s0 += b;
            yc0 = Vector256.FusedMultiplyAdd(y, a, yc0); ys0 = Vector256.FusedMultiplyAdd(y, b, ys0);
            t = a * q; cc0 = Vector256.FusedMultiplyAdd(t, a, cc0); cs0 = Vector256.FusedMultiplyAdd(t, b, cs0);
            an = Vector256.FusedMultiplyAdd(k, a, -ap); bn = Vector256.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c1 += a; s1 += b;
            yc1 = Vector256.FusedMultiplyAdd(y, a, yc1); ys1 = Vector256.FusedMultiplyAdd(y, b, ys1);
            t = a * q; cc1 = Vector256.FusedMultiplyAdd(t, a, cc1); cs1 = Vector256.FusedMultiplyAdd(t, b, cs1);
            an = Vector256.FusedMultiplyAdd(k, a, -ap); bn = Vector256.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c2 += a; s2 += b;
            yc2 = Vector256.FusedMultiplyAdd(y, a, yc2); ys2 = Vector256.FusedMultiplyAdd(y, b, ys2);
            t = a * q; cc2 = Vector256.FusedMultiplyAdd(t, a, cc2); cs2 = Vector256.FusedMultiplyAdd(t, b, cs2);
            an = Vector256.FusedMultiplyAdd(k, a, -ap); bn = Vector256.FusedMultiplyAdd(k, b, -bp); ap = a; bp = b; a = an; b = bn;

            c3 += a; s3 += b;
            yc3 = Vector256.FusedMultiplyAdd(y, a, yc3); ys3 = Vector256.FusedMultiplyAdd(y, b, ys3);
            t = a * q; cc3 = Vector256.FusedMultiplyAdd(t, a, cc3); cs3 = Vector256.FusedMultiplyAdd(t, b, cs3);
            an = Vector256.FusedMultiplyAdd(k, a, -ap); bn = Vector256.FusedMultiplyAdd(k, b, -bp);

            Vector256.Store(a, up + i); Vector256.Store(an, u + i);
            Vector256.Store(b, vp + i); Vector256.Store(bn, v + i);
        }
        Store(sums, 0, c0, s0, yc0, ys0, cc0, cs0);
        Store(sums, 1, c1, s1, yc1, ys1, cc1, cs1);
        Store(sums, 2, c2, s2, yc2, ys2, cc2, cs2);
        Store(sums, 3, c3, s3, yc3, ys3, cc3, cs3);
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Store(double* sums, int j, Vector256<double> c, Vector256<double> s, Vector256<double> yc,
        Vector256<double> ys, Vector256<double> cc, Vector256<double> cs)
    {
        double* p = sums + 6 * j;
        p[0] = Vector256.Sum(c); p[1] = Vector256.Sum(s); p[2] = Vector256.Sum(yc);
        p[3] = Vector256.Sum(ys); p[4] = Vector256.Sum(cc); p[5] = Vector256.Sum(cs);
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
            Vector256<double> a = Vector256.Load(zu + i), b = Vector256.Load(zv + i);
            Vector256<double> c = Vector256.Load(cd + i), s = Vector256.Load(sd + i);
            Vector256.Store(a, u + i); Vector256.Store(b, v + i);
            Vector256.Store(Vector256.FusedMultiplyAdd(a, c, b * s), up + i);
            Vector256.Store(Vector256.FusedMultiplyAdd(b, c, -(a * s)), vp + i);
            if (advance)
            {
                Vector256<double> cs = Vector256.Load(cS + i), ss = Vector256.Load(sS + i);
                Vector256.Store(Vector256.FusedMultiplyAdd(a, cs, -(b * ss)), zu + i);
                Vector256.Store(Vector256.FusedMultiplyAdd(b, cs, a * ss), zv + i);
            }
        }
    }
}
