using PulseLadder.Core.Photometry;
using PulseLadder.Core.PeriodSearch;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>Check values CV-15..CV-22 of SCIENCE.md 7.2 on the D30 light curve (values computed there with astropy 5.2.1 [X]).</summary>
public class D30CheckValueTests
{
    // CV-15 grid: f in [0.02, 2), n0 = 10.
    private static readonly PeriodSearchSettings Cv15Settings = new() { MinPeriodDays = 0.5, MaxPeriodDays = 50, Oversampling = 10, TopPeaks = 5 };

    private static PeriodSearchResult Search() => PeriodFinder.FindPeriods(D30.Points(), PulsatorClass.Unknown, Cv15Settings);

    [Fact]
    public void FindPeriods_GridMatchesCv15_OnD30()
    {
        var r = Search();
        // SCIENCE.md CV-15: delta f = 0.00232656, 852 points.
        Assert.Equal(0.02, r.MinFrequency, 12);
        Assert.Equal(0.00232656, r.FrequencyStep, 8);
        Assert.Equal(852, r.FrequencyCount);
    }

    [Fact]
    public void FindPeriods_ReturnsCv15PeaksAndPowers_OnD30()
    {
        var r = Search();
        Assert.Null(r.FailureReason);
        // SCIENCE.md CV-15 (astropy 5.2.1 [X]): highest f = 0.1860514, p = 0.984427; 1.1861809 p = 0.936135;
        // 0.8140698 p = 0.866635; 1.8144307 p = 0.587307. Tolerances f 2e-6, p 1e-5.
        (double F, double P)[] expected = [(0.1860514, 0.984427), (1.1861809, 0.936135), (0.8140698, 0.866635), (1.8144307, 0.587307)];
        Assert.Equal(0.1860514, r.Peaks[0].Frequency, 2e-6);
        foreach (var (f, p) in expected)
        {
            var peak = r.Peaks.Single(x => Math.Abs(x.Frequency - f) < 1e-3);
            Assert.Equal(f, peak.Frequency, 2e-6);
            Assert.Equal(p, peak.Power, 1e-5);
        }
    }

    [Fact]
    public void FindPeriods_BaluevFapMatchesCv16_OnD30()
    {
        var r = Search();
        // SCIENCE.md CV-16 (Baluev 2008 via astropy 5.2.1 [X]), 2 % relative.
        (double F, double Fap)[] expected = [(0.1860514, 1.1e-21), (1.1861809, 9.9e-14), (0.8140698, 1.37e-9), (1.8144307, 2.69e-3)];
        foreach (var (f, fap) in expected)
        {
            var peak = r.Peaks.Single(x => Math.Abs(x.Frequency - f) < 1e-3);
            Assert.Equal("baluev2008", peak.FapMethod);
            Assert.InRange(peak.Fap!.Value / fap, 0.98, 1.02);
        }
    }

    [Fact]
    public void FindPeriods_LabelsOneDayAliases_OnD30()
    {
        var r = Search();
        var alias = r.Peaks.Single(x => Math.Abs(x.Frequency - 1.1861809) < 1e-3);
        // SCIENCE.md CV-15 calls 1.18618 the "1+f alias" and 0.81407 the "1-f alias" of 0.18605.
        Assert.Contains("1d_alias_of:0.18605", alias.Aliases);
        var minus = r.Peaks.Single(x => Math.Abs(x.Frequency - 0.8140698) < 1e-3);
        Assert.Contains("1d_alias_of:0.18605", minus.Aliases);
        Assert.Empty(r.Peaks[0].Aliases);
    }

