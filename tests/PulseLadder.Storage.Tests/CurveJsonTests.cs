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
