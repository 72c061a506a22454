using System.Text.Json;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Storage.Tests;

/// <summary>
/// The stored form of plotted curves (<see cref="CurveJsonConverter"/>): checked against System.Text.Json's own number
/// writer and parser (plain options, no converter), the general-purpose reference for JSON numbers in .NET.
/// </summary>
public sealed class CurveJsonTests
{
    private static readonly JsonSerializerOptions Plain = new();

    private static double[] RoundedValues(int seed, int count)
    {
        var rng = new Random(seed);
        var v = new double[count];
        for (int i = 0; i < count; i++)
        {
            double mag = Math.Pow(10, rng.Next(-7, 8));
            double x = (rng.NextDouble() - 0.3) * mag;
            v[i] = Math.Round(x, rng.Next(0, CurveJsonConverter.MaxDecimals + 1));
        }
        return v;
    }

    [Fact]
    public void RoundedValues_ReadBackBitForBit_ByTheReferenceParser()
    {
        var x = RoundedValues(1, 20_000);
        var y = RoundedValues(2, 20_000);
        string json = Json.Serialize(new Curve(x, y));
        using var doc = JsonDocument.Parse(json);
        var xs = doc.RootElement.GetProperty("x").Deserialize<double[]>(Plain)!;
        var ys = doc.RootElement.GetProperty("y").Deserialize<double[]>(Plain)!;
        Assert.Equal(x.Select(BitConverter.DoubleToInt64Bits), xs.Select(BitConverter.DoubleToInt64Bits));
        Assert.Equal(y.Select(BitConverter.DoubleToInt64Bits), ys.Select(BitConverter.DoubleToInt64Bits));
        // And through the converter's own reader.
        var back = Json.Deserialize<Curve>(json)!;
        Assert.Equal(x.Select(BitConverter.DoubleToInt64Bits), back.X.Select(BitConverter.DoubleToInt64Bits));
        Assert.Equal(y.Select(BitConverter.DoubleToInt64Bits), back.Y.Select(BitConverter.DoubleToInt64Bits));
    }

    [Theory]
    [InlineData(0.00001, "0.00001")]
    [InlineData(0.0127119, "0.0127119")]
    [InlineData(-2.5, "-2.5")]
    [InlineData(42.0, "42")]
    [InlineData(0.0, "0")]
    [InlineData(1234567.1234567, "1234567.1234567")]
    public void FixedPointText_IsThePlainDecimal(double v, string expected)
    {
        var buf = new byte[32];
        int n = CurveJsonConverter.Format(v, buf);
        Assert.Equal(expected, System.Text.Encoding.ASCII.GetString(buf, 0, n));
    }

    [Fact]
    public void UnroundedAndSpecialValues_FallBackToTheGeneralForm_AndRoundTrip()
    {
        double[] x = [Math.PI, 1e-300, double.MaxValue, double.Epsilon, -0.0, 1.0 / 3, 123456789012345.678, 9.87654321e-8];
        double[] y = [double.NaN, double.PositiveInfinity, double.NegativeInfinity, 0.1 + 0.2, -1e20, 5e-324, 2.5e15, 1];
        string json = Json.Serialize(new Curve(x, y));
        var back = Json.Deserialize<Curve>(json)!;
        Assert.Equal(x.Select(BitConverter.DoubleToInt64Bits), back.X.Select(BitConverter.DoubleToInt64Bits));
        Assert.Equal(y.Select(BitConverter.DoubleToInt64Bits), back.Y.Select(BitConverter.DoubleToInt64Bits));
        // Finite values are the reference writer's own text.
        using var doc = JsonDocument.Parse(json);
        var xs = doc.RootElement.GetProperty("x");
        for (int i = 0; i < x.Length; i++)
            if (x[i] != Math.Round(x[i], CurveJsonConverter.MaxDecimals) || double.IsNegative(x[i]) && x[i] == 0)
                Assert.Equal(JsonSerializer.Serialize(x[i], Plain), xs[i].GetRawText());
    }

    [Fact]
    public void CurvesWrittenByTheGeneralWriter_ReadTheSame()
    {
        // Results stored before the converter existed: numbers in the writer's shortest form, e.g. 1E-05.
        var x = RoundedValues(3, 2_000);
        var y = RoundedValues(4, 2_000);
        string old = "{\"x\":" + JsonSerializer.Serialize(x, Plain) + ",\"y\":" + JsonSerializer.Serialize(y, Plain) + "}";
        var back = Json.Deserialize<Curve>(old)!;
        Assert.Equal(x, back.X);
        Assert.Equal(y, back.Y);
    }

    [Fact]
    public void MalformedCurve_IsAClearJsonError()
    {
        var e = Assert.Throws<JsonException>(() => Json.Deserialize<Curve>("{\"x\":[1,\"two\"],\"y\":[]}"));
        Assert.Contains("two", e.Message);
    }
}

/// <summary>Reading stored results without their curves, and splicing a stored property back (the field pass).</summary>
public sealed class ResultSplicingTests
{
    private sealed record Inner(string Name, Curve Periodogram, double Power);
    private sealed record Outer(string Star, Inner? Search, IReadOnlyList<string> Flags, double Mu);

    private static Outer Sample(double mu) => new("S-1",
        new Inner("gls", new Curve([0.1, 0.2000001, 0.3], [0.00001, 0.5, 1]), 0.75), ["a", "b"], mu);

    [Fact]
    public void DeserializeWithoutCurves_ReadsEverythingButTheCurves()
    {
        string json = Json.Serialize(Sample(14.2));
        var light = Json.DeserializeWithoutCurves<Outer>(json)!;
        Assert.Empty(light.Search!.Periodogram.X);
        Assert.Empty(light.Search.Periodogram.Y);
        Assert.Equal(0.75, light.Search.Power);
        Assert.Equal(["a", "b"], light.Flags);
        Assert.Equal(14.2, light.Mu);
    }

