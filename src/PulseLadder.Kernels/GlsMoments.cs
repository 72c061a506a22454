namespace PulseLadder.Kernels;

/// <summary>
/// The weighted data moments every GLS variant starts from. One implementation, so the normalisation constants of
/// the reference and of every fast variant are bit-identical.
/// </summary>
internal static class GlsMoments
{
    /// <summary>
    /// Sum of weights, weighted mean of y and weighted variance of y (divided by the weight sum). False when the fit is
    /// degenerate: fewer than 3 points, no positive weight sum, or no variance.
    /// </summary>
    public static bool TryCompute(ReadOnlySpan<double> y, ReadOnlySpan<double> w, out double wsum, out double ybar, out double yy)
    {
        int n = y.Length;
        wsum = 0; ybar = 0; yy = 0;
        for (int i = 0; i < n; i++) wsum += w[i];
        if (n < 3 || !(wsum > 0)) return false;
        for (int i = 0; i < n; i++) ybar += w[i] * y[i];
        ybar /= wsum;
        for (int i = 0; i < n; i++) { double d = y[i] - ybar; yy += w[i] * d * d; }
        yy /= wsum;
        return yy > 0;
    }
}
