using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Demo;

namespace PulseLadder.Core.Tests.Demo;

[Collection(DemoCampaignCollection.Name)]
public class DemoCampaignTests(DemoCampaignFixture campaign)
{
    private DemoCampaignData Data => campaign.Data;

    private static readonly DemoOptions Small = new() { StarCount = 30, Seasons = 1 };

    [Fact]
    public void Generate_GivesIdenticalFiles_WhenSameSeed()
    {
        var again = DemoCampaign.Render(DemoCampaign.Generate(new DemoOptions()));
        Assert.Equal(campaign.Files.Select(f => f.Name), again.Select(f => f.Name));
        for (int i = 0; i < again.Count; i++) Assert.True(campaign.Files[i].Content == again[i].Content, campaign.Files[i].Name);
    }

    [Fact]
    public void Generate_GivesDifferentFiles_WhenSeedDiffers()
    {
        var a = DemoCampaign.Render(DemoCampaign.Generate(Small with { Seed = 1 }));
        var b = DemoCampaign.Render(DemoCampaign.Generate(Small with { Seed = 2 }));
        Assert.NotEqual(a.Single(f => f.Name == DemoFiles.StarList).Content, b.Single(f => f.Name == DemoFiles.StarList).Content);
        Assert.NotEqual(a.Single(f => f.Name == DemoFiles.Truth).Content, b.Single(f => f.Name == DemoFiles.Truth).Content);
        Assert.NotEqual(a[1].Content, b[1].Content);
    }

    [Fact]
    public void WriteTo_WritesRenderedBytes_WhenDirectoryGiven()
    {
        string dir = Path.Combine(Path.GetTempPath(), "pulseladder-demo-" + Guid.NewGuid().ToString("N"));
        try
        {
            var paths = DemoCampaign.WriteTo(dir, Small);
            var expected = DemoCampaign.Render(DemoCampaign.Generate(Small));
            Assert.Equal(expected.Select(f => Path.Combine(dir, f.Name)), paths);
            foreach (var f in expected)
            {
                var bytes = System.IO.File.ReadAllBytes(Path.Combine(dir, f.Name));
                Assert.Equal(System.Text.Encoding.UTF8.GetBytes(f.Content), bytes); // no BOM, exact text
            }
            Assert.Contains(DemoFiles.PhotometryFileName("tamsin-0.6m"), paths.Select(Path.GetFileName));
        }
        finally
        {
            Directory.Delete(dir, recursive: true);
        }
    }

    [Fact]
    public void Generate_HasDesignedFieldsAndClassMix_WhenDefaultOptions()
    {
        Assert.Equal(3, Data.Fields.Count);
        Assert.InRange(Data.Stars.Count, 140, 160);
        Assert.Equal(Data.Stars.Count, Data.Stars.Select(s => s.Name).Distinct().Count());
        var byField = Data.Stars.GroupBy(s => s.Field).ToDictionary(g => g.Key, g => g.Select(s => s.Class).ToList());
        Assert.Equal(3, byField.Count);
        // Cluster and dwarf-galaxy fields: every class; the distant spiral: Cepheids only.
        foreach (var field in new[] { "ember-knot", "lantern-cloud" })
            foreach (var cls in new[] { DemoClass.CepheidF, DemoClass.CepheidFirstOvertone, DemoClass.RRab, DemoClass.RRc, DemoClass.Constant })
                Assert.Contains(cls, byField[field]);
        Assert.All(byField["hollow-spiral"], c => Assert.True(c is DemoClass.CepheidF or DemoClass.CepheidFirstOvertone, c));
        var cepheids = Data.Stars.Where(s => s.Class is DemoClass.CepheidF or DemoClass.CepheidFirstOvertone).ToList();
        double overtoneShare = cepheids.Count(s => s.Class == DemoClass.CepheidFirstOvertone) / (double)cepheids.Count;
        Assert.InRange(overtoneShare, 0.12, 0.20); // brief: ~15% first-overtone Cepheids
        var mus = Data.Fields.Select(f => f.DistanceModulus).ToList();
        Assert.Equal(3, mus.Distinct().Count());
    }