    // The byte-scan shortcut against the converter path it stands for (System.Text.Json skipping each curve token by
    // token): the same object, on curves that are plain, special (NaN is written as a string), null, empty, and text
    // that merely looks like a curve inside a string.
    [Fact]
    public void DeserializeWithoutCurves_ScanShortcut_ReadsWhatTheConverterPathReads()
    {
        var samples = new List<Outer>
        {
            Sample(14.2),
            new("S-2", new Inner("{\"x\":[1,2],\"y\":[3]}", new Curve([double.NaN, 1], [2, double.PositiveInfinity]), 0.1), ["{\"x\":["], 1),
            new("S-3", new Inner("gls", new Curve([], []), 0.2), [], 2),
            new("S-4", new Inner("gls", new Curve(null!, [1.5e-300, -2.5E+10]), 0.3), ["x"], 3),
            new("S-5", null, [], 4),
        };
        foreach (var o in samples)
        {
            string json = Json.Serialize(o);
            var reference = JsonSerializer.Deserialize<Outer>(json, Json.WithoutCurvesOptions)!;
            var fast = Json.DeserializeWithoutCurves<Outer>(json)!;
            Assert.Equal(Json.Serialize(reference), Json.Serialize(fast));
        }
        // The scan itself: plain curves become empty, the rest is byte for byte.
        byte[] text = System.Text.Encoding.UTF8.GetBytes("""{"a":{"x":[1,2.5,-3e-5],"y":[0,1,2]},"b":"{\"x\":[1],\"y\":[2]}","c":{"x":["NaN"],"y":[1]},"d":{"x":[],"y":[7]}}""");
        int n = Json.BlankCurves(text);
        Assert.Equal("""{"a":{"x":[],"y":[]},"b":"{\"x\":[1],\"y\":[2]}","c":{"x":["NaN"],"y":[1]},"d":{"x":[],"y":[]}}""", System.Text.Encoding.UTF8.GetString(text, 0, n));
    }

    [Fact]
    public void WithPropertyFrom_PutsBackTheStoredValue_ByteForByte()
    {
        string stored = Json.Serialize(Sample(14.2));
        var light = Json.DeserializeWithoutCurves<Outer>(stored)!;
        string rewritten = Json.Serialize(light with { Mu = 15.0 });
        string spliced = Json.WithPropertyFrom(rewritten, "search", stored);
        // The same text a full read-modify-write would give.
        Assert.Equal(Json.Serialize(Json.Deserialize<Outer>(stored)! with { Mu = 15.0 }), spliced);
        using var doc = System.Text.Json.JsonDocument.Parse(spliced);
        Assert.Equal(3, doc.RootElement.GetProperty("search").GetProperty("periodogram").GetProperty("x").GetArrayLength());
    }

    // The structural scan against System.Text.Json's reader (Json.FindTopLevelByReader) on random documents: nested
    // objects and arrays, strings holding quotes, backslashes, braces and non-ASCII text, numbers, literals.
    [Fact]
    public void FindTopLevel_Scan_FindsWhatTheReaderFinds()
    {
        var rng = new Random(5);
        string[] texts = ["plain", "q\"uote", "back\\slash\\", "{\"x\":[1]}", "]}", "Åsa 천문대", "", "\\\""];
        void Value(System.Text.Json.Utf8JsonWriter w, int depth)
        {
            switch (depth > 3 ? rng.Next(4) : rng.Next(7))
            {
                case 0: w.WriteNumberValue(rng.NextDouble() * 1e6 - 5e5); break;
                case 1: w.WriteStringValue(texts[rng.Next(texts.Length)]); break;
                case 2: w.WriteBooleanValue(rng.Next(2) == 0); break;
                case 3: w.WriteNullValue(); break;
                case 4 or 5:
                    w.WriteStartArray();
                    for (int i = rng.Next(6); i > 0; i--) Value(w, depth + 1);
                    w.WriteEndArray();
                    break;
                default:
                    w.WriteStartObject();
                    for (int i = rng.Next(5); i > 0; i--) { w.WritePropertyName(texts[rng.Next(texts.Length)] + i); Value(w, depth + 1); }
                    w.WriteEndObject();
                    break;
            }
        }
        for (int doc = 0; doc < 300; doc++)
        {
            var buf = new System.Buffers.ArrayBufferWriter<byte>();
            var keys = new List<string>();
            using (var w = new System.Text.Json.Utf8JsonWriter(buf, new System.Text.Json.JsonWriterOptions { Indented = doc % 3 == 0 }))
            {
                w.WriteStartObject();
                for (int k = rng.Next(8); k >= 0; k--)
                {
                    string key = "key_" + k;
                    keys.Add(key);
                    w.WritePropertyName(key);
                    Value(w, 0);
                }
                w.WriteEndObject();
            }
            var bytes = buf.WrittenSpan;
            foreach (var key in keys.Append("missing"))
            {
                var name = System.Text.Encoding.UTF8.GetBytes(key);
                Assert.Equal(Json.FindTopLevelByReader(bytes, name), Json.FindTopLevel(bytes, name));
            }
        }
    }

    [Fact]
    public void WithPropertyFrom_MissingProperty_Throws()
    {
        string a = Json.Serialize(Sample(1));
        Assert.Throws<ArgumentException>(() => Json.WithPropertyFrom(a, "nowhere", a));
        Assert.Throws<ArgumentException>(() => Json.WithPropertyFrom("{\"x\":1}", "search", a));
    }
}
