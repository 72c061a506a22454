using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace PulseLadder.Kernels;

/// <summary>Implementations of the exact generalised Lomb-Scargle kernel (all compute the same sums).</summary>
public enum GlsVariant
{
    /// <summary>Portable scalar loop of the recurrence algorithm (runs on any CPU).</summary>
    Scalar,
    /// <summary>256-bit vectors (4 doubles); needs AVX2 and FMA.</summary>
    Avx2,
    /// <summary>512-bit vectors (8 doubles); needs AVX-512F.</summary>
    Avx512,
}

/// <summary>Chooses the fastest <see cref="GlsVariant"/> this CPU supports, unless an environment variable forces one.</summary>
public static class GlsVariantPicker
{
    /// <summary>True when this process can run <paramref name="variant"/>.</summary>
    public static bool IsSupported(GlsVariant variant) => variant switch
    {
        GlsVariant.Scalar => true,
        GlsVariant.Avx2 => Avx2.IsSupported && Fma.IsSupported && Vector256.IsHardwareAccelerated,
        GlsVariant.Avx512 => Avx512F.IsSupported && Vector512.IsHardwareAccelerated,
        _ => false,
    };

    /// <summary>The fastest supported variant, ignoring the environment.</summary>
    public static GlsVariant Fastest =>
        IsSupported(GlsVariant.Avx512) ? GlsVariant.Avx512 :
        IsSupported(GlsVariant.Avx2) ? GlsVariant.Avx2 : GlsVariant.Scalar;

    /// <summary>
    /// The variant <see cref="Periodogram.Gls"/> uses: <see cref="KernelInfo.VariantEnvironmentVariable"/> when it names a
    /// supported variant ("scalar", "avx2", "avx512", case-insensitive), otherwise <see cref="Fastest"/>.
    /// An unknown or unsupported forced name throws, because silently running another kernel would hide the mistake.
    /// </summary>
    public static GlsVariant Selected { get; } = Resolve(Environment.GetEnvironmentVariable(KernelInfo.VariantEnvironmentVariable));

    /// <summary>Parses a forced name (null or empty: fastest).</summary>
    internal static GlsVariant Resolve(string? forced)
    {
        if (string.IsNullOrWhiteSpace(forced)) return Fastest;
        GlsVariant v = forced.Trim().ToLowerInvariant() switch
        {
            "scalar" => GlsVariant.Scalar,
            "avx2" => GlsVariant.Avx2,
            "avx512" => GlsVariant.Avx512,
            _ => throw new InvalidOperationException(
                $"{KernelInfo.VariantEnvironmentVariable}='{forced}' is not one of scalar, avx2, avx512."),
        };
        if (!IsSupported(v))
            throw new InvalidOperationException($"{KernelInfo.VariantEnvironmentVariable}='{forced}': this CPU does not support it.");
        return v;
    }

    /// <summary>Short lower-case name recorded with results ("scalar", "avx2", "avx512").</summary>
    public static string Name(GlsVariant variant) => variant switch
    {
        GlsVariant.Scalar => "scalar",
        GlsVariant.Avx2 => "avx2",
        GlsVariant.Avx512 => "avx512",
        _ => throw new ArgumentOutOfRangeException(nameof(variant)),
    };
}
