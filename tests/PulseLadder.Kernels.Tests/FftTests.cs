using System.Text.Json;
using Xunit.Abstractions;

namespace PulseLadder.Kernels.Tests;

/// <summary>
/// The internal FFT (both paths: AVX2 + FMA vector path and portable scalar path) against the DFT definition,
/// sum_m a_m exp(+2 pi i k m / n), and against numpy.fft.
/// </summary>
public class FftTests(ITestOutputHelper output)
{
    private static double[] RandomInput(int n)
    {
        var rng = new Random(n);
        var a = new double[2 * n];
        for (int i = 0; i < a.Length; i++) a[i] = rng.NextDouble() - 0.5;
        return a;
    }

    /// <summary>Direct O(n) sum for bin k, the textbook definition; the phase k m is reduced mod n exactly first.</summary>
    private static (double Re, double Im) DirectBin(double[] input, int n, int k)
    {
        double re = 0, im = 0;
        for (int m = 0; m < n; m++)
        {
            (double s, double c) = Math.SinCos(2.0 * Math.PI * ((long)k * m % n) / n);
            re += input[2 * m] * c - input[2 * m + 1] * s;
            im += input[2 * m] * s + input[2 * m + 1] * c;
        }
        return (re, im);
    }

    [Theory]
    [InlineData(2)]
    [InlineData(4)]
    [InlineData(8)]
    [InlineData(64)]
    [InlineData(2048)]   // exactly one cache block
    [InlineData(4096)]   // block stages + one single large stage
    [InlineData(8192)]   // block stages + one paired (radix-4) pass
    [InlineData(32768)]  // paired pass + single stage
    public void Transform_MatchesDirectDft(int n)
    {
        double[] a = RandomInput(n);
        double[] input = (double[])a.Clone();
        new Fft(n).Transform(a);
        // Check every bin for small n, a spread of 97 bins otherwise (the direct sum is O(n) per bin).
        int bins = Math.Min(n, 97);
        double worst = 0;
        for (int b = 0; b < bins; b++)
        {
            int k = (int)((long)b * n / bins + b) % n;
            (double re, double im) = DirectBin(input, n, k);
            worst = Math.Max(worst, Math.Max(Math.Abs(re - a[2 * k]), Math.Abs(im - a[2 * k + 1])));
        }
        // Inputs are O(1); both sums carry O(sqrt(n) eps) rounding.
        Assert.True(worst <= 1e-12 * Math.Sqrt(n) * 10, $"worst |diff| = {worst:E2}");
    }

    /// <summary>
    /// Every bin of every small size on both paths against the direct DFT: covers each branch of the vector plan
    /// (radix-4 start alone, odd stage count with the radix-2 stage, one and several radix-4 passes).
    /// </summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void SmallSizes_AllBins_MatchDirectDft(bool vector)
    {
        if (vector) Assert.Equal(Fft.VectorSupported, new Fft(16, allowVector: true).UsesVectorPath);
        Assert.False(new Fft(16, allowVector: false).UsesVectorPath);
        for (int n = 2; n <= 512; n <<= 1)
        {
            double[] a = RandomInput(n), input = (double[])a.Clone();
            new Fft(n, vector).Transform(a);
            double worst = 0, ss = 0;
            for (int k = 0; k < n; k++)
            {
                (double re, double im) = DirectBin(input, n, k);
                worst = Math.Max(worst, Math.Max(Math.Abs(re - a[2 * k]), Math.Abs(im - a[2 * k + 1])));
                ss += re * re + im * im;
            }
            double rms = Math.Sqrt(ss / (2 * n));
            Assert.True(worst <= 1e-13 * rms * Math.Log2(n) + 1e-15, $"n={n} vector={vector}: worst |diff| / rms = {worst / rms:E2}");
        }
    }

    /// <summary>The vector path against the scalar path (the project's reference implementation) at the sizes the NUFFT uses.</summary>
    [Theory]
    [InlineData(1 << 12)]
    [InlineData(1 << 13)]
    [InlineData(1 << 14)]
    [InlineData(1 << 15)]
    [InlineData(1 << 16)]
    [InlineData(1 << 17)]
    public void VectorPath_MatchesScalarPath(int n)
    {
        double[] a = RandomInput(n), b = (double[])a.Clone();
        new Fft(n, allowVector: true).Transform(a);
        new Fft(n, allowVector: false).Transform(b);
        double worst = 0, ss = 0;
        for (int i = 0; i < a.Length; i++) { worst = Math.Max(worst, Math.Abs(a[i] - b[i])); ss += b[i] * b[i]; }
        double rms = Math.Sqrt(ss / a.Length);
        output.WriteLine($"n={n}: vector vs scalar max |diff| / rms = {worst / rms:E2}");
        Assert.True(worst <= 1e-13 * rms, $"worst |diff| / rms = {worst / rms:E2}");
    }

    /// <summary>
    /// Both paths against numpy: n * numpy.fft.ifft(a) (numpy's inverse uses the positive exponent), stored by
    /// tests/reference/fft/make_fft_reference.py in fft_reference.json (numpy version recorded there); the input is
    /// rebuilt from the integer formulas given in that script.
    /// </summary>
    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void MatchesNumpyReference(bool vector)
    {
        string path = Path.Combine(AppContext.BaseDirectory, "reference", "fft_reference.json");
        using JsonDocument doc = JsonDocument.Parse(File.ReadAllText(path));
        int cases = 0;
        foreach (JsonElement c in doc.RootElement.GetProperty("cases").EnumerateArray())
        {
            int n = c.GetProperty("n").GetInt32();
            double rms = c.GetProperty("rms").GetDouble();
            int[] bins = c.GetProperty("bins").EnumerateArray().Select(x => x.GetInt32()).ToArray();
            double[] re = c.GetProperty("re").EnumerateArray().Select(x => x.GetDouble()).ToArray();
            double[] im = c.GetProperty("im").EnumerateArray().Select(x => x.GetDouble()).ToArray();
            var a = new double[2 * n];
            for (long m = 0; m < n; m++)
            {
                a[2 * m] = (double)((7 * m * m + 13 * m + 5) % 1031) / 1031.0 - 0.5;
                a[2 * m + 1] = (double)((3 * m * m + 17 * m + 11) % 1009) / 1009.0 - 0.5;
            }
            new Fft(n, vector).Transform(a);
            double worst = 0;
            for (int b = 0; b < bins.Length; b++)
                worst = Math.Max(worst, Math.Max(Math.Abs(a[2 * bins[b]] - re[b]), Math.Abs(a[2 * bins[b] + 1] - im[b])));
            output.WriteLine($"numpy n={n} vector={vector}: max |diff| / rms = {worst / rms:E2}");
            Assert.True(worst <= 1e-12 * rms, $"n={n} vector={vector}: worst |diff| / rms = {worst / rms:E2}");
            cases++;
        }
        Assert.True(cases >= 4);
    }
}
