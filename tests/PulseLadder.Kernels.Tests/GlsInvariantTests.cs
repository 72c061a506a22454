namespace PulseLadder.Kernels.Tests;

/// <summary>Properties of the ZK09 periodogram (SCIENCE.md CV-25) for every variant and the NUFFT path.</summary>
public class GlsInvariantTests
{
    public static TheoryData<int> Methods()
    {
        // 0..2: exact variants; 3: NUFFT.
        var d = new TheoryData<int>();
        foreach (GlsVariant v in TestData.SupportedVariants) d.Add((int)v);
        d.Add(3);
        return d;
    }

    private static void Run(int method, double[] t, double[] y, double[] w, double f0, double df, double[] p)
    {
        if (method == 3) new GlsNufftPlan(f0, df, p.Length).Execute(t, y, w, p);
        else new GlsPlan(f0, df, p.Length, (GlsVariant)method).Execute(t, y, w, p);
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void Execute_NoiselessSinusoid_PeaksAtItsFrequencyWithPowerOne(int method)
    {
        // SCIENCE.md CV-25 (property of ZK09): p(f_true) = 1 to 1e-12 for any sampling, N >= 4.
        var rng = new Random(99);
        const int n = 57;
        double fTrue = 0.4321;
        var t = new double[n];
        var y = new double[n];
        var w = new double[n];
        for (int i = 0; i < n; i++)
        {
            t[i] = 250.0 * rng.NextDouble() - 125.0;
            y[i] = 9.5 + 0.42 * Math.Cos(2 * Math.PI * fTrue * t[i] - 1.1);
            w[i] = 0.5 + rng.NextDouble();
        }
        const int kTrue = 300;
        double df = 0.0007;
        double f0 = fTrue - kTrue * df;
        var p = new double[701];
        Run(method, t, y, w, f0, df, p);
        double tol = method == 3 ? 1e-9 : 1e-12; // the NUFFT path is approximate (~1e-11)
        Assert.True(Math.Abs(p[kTrue] - 1.0) <= tol, $"p(f_true) = {p[kTrue]:R}");
        Assert.Equal(kTrue, Array.IndexOf(p, p.Max()));
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void Execute_PowerStaysWithinZeroAndOne_OnNoisyData(int method)
    {
        var (t, y, w) = TestData.Irregular(333, 5, span: 1500.0);
        var p = new double[10_000];
        Run(method, t, y, w, 0.0005, 0.0003, p);
        Assert.All(p, v => Assert.InRange(v, 0.0, 1.0));
    }

    [Theory]
    [MemberData(nameof(Methods))]
    public void Execute_ConstantTimeShift_ChangesNothing(int method)
    {
        var (t, y, w) = TestData.Irregular(211, 8, span: 700.0);
        double[] shifted = t.Select(x => x + 1234.5678).ToArray();
        var a = new double[3000];
        var b = new double[3000];
        Run(method, t, y, w, 0.003, 0.00061, a);
        Run(method, shifted, y, w, 0.003, 0.00061, b);
        Assert.True(TestData.MaxAbsDiff(a, b) <= 1e-9, $"max |dp| = {TestData.MaxAbsDiff(a, b):E2}");
    }
}