    [Fact]
    public void Generate_HasMinimumStars_WhenSmallestCampaign()
    {
        var data = DemoCampaign.Generate(Small);
        Assert.InRange(data.Stars.Count, 30, 45);
        Assert.Equal(3, data.Stars.Select(s => s.Field).Distinct().Count());
        Assert.Throws<ArgumentOutOfRangeException>(() => DemoCampaign.Generate(Small with { StarCount = 10 }));
    }

    [Fact]
    public void Generate_KeepsPeriodsInClassRanges_WhenDefaultOptions()
    {
        foreach (var s in Data.Stars)
        {
            switch (s.Class)
            {
                case DemoClass.CepheidF: Assert.InRange(s.PeriodDays!.Value, 2, 60); Assert.Equal(s.PeriodDays, s.FundamentalPeriodDays); break;
                case DemoClass.CepheidFirstOvertone:
                    Assert.InRange(s.PeriodDays!.Value, 1, 5);
                    // SCIENCE.md 3.4: P1/P0 about 0.70-0.72.
                    Assert.InRange(s.PeriodDays.Value / s.FundamentalPeriodDays!.Value, 0.69, 0.72);
                    break;
                case DemoClass.RRab: Assert.InRange(s.PeriodDays!.Value, 0.45, 0.8); break;
                case DemoClass.RRc: Assert.InRange(s.PeriodDays!.Value, 0.28, 0.42); break;
                default: Assert.Null(s.PeriodDays); Assert.Equal(0, s.AmplitudeV); break;
            }
        }
    }

    [Fact]
    public void Generate_KeepsMeanMagnitudesObservable_WhenDefaultOptions()
    {
        Assert.All(Data.Stars, s => Assert.InRange(s.MeanV, 10, 21.2));
        Assert.All(Data.Stars, s => Assert.InRange(s.MeanI, 8.5, 21.2));
    }

    [Fact]
    public void Generate_FollowsBenedictPlRelation_WhenFundamentalCepheids()
    {
        // Benedict et al. 2007 (SCIENCE.md 3.1 #1): M_V = -2.43 (log P - 1) - 4.05, with A_V = 3.1 E(B-V).
        var residuals = Data.Stars.Where(s => s.Class == DemoClass.CepheidF)
            .Select(s => s.MeanV - s.DistanceModulus - 3.1 * s.Ebv - (-2.43 * (Math.Log10(s.PeriodDays!.Value) - 1) - 4.05)).ToList();
        Assert.InRange(residuals.Average(), -0.05, 0.05);
        double sd = Math.Sqrt(residuals.Average(r => r * r));
        Assert.InRange(sd, 0.05, 0.16);
    }

    [Fact]
    public void Generate_PutsTimesInCampaignAndPlausibleRange_WhenWrittenWithOffset()
    {
        double first = Data.Measurements.Min(m => m.Time) + DemoCampaign.TimeOffset;
        double last = Data.Measurements.Max(m => m.Time) + DemoCampaign.TimeOffset;
        Assert.InRange(first, DemoCampaign.StartJdUtc, DemoCampaign.StartJdUtc + 2 * 365.25);
        Assert.InRange(last, DemoCampaign.StartJdUtc, DemoCampaign.StartJdUtc + 2 * 365.25);
        Assert.InRange(first, Photometry.TimeScales.MinPlausibleJd, Photometry.TimeScales.MaxPlausibleJd);
        Assert.InRange(last, Photometry.TimeScales.MinPlausibleJd, Photometry.TimeScales.MaxPlausibleJd);
    }

    [Fact]
    public void Generate_ObservesAtNightOnly_WhenCheckedPerSite()
    {
        foreach (var o in Data.Observers)
        {
            foreach (var m in Data.Measurements.Where(m => m.Observer == o.Name))
            {
                // Local mean solar time = UT + longitude/15 h; night is 18 h..6 h local.
                double jd = m.Time + DemoCampaign.TimeOffset;
                double localHours = ((jd + 0.5 + o.LongitudeDeg / 360.0) % 1.0) * 24.0;
                Assert.True(localHours >= 17.9 || localHours <= 6.1, $"{o.Name} {m.Time} local {localHours:F2} h");
            }
        }
    }

