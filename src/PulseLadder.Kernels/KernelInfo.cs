namespace PulseLadder.Kernels;

/// <summary>Describes the kernels compiled into this assembly.</summary>
public static class KernelInfo
{
    /// <summary>Environment variable that forces one kernel variant ("scalar", "avx2", "avx512").</summary>
    public const string VariantEnvironmentVariable = "PULSELADDER_KERNEL";
}
