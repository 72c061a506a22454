using System.ComponentModel;
using System.Diagnostics;
using System.Globalization;
using PulseLadder.Core.Classification;
using PulseLadder.Core.Cleaning;
using PulseLadder.Core.Distances;
using PulseLadder.Core.LightCurves;
using PulseLadder.Core.PeriodSearch;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.TimeScales;
using PulseLadder.Demo;
using PulseLadder.Web;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary>
/// Prints per-stage CPU cost of the star pipeline on the demo campaign, and whole-pipeline stars per second on one
/// thread and on all cores. A measuring command, never a test.
/// </summary>
public sealed class BenchPipelineCommand : Command<BenchPipelineCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandOption("--stars <N>"), Description("Demo stars to generate (default 150).")]
        public int Stars { get; init; } = 150;

        [CommandOption("--rounds <N>"), Description("Timed passes over all stars (default 2, after one warm-up pass).")]
        public int Rounds { get; init; } = 2;
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        string dir = Path.Combine(Path.GetTempPath(), "pulseladder-bench-" + Guid.NewGuid().ToString("N"));
        DemoCampaign.WriteTo(dir, new DemoOptions { StarCount = s.Stars });
        var (_, stars) = UploadParsing.ReadStars(new IncomingFile("stars.csv", File.ReadAllBytes(Path.Combine(dir, "stars.csv"))));
        var known = stars.Rows.Select(x => x.Name).ToHashSet(StringComparer.Ordinal);
        var obs = new Dictionary<string, List<Observation>>(StringComparer.Ordinal);
        foreach (var f in Directory.GetFiles(dir, "photometry-*.csv"))
        {
            var p = UploadParsing.ReadPhotometry(new IncomingFile(f, File.ReadAllBytes(f)), TimeScale.JdUtc, DemoCampaign.TimeOffset, known, null, null, null, int.MaxValue);
            foreach (var r in p.Result.Rows)
            {
                if (!obs.TryGetValue(r.Star, out var l)) obs[r.Star] = l = [];
                l.Add(r.Observation);
            }
        }
        Directory.Delete(dir, true);
        var list = stars.Rows.Where(x => obs.ContainsKey(x.Name)).ToList();
        var settings = PipelineSettings.Default;

        foreach (var star in list) AnalysisPipeline.Run(star, obs[star.Name], settings);
        var t = new double[7];
        var sw = new Stopwatch();
        for (int round = 0; round < s.Rounds; round++)
            foreach (var star in list)
            {
                var o = obs[star.Name];
                sw.Restart(); var c = Cleaner.RejectUnusable(o, settings.Cleaning); t[0] += sw.Elapsed.TotalMilliseconds;
                sw.Restart(); var tm = BarycentricTime.ToBjdTdb(c.Kept, star.Position); t[1] += sw.Elapsed.TotalMilliseconds;
                sw.Restart(); var se = PeriodFinder.FindPeriods(tm.Points, star.DeclaredClass ?? PulsatorClass.Unknown, settings.PeriodSearch); t[2] += sw.Elapsed.TotalMilliseconds;
                if (se.Peaks.Count == 0) continue;
                sw.Restart(); var pe = PeriodFinder.RefinePeriod(tm.Points, se.Peaks[0].Frequency, se, settings.PeriodSearch); t[3] += sw.Elapsed.TotalMilliseconds;
                sw.Restart(); var fit = LightCurveFitter.FitBands(tm.Points, pe.PeriodDays, settings.Fit, settings.Cleaning); t[4] += sw.Elapsed.TotalMilliseconds;
                sw.Restart(); var cl = Classifier.Classify(star, pe, se, fit.Fits, null); t[5] += sw.Elapsed.TotalMilliseconds;
                sw.Restart(); DistanceEstimator.EstimateDistance(star, cl.Class, pe.PeriodDays, pe.PeriodErrDays, fit.Fits, settings.Distance); t[6] += sw.Elapsed.TotalMilliseconds;
            }
        int n = list.Count * s.Rounds;
        string[] names = ["clean", "times", "period search", "refine+PDM", "fit+clip", "classify", "distance"];
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"demo stars: {list.Count}, mean points per star: {list.Average(x => obs[x.Name].Count):F0}, kernel: {PulseLadder.Kernels.Periodogram.GlsVariantName}"));
        for (int i = 0; i < names.Length; i++) Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {names[i],-14} {t[i] / n,8:F2} ms/star"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {"sum",-14} {t.Sum() / n,8:F2} ms/star"));

        sw.Restart();
        for (int round = 0; round < s.Rounds; round++) foreach (var star in list) AnalysisPipeline.Run(star, obs[star.Name], settings);
        double one = n / sw.Elapsed.TotalSeconds;
        sw.Restart();
        for (int round = 0; round < s.Rounds; round++) Parallel.ForEach(list, star => AnalysisPipeline.Run(star, obs[star.Name], settings));
        double all = n / sw.Elapsed.TotalSeconds;
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"whole pipeline: {one:F1} stars/s on one thread, {all:F1} stars/s on {Environment.ProcessorCount} cores"));
        return 0;
    }
}