    [Fact]
    public void Generate_HasTwoSeasonsAndBusyStars_WhenDefaultOptions()
    {
        var perStar = Data.Measurements.Where(m => m.Band == "V").GroupBy(m => m.Star)
            .ToDictionary(g => g.Key, g => g.Select(m => m.Time).Order().ToArray());
        Assert.Equal(Data.Stars.Count, perStar.Count);
        Assert.InRange(perStar.Values.Max(t => t.Length), 450, 750); // brief: ~2 x 300 epochs for the busiest stars
        foreach (var times in perStar.Values)
        {
            var gaps = times.Zip(times.Skip(1), (a, b) => b - a).ToArray();
            Assert.Equal(1, gaps.Count(g => g > 100)); // exactly one seasonal gap between the two seasons
            double nights = times.Select(t => Math.Floor(t)).Distinct().Count();
            Assert.InRange(nights, 150, 330);
        }
    }

    [Fact]
    public void Generate_CarriesObserverZeroPoints_WhenConstantStarsCompared()
    {
        var constants = Data.Stars.Where(s => s.Class == DemoClass.Constant).Select(s => s.Name).ToHashSet();
        var reference = Data.Observers[0];
        Assert.Equal(3, Data.Observers.Select(o => o.LongitudeDeg).Distinct().Count());
        foreach (var o in Data.Observers.Skip(1))
        {
            foreach (var band in new[] { "V", "I" })
            {
                var diffs = new List<double>();
                foreach (var star in constants)
                {
                    double Median(string obs) => MedianOf(Data.Measurements.Where(m => m.Star == star && m.Band == band && m.Observer == obs).Select(m => m.Mag));
                    diffs.Add(Median(o.Name) - Median(reference.Name));
                }
                double expected = o.ZeroPoint(band) - reference.ZeroPoint(band);
                Assert.InRange(Math.Abs(expected), 0.02, 0.06); // "a few hundredths of a magnitude"
                Assert.InRange(MedianOf(diffs), expected - 0.006, expected + 0.006);
            }
        }
    }

    private static double MedianOf(IEnumerable<double> values)
    {
        var v = values.Order().ToArray();
        return v.Length % 2 == 1 ? v[v.Length / 2] : 0.5 * (v[v.Length / 2 - 1] + v[v.Length / 2]);
    }

    [Fact]
    public void Generate_HasMagnitudeDependentErrorsAndFewOutliers_WhenDefaultOptions()
    {
        var all = Data.Measurements;
        Assert.All(all, m => Assert.InRange(m.MagErr, 0.007, 0.062));
        double outliers = all.Count(m => m.IsOutlier) / (double)all.Count;
        Assert.InRange(outliers, 0.003, 0.007);
        double brightErr = all.Where(m => m.Mag < 14).Average(m => m.MagErr);
        double faintErr = all.Where(m => m.Mag > 20).Average(m => m.MagErr);
        Assert.InRange(brightErr, 0.009, 0.012);
        Assert.InRange(faintErr, 0.03, 0.05);
    }

    [Fact]
    public void Generate_MatchesTrueIntensityMean_WhenMeasurementsAveraged()
    {
        // Averaging flux over well-spread phases recovers the intensity mean the truth file states.
        var reference = Data.Observers[0].Name;
        foreach (var s in Data.Stars.Where(s => s.Class == DemoClass.CepheidF).Take(10))
        {
            var flux = Data.Measurements.Where(m => m.Star == s.Name && m.Band == "V" && m.Observer == reference && !m.IsOutlier)
                .Select(m => Math.Pow(10, -0.4 * m.Mag)).ToList();
            double mean = -2.5 * Math.Log10(flux.Average());
            Assert.InRange(mean, s.MeanV - 0.04, s.MeanV + 0.04);
        }
    }