    [Fact]
    public void FindPeriods_WindowMatchesCv20_OnD30()
    {
        var pts = D30.Points();
        var t = pts.Select(p => p.Bjd - 2_460_000.0).ToArray();
        var w = new double[3];
        SpectralTools.Window(t, [0.5, 1.0, 1.0027379], w);
        // SCIENCE.md CV-20 [X]: 0.07046, 0.91427, 0.88039 (1e-4).
        Assert.Equal(0.07046, w[0], 1e-4);
        Assert.Equal(0.91427, w[1], 1e-4);
        Assert.Equal(0.88039, w[2], 1e-4);

        // The stored window is the same function on the plotted frequencies.
        var r = Search();
        Assert.Equal(r.Periodogram.X, r.Window.X);
        int i = Array.FindIndex(r.Window.X, x => Math.Abs(x - 1.0) < 0.0012);
        var one = new double[1];
        SpectralTools.Window(t, [r.Window.X[i]], one);
        // Plotted curves are stored rounded (1e-7 c/d, 1e-5 in power: PeriodSearchEngine.PlotPowerDecimals).
        Assert.Equal(one[0], r.Window.Y[i], 1e-5);
    }

    [Fact]
    public void WindowOnGrid_EqualsDirectWindow_OnD30Grid()
    {
        // Invariant: the rotating-phasor window equals the direct sum (Deeming 1975 definition) at every grid index.
        var t = D30.T;
        int[] idx = [0, 1, 2, 400, 511, 512, 513, 851, 1500, 3000];
        var fast = new double[idx.Length];
        SpectralTools.WindowOnGrid(t, 0.02, 0.00232656, idx, fast);
        var direct = new double[idx.Length];
        SpectralTools.Window(t, idx.Select(k => 0.02 + k * 0.00232656).ToArray(), direct);
        for (int i = 0; i < idx.Length; i++) Assert.Equal(direct[i], fast[i], 1e-12);
    }

    [Fact]
    public void RefinePeriod_ErrorsMatchCv18_OnD30()
    {
        var r = Search();
        var est = PeriodFinder.RefinePeriod(D30.Points(), r.Peaks[0].Frequency, r, Cv15Settings);
        Assert.Null(est.FailureReason);
        // SCIENCE.md CV-21: BIC chooses n = 1 on D30.
        Assert.Equal(1, est.Orders.Single().Harmonics);
        // SCIENCE.md CV-18 [X]: nonlinear LSQ scaled by chi2_red = 1.152: sigma_f = 3.093e-4, sigma_P = 0.00893 d (2 %);
        // MO99: sigma_f = 3.103e-4; |P - 5.366249| = 0.0086 d < 1 sigma.
        Assert.Equal(0.1860514, est.Frequency, 2e-6);
        Assert.Equal(1.152, est.Chi2Reduced, 1e-3);
        Assert.InRange(est.FrequencyErr / 3.093e-4, 0.98, 1.02);
        Assert.InRange(est.PeriodErrDays / 0.00893, 0.98, 1.02);
        Assert.InRange(est.FrequencyErrMo99!.Value / 3.103e-4, 0.98, 1.02);
        Assert.True(Math.Abs(est.PeriodDays - 5.366249) < est.PeriodErrDays);
    }

    [Fact]
    public void PdmTheta_MatchesCv22_OnD30()
    {
        var groups = new List<(double[] T, double[] Y)> { (D30.T, D30.Mag) };
        // SCIENCE.md CV-22 [X]: 10 equal bins, phase 0 at the first time; 1e-3.
        (double P, double Theta)[] expected = [(5.374860, 0.0385), (5.366249, 0.0629), (0.843042, 0.1010), (3.0, 1.0814)];
        foreach (var (p, theta) in expected)
            Assert.Equal(theta, SpectralTools.PdmTheta(groups, p, 10, D30.T[0])!.Value, 1e-3);
    }

    [Fact]
    public void RefinePeriod_PdmAgrees_OnD30()
    {
        var r = Search();
        var est = PeriodFinder.RefinePeriod(D30.Points(), r.Peaks[0].Frequency, r, Cv15Settings);
        Assert.False(est.PdmDisagrees);
        Assert.Equal(1 / est.Frequency, est.PdmPreferredPeriodDays!.Value, 9);
        Assert.True(est.PdmCandidates.Count >= 3);
    }
}
