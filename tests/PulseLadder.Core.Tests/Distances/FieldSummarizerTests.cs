using PulseLadder.Core.Calibration;
using PulseLadder.Core.Distances;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Distances;

public class FieldSummarizerTests
{
    private static readonly PlRelation Toy = new()
    {
        Id = "toy", Family = "toy", Classes = [PulsatorClass.ClassicalCepheidFundamental], Kind = RelationKind.Absolute,
        Mag = "V", A = -5.0, AErr = 0.02, B = -3.0, BErr = 0.1, P0 = 1.0, Scatter = 0.1, LogPMin = 0, LogPMax = 2, AnchorId = "none",
    };

    private static FieldStarDistance S(string name, double logP, double mag0, double err = 0.1)
        => new() { Star = name, RelationId = "toy", LogP = logP, Mag0 = mag0, MeasurementErr = err };

    // Hand-computed example (SCIENCE.md 5.2 procedure, common practice). Relation M = -5 - 3 (log P - 1), sigma_int 0.1.
    // Stars (log P, Mag0) -> M, mu = Mag0 - M:
    //   s1 (1.0, 13.00) -> -5.0, 18.00     s2 (0.5, 14.60) -> -3.5, 18.10     s3 (1.5, 11.40) -> -6.5, 17.90
    //   s4 (1.3, 12.15) -> -5.9, 18.05     s5 (0.8, 13.55) -> -4.4, 17.95     s6 (1.1, 14.20) -> -5.3, 19.50 (outlier)
    // Pass 1: median of 6 = (18.00 + 18.05)/2 = 18.025; |dev| = .025 .075 .125 .025 .075 1.475 -> MAD = .075,
    //   robust sigma = 1.4826 * .075 = 0.1112, 3 sigma = 0.3336: s6 rejected.
    // Pass 2: median of 5 = 18.00; MAD = .05 -> 3 sigma = 0.2224: nothing changes -> 2 passes.
    // Weights 1/(0.1^2 + 0.1^2) = 50 each: mu = 18.00, stat = 1/sqrt(250) = 0.0632456, chi2 = 50 * 0.025 = 1.25,
    //   chi2_red = 1.25/4 = 0.3125 (no inflation).
    // Systematic: weighted mean (log P - 1) = (0 - .5 + .5 + .3 - .2)/5 = 0.02 -> slope term 0.02 * 0.1 = 0.002;
    //   sys = sqrt(0.02^2 + 0.002^2) = 0.0200998; total = sqrt(0.004 + 0.000404) = 0.0663626.
    // Fixed-slope zero point alpha = mu + a = 13.00. Free slope: x = log P - 1 = 0 -.5 .5 .3 -.2, xbar = .02,
    //   Sxx = 0.63 - 5 * .0004 = 0.628; residuals r = mu - 18 = 0 .1 -.1 .05 -.05, sum x r = -0.075 ->
    //   slope = -3 - 0.075/0.628 = -3.119427, error = 1/sqrt(50 * 0.628) = 0.1784577, (slope + 3)/error = -0.1194268/0.1784577 = -0.669216.
    // Distance 10^(18/5 + 1) = 39810.717 pc, error 39810.717 * ln(10)/5 * 0.0663626 = 1216.66 pc.
    [Fact]
    public void Summarize_MatchesHandComputedExample()
    {
        var stars = new[]
        {
            S("s1", 1.0, 13.00), S("s2", 0.5, 14.60), S("s3", 1.5, 11.40), S("s4", 1.3, 12.15), S("s5", 0.8, 13.55), S("s6", 1.1, 14.20),
        };
        var f = FieldSummarizer.Summarize(stars, new FieldSummarySettings { Relation = Toy });
        Assert.Null(f.FailureReason);
        Assert.Equal(5, f.StarsUsed);
        Assert.Equal(1, f.StarsRejected);
        Assert.Equal(2, f.ClipIterations);
        Assert.False(f.Points.Single(p => p.Star == "s6").Kept);
        Assert.Equal(18.00, f.Mu, 1e-9);
        Assert.Equal(0.0632456, f.MuErrStat, 1e-6);
        Assert.Equal(0.0200998, f.MuErrSys, 1e-6);
        Assert.Equal(0.0663626, f.MuErr, 1e-6);
        Assert.Equal(0.3125, f.ChiSquareRed, 1e-9);
        Assert.False(f.SigmaIntInflated);
        Assert.Equal(13.00, f.FixedSlopeFit!.ZeroPoint, 1e-9);
        Assert.Equal(-3.119427, f.FreeSlopeFit!.Slope, 1e-6);
        Assert.Equal(0.178458, f.FreeSlopeFit.SlopeErr, 1e-6);
        Assert.Equal(-0.669216, f.SlopeDifferenceSigma!.Value, 1e-6);
        Assert.Equal(39810.717, f.DistancePc, 1e-3);
        Assert.Equal(1216.66, f.DistancePcErr, 0.01);
        Assert.Equal(39.810717, f.DistanceKpc, 1e-6);
        Assert.Equal(0.5, f.FixedSlopeFit.LogPMin, 12);
        Assert.Equal(1.5, f.FixedSlopeFit.LogPMax, 12);
        Assert.Equal(6, f.Points.Count);
    }

