using System.Runtime.CompilerServices;
namespace PulseLadder.Kernels;

/// <summary>Frequencies evaluated per pass over the points (register blocking), shared by all variants.</summary>
internal static class GlsBlocks
{
    public const int Width = 4;
}

/// <summary>Portable scalar twin of <see cref="GlsBlocks512"/>: same recurrence, same blocking, one point at a time.</summary>
internal static unsafe class GlsBlocksScalar
{
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Block(double* up, double* u, double* vp, double* v, double* k2, double* yv, double* iw, int np, double* sums)
    {
        double c0 = 0, s0 = 0, yc0 = 0, ys0 = 0, cc0 = 0, cs0 = 0;
        double c1 = 0, s1 = 0, yc1 = 0, ys1 = 0, cc1 = 0, cs1 = 0;
        double c2 = 0, s2 = 0, yc2 = 0, ys2 = 0, cc2 = 0, cs2 = 0;
        double c3 = 0, s3 = 0, yc3 = 0, ys3 = 0, cc3 = 0, cs3 = 0;
        for (int i = 0; i < np; i++)
        {
            double a = u[i], ap = up[i], b = v[i], bp = vp[i], k = k2[i], y = yv[i], q = iw[i];
            double t, an, bn;
            c0 += a; s0 += b; yc0 += y * a; ys0 += y * b; t = a * q; cc0 += t * a; cs0 += t * b;
            an = k * a - ap; bn = k * b - bp; ap = a; bp = b; a = an; b = bn;
            c1 += a; s1 += b; yc1 += y * a; ys1 += y * b; t = a * q; cc1 += t * a; cs1 += t * b;
            an = k * a - ap; bn = k * b - bp; ap = a; bp = b; a = an; b = bn;
            c2 += a; s2 += b; yc2 += y * a; ys2 += y * b; t = a * q; cc2 += t * a; cs2 += t * b;
            an = k * a - ap; bn = k * b - bp; ap = a; bp = b; a = an; b = bn;
            c3 += a; s3 += b; yc3 += y * a; ys3 += y * b; t = a * q; cc3 += t * a; cs3 += t * b;
            an = k * a - ap; bn = k * b - bp;
            up[i] = a; u[i] = an; vp[i] = b; v[i] = bn;
        }
        double* p = sums;
        p[0] = c0; p[1] = s0; p[2] = yc0; p[3] = ys0; p[4] = cc0; p[5] = cs0;
        p[6] = c1; p[7] = s1; p[8] = yc1; p[9] = ys1; p[10] = cc1; p[11] = cs1;
        p[12] = c2; p[13] = s2; p[14] = yc2; p[15] = ys2; p[16] = cc2; p[17] = cs2;
        p[18] = c3; p[19] = s3; p[20] = yc3; p[21] = ys3; p[22] = cc3; p[23] = cs3;
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void SegmentStart(double* zu, double* zv, double* cd, double* sd, double* cS, double* sS,
        double* up, double* u, double* vp, double* v, int np, bool advance)
    {
        for (int i = 0; i < np; i++)
        {
            double a = zu[i], b = zv[i], c = cd[i], s = sd[i];
            u[i] = a; v[i] = b;
            up[i] = a * c + b * s;
            vp[i] = b * c - a * s;
            if (advance)
            {
                zu[i] = a * cS[i] - b * sS[i];
                zv[i] = b * cS[i] + a * sS[i];
            }
        }
    }
}
