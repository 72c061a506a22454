using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Storage;

/// <summary>The one JSON shape PulseLadder stores and serves: snake_case names, enums as strings.</summary>
public static class Json
{
    public static JsonSerializerOptions Options { get; } = Create();

    private static JsonSerializerOptions Create()
    {
        var o = new JsonSerializerOptions
        {
            PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower,
            DictionaryKeyPolicy = null,
            // Results should never hold NaN; if one slips through it must not make the row unreadable.
            NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
            DefaultIgnoreCondition = JsonIgnoreCondition.Never,
            WriteIndented = false,
        };
        o.Converters.Add(new JsonStringEnumConverter(JsonNamingPolicy.SnakeCaseLower));
        o.Converters.Add(new CurveJsonConverter());
        return o;
    }

    public static string Serialize<T>(T value) => JsonSerializer.Serialize(value, Options);

    public static T? Deserialize<T>(string json) => JsonSerializer.Deserialize<T>(json, Options);

    private static readonly JsonSerializerOptions WithoutCurvesOptions = CreateWithoutCurves();

    private static JsonSerializerOptions CreateWithoutCurves()
    {
        var o = Create();
        o.Converters.Insert(0, new SkippedCurveConverter());
        return o;
    }

    /// <summary>
    /// As <see cref="Deserialize{T}"/> with every plotted <see cref="Curve"/> skipped (read back empty): for passes
    /// over many stored results that never look at the periodogram or window, which are most of a result's text.
    /// </summary>
    public static T? DeserializeWithoutCurves<T>(string json) => JsonSerializer.Deserialize<T>(json, WithoutCurvesOptions);

    /// <summary>
    /// <paramref name="json"/> (a JSON object) with the value of its top-level property <paramref name="property"/>
    /// replaced by that property's value in <paramref name="source"/>, byte for byte; property order is kept. Used to put
    /// back a result's stored "search" (with its curves) into a result re-serialised without them. Throws when either
    /// object lacks the property.
    /// </summary>
    public static string WithPropertyFrom(string json, string property, string source)
    {
        byte[] a = Encoding.UTF8.GetBytes(json), b = Encoding.UTF8.GetBytes(source);
        byte[] name = Encoding.UTF8.GetBytes(property);
        var (aStart, aEnd) = FindTopLevel(a, name) ?? throw new ArgumentException($"The JSON has no top-level '{property}'.", nameof(json));
        var (bStart, bEnd) = FindTopLevel(b, name) ?? throw new ArgumentException($"The source JSON has no top-level '{property}'.", nameof(source));
        var result = new byte[aStart + (bEnd - bStart) + (a.Length - aEnd)];
        a.AsSpan(0, aStart).CopyTo(result);
        b.AsSpan(bStart, bEnd - bStart).CopyTo(result.AsSpan(aStart));
        a.AsSpan(aEnd).CopyTo(result.AsSpan(aStart + bEnd - bStart));
        return Encoding.UTF8.GetString(result);
    }

    /// <summary>Byte range [start, end) of the value of a top-level property, or null.</summary>
    private static (int Start, int End)? FindTopLevel(ReadOnlySpan<byte> utf8, ReadOnlySpan<byte> name)
    {
        var r = new Utf8JsonReader(utf8);
        if (!r.Read() || r.TokenType != JsonTokenType.StartObject) return null;
        while (r.Read())
        {
            if (r.TokenType == JsonTokenType.EndObject && r.CurrentDepth == 0) break;
            if (r.TokenType != JsonTokenType.PropertyName) continue;
            bool match = r.ValueTextEquals(name);
            r.Read();
            int start = (int)r.TokenStartIndex;
            r.Skip();
            if (match) return (start, (int)r.BytesConsumed);
        }
        return null;
    }

    /// <summary>Reads a curve as empty without materialising its numbers.</summary>
    private sealed class SkippedCurveConverter : JsonConverter<Curve>
    {
        public override Curve Read(ref Utf8JsonReader reader, Type typeToConvert, JsonSerializerOptions options)
        {
            reader.Skip();
            return new Curve([], []);
        }

        public override void Write(Utf8JsonWriter writer, Curve value, JsonSerializerOptions options) =>
            throw new InvalidOperationException("Curves read without their numbers are not written back; use Json.Serialize.");
    }
}