    // Identity (SCIENCE.md 5.2 step 5): the fixed-slope zero-point fit equals the weighted mean of per-star moduli.
    [Fact]
    public void Summarize_ZeroPointFitEqualsWeightedMean_WithUnequalErrors()
    {
        var stars = new[] { S("a", 0.7, 14.0, 0.05), S("b", 1.2, 12.3, 0.2), S("c", 1.6, 11.1, 0.1), S("d", 0.9, 13.4, 0.02) };
        var f = FieldSummarizer.Summarize(stars, new FieldSummarySettings { Relation = Toy, ClipSigma = 0, InflateAboveChi2Red = 1e9 });
        double sw = 0, swm = 0;
        foreach (var s in stars)
        {
            double mu = s.Mag0 - (-5 - 3 * (s.LogP - 1));
            double w = 1 / (s.MeasurementErr * s.MeasurementErr + 0.01);
            sw += w; swm += w * mu;
        }
        Assert.Equal(swm / sw, f.Mu, 1e-12);
        Assert.Equal(f.Mu + Toy.A, f.FixedSlopeFit!.ZeroPoint, 1e-12);
        Assert.Equal(1 / Math.Sqrt(sw), f.MuErrStat, 1e-12);
    }

    // Inflation: stars scattered by 0.5 mag about the relation with 0.1 mag quoted errors -> chi2_red >> 1;
    // sigma_int is raised until chi2_red = 1 and the summary says so.
    [Fact]
    public void Summarize_InflatesSigmaInt_WhenChiSquareIsLarge()
    {
        double[] offsets = [0.5, -0.5, 0.4, -0.45, 0.55, -0.5];
        var stars = offsets.Select((o, i) => S("x" + i, 0.6 + 0.15 * i, 18 + o + (-5 - 3 * (0.6 + 0.15 * i - 1)), 0.02)).ToArray();
        var f = FieldSummarizer.Summarize(stars, new FieldSummarySettings { Relation = Toy, ClipSigma = 0 });
        Assert.True(f.SigmaIntInflated);
        Assert.Contains("sigma_int_inflated", f.Flags);
        Assert.True(f.SigmaIntUsed > 0.4);
        double sw = 0, chi2 = 0;
        foreach (var s in stars) sw += 1 / (0.0004 + f.SigmaIntUsed * f.SigmaIntUsed);
        foreach (var s in stars)
        {
            double mu = s.Mag0 - (-5 - 3 * (s.LogP - 1));
            chi2 += (mu - f.Mu) * (mu - f.Mu) / (0.0004 + f.SigmaIntUsed * f.SigmaIntUsed);
        }
        Assert.Equal(1.0, chi2 / (stars.Length - 1), 1e-6);
    }

    [Fact]
    public void Summarize_FailsWithReason_ForNoStars()
        => Assert.Equal("no_stars", FieldSummarizer.Summarize([], new FieldSummarySettings()).FailureReason);

    // Anchor error (Pietrzynski 2019, 0.026 mag) enters the systematic error once, however many stars there are.
    [Fact]
    public void Summarize_AddsAnchorErrorOnce_ForLmcAnchoredRelation()
    {
        Assert.True(CalibrationRegistry.Embedded.TryGet("udalski1999_wi", out var wi));
        var many = Enumerable.Range(0, 50).Select(i =>
        {
            double logP = 0.5 + 0.02 * i;
            return new FieldStarDistance
            {
                Star = "s" + i, RelationId = wi.Id, LogP = logP, MeasurementErr = 0.05,
                Mag0 = 24.0 + (wi.A - 18.477 + wi.B * (logP - 1)) + (i % 2 == 0 ? 0.05 : -0.05),
            };
        }).ToArray();
        var f = FieldSummarizer.Summarize(many, new FieldSummarySettings());
        Assert.Equal(24.0, f.Mu, 1e-9);
        Assert.Equal(Math.Sqrt(0.004 * 0.004 + 0.026 * 0.026), f.AnchorErr, 1e-12);
        Assert.True(f.MuErrSys >= f.AnchorErr);
        Assert.True(f.MuErrStat < 0.02);
    }
}
