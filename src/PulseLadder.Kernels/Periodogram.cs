namespace PulseLadder.Kernels;

/// <summary>Entry point the rest of PulseLadder calls: the fastest variant this CPU supports.</summary>
public static class Periodogram
{
    /// <summary>Generalised Lomb-Scargle power on f0 + k df; see <see cref="GlsReference.Compute"/> for the contract.</summary>
    public static void Gls(ReadOnlySpan<double> t, ReadOnlySpan<double> y, ReadOnlySpan<double> w, double f0, double df, Span<double> power)
        => GlsReference.Compute(t, y, w, f0, df, power);

    /// <summary>Name of the variant <see cref="Gls"/> uses (recorded with results).</summary>
    public static string GlsVariantName => "scalar-reference";
}