    [Fact]
    public void Generate_RisesSteeply_WhenRRabLightCurveFolded()
    {
        // RRab: rise time ~0.15 of the cycle (SCIENCE.md 2.4); a 3-harmonic curve gives ~0.25; sinusoid 0.5.
        var reference = Data.Observers[0].Name;
        foreach (var s in Data.Stars.Where(s => s.Class == DemoClass.RRab).Take(5))
        {
            var bins = new double[20];
            var counts = new int[20];
            foreach (var m in Data.Measurements.Where(m => m.Star == s.Name && m.Band == "V" && m.Observer == reference && !m.IsOutlier))
            {
                double phase = (m.Time + DemoCampaign.TimeOffset - s.EpochMaxLightJd!.Value) / s.PeriodDays!.Value;
                int b = (int)((phase - Math.Floor(phase)) * 20) % 20;
                bins[b] += m.Mag;
                counts[b]++;
            }
            var mean = bins.Select((v, i) => v / counts[i]).ToArray();
            int brightest = Array.IndexOf(mean, mean.Min());
            int faintest = Array.IndexOf(mean, mean.Max());
            Assert.True(brightest is 0 or 19 or 1, $"{s.Name}: maximum light at bin {brightest}");
            double rise = ((brightest - faintest + 20) % 20) / 20.0;
            Assert.InRange(rise, 0.1, 0.35);
            Assert.InRange(mean.Max() - mean.Min(), 0.6 * s.AmplitudeV, 1.1 * s.AmplitudeV);
        }
    }

    [Fact]
    public void StarList_DeclaresTrueClasses_WhenDeclareClassesSet()
    {
        var data = DemoCampaign.Generate(Small with { DeclareClasses = true });
        var text = DemoCampaign.Render(data).Single(f => f.Name == DemoFiles.StarList).Content;
        var parsed = StarListCsv.Parse(new StringReader(text), DemoFiles.StarList);
        Assert.True(parsed.IsSuccess, string.Join("; ", parsed.Errors.Take(3)));
        var expected = new Dictionary<string, PulsatorClass>
        {
            [DemoClass.CepheidF] = PulsatorClass.ClassicalCepheidFundamental,
            [DemoClass.CepheidFirstOvertone] = PulsatorClass.ClassicalCepheidFirstOvertone,
            [DemoClass.RRab] = PulsatorClass.RRLyraeAB,
            [DemoClass.RRc] = PulsatorClass.RRLyraeC,
            [DemoClass.Constant] = PulsatorClass.NotVariable,
        };
        Assert.Equal(data.Stars.Select(s => (PulsatorClass?)expected[s.Class]), parsed.Rows.Select(r => r.DeclaredClass));
        Assert.All(StarListCsv.Parse(new StringReader(campaign.File(DemoFiles.StarList).Content), "s").Rows, r => Assert.Null(r.DeclaredClass));
    }

    [Fact]
    public void GeneratedFiles_ParseWithZeroErrors_WhenReadByIngest()
    {
        var starList = StarListCsv.Parse(new StringReader(campaign.File(DemoFiles.StarList).Content), DemoFiles.StarList);
        Assert.True(starList.IsSuccess, string.Join("; ", starList.Errors.Take(3)));
        Assert.Empty(starList.Warnings);
        Assert.Equal(Data.Stars.Count, starList.Rows.Count);
        var rrLyrae = starList.Rows.Single(r => r.Name == Data.Stars.First(s => s.Class == DemoClass.RRab).Name);
        Assert.NotNull(rrLyrae.FeH);

        Assert.True(UploadMetadata.TryParse(DemoCampaign.TimeScaleCode, "2450000", out var scale, out var offset, out _));
        var options = new PhotometryParseOptions(scale, offset) { KnownStars = starList.Rows.Select(s => s.Name).ToHashSet() };
        long rows = 0;
        foreach (var observer in Data.Observers)
        {
            var file = campaign.File(DemoFiles.PhotometryFileName(observer.Name));
            var r = PhotometryCsv.Parse(new StringReader(file.Content), file.Name, options);
            Assert.True(r.IsSuccess, string.Join("; ", r.Errors.Take(3)));
            Assert.Empty(r.Warnings);
            var expected = Data.Measurements.Where(m => m.Observer == observer.Name).ToList();
            Assert.Equal(expected.Count, r.Rows.Count);
            for (int i = 0; i < expected.Count; i += 97)
            {
                var o = r.Rows[i].Observation;
                Assert.Equal(expected[i].Star, r.Rows[i].Star);
                Assert.Equal(expected[i].Time + 2450000, o.Time, 1e-6);
                Assert.Equal(expected[i].Mag, o.Mag, 1e-9);
                Assert.Equal(observer.Name, o.Observer);
            }
            rows += r.Rows.Count;
        }
        Assert.Equal(Data.Measurements.Count, rows);
    }
}
