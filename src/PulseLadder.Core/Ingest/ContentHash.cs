using System.Security.Cryptography;

namespace PulseLadder.Core.Ingest;

/// <summary>SHA-256 over the exact uploaded bytes (no normalisation of line ends or BOM), for duplicate-upload detection.</summary>
public static class ContentHash
{
    /// <summary>Lower-case hex SHA-256 of the bytes.</summary>
    public static string Sha256Hex(ReadOnlySpan<byte> bytes) => Convert.ToHexStringLower(SHA256.HashData(bytes));

    /// <summary>Lower-case hex SHA-256 of the rest of the stream (read to its end in chunks; the stream is not closed).</summary>
    public static string Sha256Hex(Stream stream)
    {
        ArgumentNullException.ThrowIfNull(stream);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }

    /// <summary>Lower-case hex SHA-256 of the rest of the stream, read asynchronously.</summary>
    public static async Task<string> Sha256HexAsync(Stream stream, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(stream);
        return Convert.ToHexStringLower(await SHA256.HashDataAsync(stream, cancellationToken).ConfigureAwait(false));
    }
}
