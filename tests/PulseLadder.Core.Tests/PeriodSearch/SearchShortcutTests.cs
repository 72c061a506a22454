using PulseLadder.Core.Photometry;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Tests.Demo;
using PulseLadder.Kernels;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>
/// The search's two shortcuts against the slow paths they replace, on the seeded demo campaign: the GLS peak found
/// by one zoom level and a parabola against a dense scan with the textbook kernel (<see cref="GlsReference"/>, itself
/// checked against astropy), and the refinement started from the search's model minimum against the full local scan
/// it skips (the reference implementation is the project's own slow path, so any difference is the shortcut's).
/// </summary>
[Collection(DemoCampaignCollection.Name)]
public class SearchShortcutTests(DemoCampaignFixture campaign)
{
    private IEnumerable<(List<LightCurvePoint> Points, PulsatorClass Class)> Variables(int count)
    {
        var byStar = campaign.Data.Measurements.GroupBy(m => m.Star).ToDictionary(g => g.Key, g => g.ToList());
        foreach (var star in campaign.Data.Stars.Where(s => s.PeriodDays is not null).Take(count))
        {
            var pts = byStar[star.Name].Select((m, i) => new LightCurvePoint(i, m.Time + 2_450_000, m.Band, m.Mag, m.MagErr, m.Observer)).ToList();
            PulsatorClasses.TryParse(star.Class, out var cls);
            yield return (pts, cls);
        }
    }

    [Fact]
    public void ListedPeaks_AreAtTheMaximumOfADenseReferenceScan()
    {
        int checkedPeaks = 0;
        foreach (var (pts, cls) in Variables(12))
        {
            var r = PeriodFinder.FindPeriods(pts, cls, new PeriodSearchSettings());
            if (r.FailureReason is not null) continue;
            var data = SearchData.Prepare(pts);
            foreach (var peak in r.Peaks.Where(p => p.Aliases.All(a => !a.StartsWith("double_period_of:", StringComparison.Ordinal))))
            {
                // Combined power chi2_0-weighted over bands (SCIENCE.md 1.4), textbook sums, +-1 grid step at df/2048.
                const int m = 4097;
                double df = r.FrequencyStep, f0 = peak.Frequency - df, step = 2 * df / (m - 1);
                var combined = new double[m];
                var one = new double[m];
                double chi0 = data.Bands.Sum(b => b.Chi2Mean);
                foreach (var b in data.Bands)
                {
                    if (!(b.Chi2Mean > 0)) continue;
                    GlsReference.Compute(b.T, b.Y, b.W, f0, step, one);
                    for (int i = 0; i < m; i++) combined[i] += b.Chi2Mean * one[i] / chi0;
                }
                int best = 0;
                for (int i = 1; i < m; i++) if (combined[i] > combined[best]) best = i;
                if (best == 0 || best == m - 1) continue; // a shoulder, not a maximum within +-df: nothing to compare
                double fRef = f0 + best * step;
                // Within 2e-3 of a grid step (the grid step is 1/(n0 T), n0 = 5 by default: far below any period error) and never lower
                // in power than the reference maximum by more than its own curvature over that distance allows.
                Assert.True(Math.Abs(peak.Frequency - fRef) < 2e-3 * df, $"f {peak.Frequency} ref {fRef} df {df}");
                Assert.True(peak.Power >= combined[best] - 1e-8, $"power {peak.Power} ref {combined[best]}");
                checkedPeaks++;
            }
        }
        Assert.True(checkedPeaks >= 30, $"{checkedPeaks} peaks compared");
    }

    [Fact]
    public void Refinement_FromTheSearchModelMinimum_MatchesTheFullLocalScan()
    {
        int n = 0;
        foreach (var (pts, cls) in Variables(15))
        {
            var s = new PeriodSearchSettings();
            var r = PeriodFinder.FindPeriods(pts, cls, s);
            if (r.FailureReason is not null) continue;
            double f = r.Peaks[0].Frequency;
            var fast = PeriodFinder.RefinePeriod(pts, f, r, s);
            // One ulp away is "not the search's peak": the full scan over +-0.5/T runs.
            var full = PeriodFinder.RefinePeriod(pts, Math.BitIncrement(f), r, s);
            Assert.Equal(full.FailureReason, fast.FailureReason);
            if (fast.FailureReason is not null) continue;
            Assert.True(Math.Abs(fast.Frequency - full.Frequency) < 1e-3 * full.FrequencyErr,
                $"fast {fast.Frequency} full {full.Frequency} err {full.FrequencyErr}");
            Assert.Equal(full.Orders.Select(o => o.Harmonics), fast.Orders.Select(o => o.Harmonics));
            n++;
        }
        Assert.True(n >= 10, $"{n} stars compared");
    }
}
