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

        [CommandOption("--epochs <N>"), Description("Reshape each star to its two best-sampled bands with N epochs each, evenly thinned (0: as generated). Issue 8's reference star is 300.")]
        public int Epochs { get; init; }
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
        if (s.Epochs > 0)
            foreach (var name in obs.Keys.ToList()) obs[name] = Reshape(obs[name], s.Epochs);
        var list = stars.Rows.Where(x => obs.ContainsKey(x.Name)).ToList();
        var settings = PipelineSettings.Default;

        foreach (var star in list) AnalysisPipeline.Run(star, obs[star.Name], settings);
        var t = new double[7];
        var kb = new double[7];
        var sw = new CpuClock();
        long gridSum = 0; int searches = 0, secondPass = 0;
        long a0 = 0;
        void Start() { a0 = GC.GetAllocatedBytesForCurrentThread(); sw.Restart(); }
        void Stop(int i) { t[i] += sw.ElapsedMs; kb[i] += (GC.GetAllocatedBytesForCurrentThread() - a0) / 1024.0; }
        int g0 = GC.CollectionCount(0), g2 = GC.CollectionCount(2);
        for (int round = 0; round < s.Rounds; round++)
            foreach (var star in list)
            {
                var o = obs[star.Name];
                Start(); var c = Cleaner.RejectUnusable(o, settings.Cleaning); Stop(0);
                Start(); var tm = BarycentricTime.ToBjdTdb(c.Kept, star.Position); Stop(1);
                Start(); var se = PeriodFinder.FindPeriods(tm.Points, star.DeclaredClass ?? PulsatorClass.Unknown, settings.PeriodSearch); Stop(2);
                gridSum += se.FrequencyCount; searches++;
                if (se.Notes.Contains("offsets_removed_second_pass")) secondPass++;
                if (se.Peaks.Count == 0) continue;
                Start(); var pe = PeriodFinder.RefinePeriod(tm.Points, se.Peaks[0].Frequency, se, settings.PeriodSearch); Stop(3);
                Start(); var fit = LightCurveFitter.FitBands(tm.Points, pe.PeriodDays, settings.Fit, settings.Cleaning); Stop(4);
                Start(); var cl = Classifier.Classify(star, pe, se, fit.Fits, null); Stop(5);
                Start(); DistanceEstimator.EstimateDistance(star, cl.Class, pe.PeriodDays, pe.PeriodErrDays, fit.Fits, settings.Distance); Stop(6);
            }
        int n = list.Count * s.Rounds;
        string[] names = ["clean", "times", "period search", "refine+PDM", "fit+clip", "classify", "distance"];
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"demo stars: {list.Count}, mean points per star: {list.Average(x => obs[x.Name].Count):F0}, kernel: {PulseLadder.Kernels.Periodogram.GlsVariantName}"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  mean grid {gridSum / (double)Math.Max(1, searches):F0} frequencies; searched twice (offsets removed): {100.0 * secondPass / Math.Max(1, searches):F0}% of stars"));
        for (int i = 0; i < names.Length; i++) Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {names[i],-14} {t[i] / n,8:F2} CPU ms/star {kb[i] / n,8:F0} KiB allocated/star"));
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {"sum",-14} {t.Sum() / n,8:F2} CPU ms/star {kb.Sum() / n,8:F0} KiB allocated/star; collections per 100 stars: gen0 {100.0 * (GC.CollectionCount(0) - g0) / n:F1}, gen2 {100.0 * (GC.CollectionCount(2) - g2) / n:F1}"));

        var wall = Stopwatch.StartNew();
        sw.Restart();
        for (int round = 0; round < s.Rounds; round++) foreach (var star in list) AnalysisPipeline.Run(star, obs[star.Name], settings);
        double cpuMs = sw.ElapsedMs;
        double one = n / wall.Elapsed.TotalSeconds;
        wall.Restart();
        for (int round = 0; round < s.Rounds; round++) Parallel.ForEach(list, star => AnalysisPipeline.Run(star, obs[star.Name], settings));
        double all = n / wall.Elapsed.TotalSeconds;
        Console.WriteLine(string.Create(CultureInfo.InvariantCulture, $"whole pipeline: {one:F1} stars/s on one thread, {all:F1} stars/s on {Environment.ProcessorCount} cores (wall clock); {cpuMs / n:F2} CPU ms/star on one thread ({CpuClock.Kind})"));
        return 0;
    }

    /// <summary>
    /// CPU time of the calling thread (Linux CLOCK_THREAD_CPUTIME_ID): on a machine shared with other work it moves far
    /// less than wall time. Falls back to a stopwatch elsewhere.
    /// </summary>
    internal sealed class CpuClock
    {
        private double _start;
        public static string Kind => OperatingSystem.IsLinux() ? "thread CPU time" : "wall clock";
        public void Restart() => _start = Now();
        public double ElapsedMs => Now() - _start;

        private static double Now()
        {
            if (!OperatingSystem.IsLinux()) return Stopwatch.GetTimestamp() * 1000.0 / Stopwatch.Frequency;
            clock_gettime(3, out var ts); // CLOCK_THREAD_CPUTIME_ID
            return ts.Sec * 1000.0 + ts.Nsec / 1e6;
        }

        [System.Runtime.InteropServices.StructLayout(System.Runtime.InteropServices.LayoutKind.Sequential)]
        private struct TimeSpec { public long Sec; public long Nsec; }

        [System.Runtime.InteropServices.DllImport("libc", SetLastError = false)]
        private static extern int clock_gettime(int clock, out TimeSpec ts);
    }

    /// <summary>The two bands with the most points, each thinned to <paramref name="epochs"/> points spread evenly over its time order.</summary>
    internal static List<Observation> Reshape(List<Observation> o, int epochs)
    {
        var bands = o.GroupBy(x => x.Band).OrderByDescending(g => g.Count()).ThenBy(g => g.Key, StringComparer.Ordinal).Take(2);
        var list = new List<Observation>();
        foreach (var g in bands)
        {
            var b = g.OrderBy(x => x.Time).ToList();
            if (b.Count <= epochs) { list.AddRange(b); continue; }
            for (int i = 0; i < epochs; i++) list.Add(b[(int)((long)i * b.Count / epochs)]);
        }
        return list;
    }
}
