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

    internal static readonly JsonSerializerOptions WithoutCurvesOptions = CreateWithoutCurves();

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
    public static T? DeserializeWithoutCurves<T>(string json)
    {
        // The curves are blanked in the UTF-8 text first (a byte scan), so the parser never tokenises their thousands
        // of numbers only to skip them; a curve the scan does not recognise is left for the converter to skip.
        byte[] utf8 = System.Buffers.ArrayPool<byte>.Shared.Rent(Encoding.UTF8.GetMaxByteCount(json.Length));
        try
        {
            int n = Encoding.UTF8.GetBytes(json, utf8);
            n = BlankCurves(utf8.AsSpan(0, n));
            return JsonSerializer.Deserialize<T>(utf8.AsSpan(0, n), WithoutCurvesOptions);
        }
        finally { System.Buffers.ArrayPool<byte>.Shared.Return(utf8); }
    }

    private static ReadOnlySpan<byte> CurveStart => "{\"x\":["u8;
    private static ReadOnlySpan<byte> CurveMiddle => "],\"y\":["u8;
    private static ReadOnlySpan<byte> EmptyCurve => "{\"x\":[],\"y\":[]}"u8;

    /// <summary>
    /// Replaces, in place, every <c>{"x":[numbers],"y":[numbers]}</c> (the form <see cref="CurveJsonConverter"/> writes;
    /// <see cref="Curve"/> is the only stored type whose first property is x) by the empty curve, and returns the new
    /// length. The pattern cannot start inside a JSON string (its quotes would be escaped there), and an occurrence is
    /// only blanked when both arrays hold nothing but number characters, so anything else is left untouched.
    /// </summary>
    internal static int BlankCurves(Span<byte> json)
    {
        int read = 0, write = 0;
        while (true)
        {
            int at = json[read..].IndexOf(CurveStart);
            if (at < 0) break;
            at += read;
            int end = MatchCurve(json, at);
            if (end < 0)
            {
                // Not a plain curve: copy through the pattern's first byte and look again after it.
                json.Slice(read, at + 1 - read).CopyTo(json[write..]);
                write += at + 1 - read;
                read = at + 1;
                continue;
            }
            json.Slice(read, at - read).CopyTo(json[write..]);
            write += at - read;
            EmptyCurve.CopyTo(json[write..]);
            write += EmptyCurve.Length;
            read = end;
        }
        json[read..].CopyTo(json[write..]);
        return write + json.Length - read;
    }

    /// <summary>End (exclusive) of the plain curve starting at <paramref name="at"/>, or -1.</summary>
    private static int MatchCurve(ReadOnlySpan<byte> json, int at)
    {
        int i = at + CurveStart.Length;
        int close = NumbersUntil(json, i);
        if (close < 0 || !json[close..].StartsWith(CurveMiddle)) return -1;
        i = close + CurveMiddle.Length;
        close = NumbersUntil(json, i);
        if (close < 0 || close + 1 >= json.Length || json[close + 1] != (byte)'}') return -1;
        return close + 2;
    }

    private static readonly System.Buffers.SearchValues<byte> NumberText =
        System.Buffers.SearchValues.Create("0123456789+-.eE,"u8);

    /// <summary>Index of the ']' ending a run of number characters from <paramref name="i"/>, or -1.</summary>
    private static int NumbersUntil(ReadOnlySpan<byte> json, int i)
    {
        int k = json[i..].IndexOfAnyExcept(NumberText);
        if (k < 0) return -1;
        return json[i + k] == (byte)']' ? i + k : -1;
    }

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
    /// <summary>
    /// Byte range of the value of top-level property <paramref name="name"/>, or null. A structural scan (strings with
    /// their escapes, nesting of objects and arrays) that jumps over numbers with a vectorised search, where a JSON
    /// reader tokenises every number of the curves it skips. For text this program wrote (valid, compact or not);
    /// <see cref="FindTopLevelByReader"/> is the reference it is tested against.
    /// </summary>
    internal static (int Start, int End)? FindTopLevel(ReadOnlySpan<byte> utf8, ReadOnlySpan<byte> name)
    {
        int i = SkipSpace(utf8, 0);
        if (i >= utf8.Length || utf8[i] != (byte)'{') return null;
        i = SkipSpace(utf8, i + 1);
        while (i < utf8.Length && utf8[i] == (byte)'"')
        {
            int keyEnd = EndOfString(utf8, i);
            if (keyEnd < 0) return null;
            var key = utf8[(i + 1)..keyEnd];
            i = SkipSpace(utf8, keyEnd + 1);
            if (i >= utf8.Length || utf8[i] != (byte)':') return null;
            int start = SkipSpace(utf8, i + 1);
            int end = EndOfValue(utf8, start);
            if (end < 0) return null;
            // Keys are compared as written: this program's keys are snake_case ASCII, never escaped.
            if (key.SequenceEqual(name)) return (start, end);
            i = SkipSpace(utf8, end);
            if (i >= utf8.Length || utf8[i] != (byte)',') return null;
            i = SkipSpace(utf8, i + 1);
        }
        return null;
    }

    private static readonly System.Buffers.SearchValues<byte> Structural = System.Buffers.SearchValues.Create("\"{}[]"u8);
    private static readonly System.Buffers.SearchValues<byte> InString = System.Buffers.SearchValues.Create("\"\\"u8);
    private static readonly System.Buffers.SearchValues<byte> ScalarEnd = System.Buffers.SearchValues.Create(",}] \t\r\n"u8);
    private static readonly System.Buffers.SearchValues<byte> Space = System.Buffers.SearchValues.Create(" \t\r\n"u8);

    private static int SkipSpace(ReadOnlySpan<byte> s, int i)
    {
        if (i >= s.Length) return s.Length;
        int k = s[i..].IndexOfAnyExcept(Space);
        return k < 0 ? s.Length : i + k;
    }

    /// <summary>Index of the closing quote of the string opening at <paramref name="open"/>, or -1.</summary>
    private static int EndOfString(ReadOnlySpan<byte> s, int open)
    {
        int j = open + 1;
        while (j < s.Length)
        {
            int k = s[j..].IndexOfAny(InString);
            if (k < 0) return -1;
            j += k;
            if (s[j] == (byte)'"') return j;
            j += 2; // an escape: the backslash and the byte it escapes
        }
        return -1;
    }

    /// <summary>End (exclusive) of the value starting at <paramref name="i"/>, or -1.</summary>
    private static int EndOfValue(ReadOnlySpan<byte> s, int i)
    {
        if (i >= s.Length) return -1;
        byte c = s[i];
        if (c == (byte)'"') { int e = EndOfString(s, i); return e < 0 ? -1 : e + 1; }
        if (c != (byte)'{' && c != (byte)'[')
        {
            int k = s[i..].IndexOfAny(ScalarEnd);
            return k < 0 ? s.Length : i + k;
        }
        int depth = 0, j = i;
        while (j < s.Length)
        {
            int k = s[j..].IndexOfAny(Structural);
            if (k < 0) return -1;
            j += k;
            switch (s[j])
            {
                case (byte)'"':
                    int e = EndOfString(s, j);
                    if (e < 0) return -1;
                    j = e + 1;
                    continue;
                case (byte)'{' or (byte)'[':
                    depth++;
                    break;
                default:
                    if (--depth == 0) return j + 1;
                    break;
            }
            j++;
        }
        return -1;
    }

    /// <summary>The same search with System.Text.Json's reader (the reference for <see cref="FindTopLevel"/>).</summary>
    internal static (int Start, int End)? FindTopLevelByReader(ReadOnlySpan<byte> utf8, ReadOnlySpan<byte> name)
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
