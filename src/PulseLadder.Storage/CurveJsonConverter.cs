using System.Buffers;
using System.Buffers.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Storage;

/// <summary>
/// Writes plotted curves ({"x": [...], "y": [...]}: a star's periodogram and spectral window, ~8000 numbers, most of a
/// stored result) with a fixed-point formatter. The search stores them rounded (1e-7 c/d, 1e-5 in power), and the
/// general shortest-round-trip double formatter was slow on such values (~0.6 us per number, about 2 ms per star
/// measured: docs/PERFORMANCE.md). A value that is exactly its own rounding to 7 decimals is written as that decimal
/// (the same number a reader parses back, bit for bit); anything else goes through the general formatter. Reading is
/// the plain JSON form, so results stored before this converter read the same.
/// </summary>
public sealed class CurveJsonConverter : JsonConverter<Curve>
{
    /// <summary>Decimals the fixed-point path handles (PeriodSearchEngine rounds plotted frequencies to 7).</summary>
    internal const int MaxDecimals = 7;

    private const double Scale = 1e7;

    public override Curve Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
    {
        if (reader.TokenType != JsonTokenType.StartObject) throw new JsonException("A curve must be a JSON object with x and y arrays.");
        double[] x = [], y = [];
        while (reader.Read() && reader.TokenType != JsonTokenType.EndObject)
        {
            if (reader.TokenType != JsonTokenType.PropertyName) throw new JsonException("Expected a property name in a curve.");
            string name = reader.GetString() ?? "";
            reader.Read();
            if (name == "x") x = ReadArray(ref reader);
            else if (name == "y") y = ReadArray(ref reader);
            else reader.Skip();
        }
        return new Curve(x, y);
    }

    private static double[] ReadArray(ref Utf8JsonReader reader)
    {
        if (reader.TokenType == JsonTokenType.Null) return [];
        if (reader.TokenType != JsonTokenType.StartArray) throw new JsonException("Curve x and y must be arrays of numbers.");
        double[] buf = ArrayPool<double>.Shared.Rent(4096);
        int count = 0;
        try
        {
            while (reader.Read() && reader.TokenType != JsonTokenType.EndArray)
            {
                double v = reader.TokenType switch
                {
                    JsonTokenType.Number => ParseNumber(ref reader),
                    JsonTokenType.String => reader.GetString() switch
                    {
                        "NaN" => double.NaN,
                        "Infinity" => double.PositiveInfinity,
                        "-Infinity" => double.NegativeInfinity,
                        var s => throw new JsonException($"'{s}' is not a number in a curve."),
                    },
                    _ => throw new JsonException("Curve x and y must be arrays of numbers."),
                };
                if (count == buf.Length)
                {
                    double[] bigger = ArrayPool<double>.Shared.Rent(2 * buf.Length);
                    Array.Copy(buf, bigger, count);
                    ArrayPool<double>.Shared.Return(buf);
                    buf = bigger;
                }
                buf[count++] = v;
            }
            return buf.AsSpan(0, count).ToArray();
        }
        finally { ArrayPool<double>.Shared.Return(buf); }
    }

    private static readonly double[] PowersOfTen = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

    /// <summary>
    /// A plain decimal ("-12.3456", no exponent) with at most 15 digits is m / 10^d with m and 10^d exact doubles, and
    /// one correctly rounded division gives the correctly rounded value (Clinger 1990, the fast path of every exact
    /// decimal parser); anything else goes to the reader's own parser.
    /// </summary>
    private static double ParseNumber(ref Utf8JsonReader reader)
    {
        if (reader.HasValueSequence) return reader.GetDouble();
        ReadOnlySpan<byte> s = reader.ValueSpan;
        int i = 0;
        bool neg = false;
        if (s.Length > 0 && s[0] == '-') { neg = true; i = 1; }
        long m = 0;
        int digits = 0, decimals = 0;
        bool dot = false;
        for (; i < s.Length; i++)
        {
            byte c = s[i];
            if (c >= '0' && c <= '9')
            {
                if (++digits > 15) return reader.GetDouble();
                m = 10 * m + (c - '0');
                if (dot) decimals++;
            }
            else if (c == '.' && !dot) dot = true;
            else return reader.GetDouble();
        }
        if (digits == 0) return reader.GetDouble();
        double v = m / PowersOfTen[decimals];
        return neg ? -v : v;
    }

    public override void Write(Utf8JsonWriter writer, Curve value, JsonSerializerOptions options)
    {
        writer.WriteStartObject();
        writer.WritePropertyName(options.PropertyNamingPolicy?.ConvertName("X") ?? "X");
        WriteArray(writer, value.X);
        writer.WritePropertyName(options.PropertyNamingPolicy?.ConvertName("Y") ?? "Y");
        WriteArray(writer, value.Y);
        writer.WriteEndObject();
    }

    private static void WriteArray(Utf8JsonWriter writer, double[]? values)
    {
        if (values is null) { writer.WriteNullValue(); return; }
        // 32 bytes per number covers the general formatter's longest output ("-1.2345678901234567E-308") and a comma.
        byte[] buf = ArrayPool<byte>.Shared.Rent(2 + 32 * values.Length);
        try
        {
            int at = 0;
            buf[at++] = (byte)'[';
            for (int i = 0; i < values.Length; i++)
            {
                if (i > 0) buf[at++] = (byte)',';
                at += Format(values[i], buf.AsSpan(at));
            }
            buf[at++] = (byte)']';
            writer.WriteRawValue(buf.AsSpan(0, at), skipInputValidation: true);
        }
        finally { ArrayPool<byte>.Shared.Return(buf); }
    }

    /// <summary>Writes one number as JSON text into <paramref name="dst"/> (at least 32 bytes); returns the bytes written.</summary>
    internal static int Format(double v, Span<byte> dst)
    {
        if (!double.IsFinite(v))
        {
            // As the options' AllowNamedFloatingPointLiterals writes them.
            ReadOnlySpan<byte> s = double.IsNaN(v) ? "\"NaN\""u8 : v > 0 ? "\"Infinity\""u8 : "\"-Infinity\""u8;
            s.CopyTo(dst);
            return s.Length;
        }
        double m = Math.Round(v * Scale);
        if (Math.Abs(m) < 1e15 && m / Scale == v && !(v == 0 && double.IsNegative(v)))
        {
            ulong n = (ulong)Math.Abs(m);
            int at = 0;
            if (m < 0) dst[at++] = (byte)'-';
            // Digits of n, least significant first, padded to MaxDecimals + 1 (a whole part of at least "0").
            Span<byte> d = stackalloc byte[24];
            int len = 0;
            do { d[len++] = (byte)('0' + (int)(n % 10)); n /= 10; } while (n > 0);
            while (len < MaxDecimals + 1) d[len++] = (byte)'0';
            for (int i = len - 1; i >= MaxDecimals; i--) dst[at++] = d[i];
            int last = 0;
            while (last < MaxDecimals && d[last] == '0') last++;
            if (last < MaxDecimals)
            {
                dst[at++] = (byte)'.';
                for (int i = MaxDecimals - 1; i >= last; i--) dst[at++] = d[i];
            }
            return at;
        }
        if (!Utf8Formatter.TryFormat(v, dst, out int written)) throw new InvalidOperationException("number buffer too small");
        return written;
    }
}
