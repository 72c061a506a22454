namespace PulseLadder.Kernels.Tests;

/// <summary>The internal FFT against the DFT definition, sum_m a_m exp(+2 pi i k m / n).</summary>
public class FftTests
{
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
        var rng = new Random(n);
        var a = new double[2 * n];
        for (int i = 0; i < a.Length; i++) a[i] = rng.NextDouble() - 0.5;
        double[] input = (double[])a.Clone();
        new Fft(n).Transform(a);
        // Check every bin for small n, a spread of 97 bins otherwise (the direct sum is O(n) per bin).
        int bins = Math.Min(n, 97);
        double worst = 0;
        for (int b = 0; b < bins; b++)
        {
            int k = (int)((long)b * n / bins + b) % n;
            double re = 0, im = 0;
            for (int m = 0; m < n; m++)
            {
                (double s, double c) = Math.SinCos(2.0 * Math.PI * ((long)k * m % n) / n);
                re += input[2 * m] * c - input[2 * m + 1] * s;
                im += input[2 * m] * s + input[2 * m + 1] * c;
            }
            worst = Math.Max(worst, Math.Max(Math.Abs(re - a[2 * k]), Math.Abs(im - a[2 * k + 1])));
        }
        // Inputs are O(1); both sums carry O(sqrt(n) eps) rounding.
        Assert.True(worst <= 1e-12 * Math.Sqrt(n) * 10, $"worst |diff| = {worst:E2}");
    }
}
