using PulseLadder.Core.Photometry;
using PulseLadder.Demo;
using PulseLadder.Storage;
using PulseLadder.Web;

namespace PulseLadder.Cli;

/// <summary>Loads the demo campaign through the same parsers and writer as a real upload.</summary>
public static class DemoLoader
{
    /// <summary>Returns the number of stars queued, or 0 when the database already holds stars.</summary>
    public static int LoadIfEmpty(Database db, TimeProvider clock)
    {
        using (var c = db.Open())
            if (StarStore.IdsByName(c).Count > 0) return 0;
        string dir = Path.Combine(Path.GetTempPath(), "pulseladder-demo-" + Guid.NewGuid().ToString("N"));
        try
        {
            DemoCampaign.WriteTo(dir, new DemoOptions());
            return LoadFolder(db, clock, dir);
        }
        finally
        {
            try { Directory.Delete(dir, recursive: true); } catch (IOException) { }
        }
    }

    /// <summary>Stores stars.csv and photometry-*.csv of a demo folder (times jd_utc minus 2450000).</summary>
    public static int LoadFolder(Database db, TimeProvider clock, string dir)
    {
        var starsFile = new IncomingFile("stars.csv", File.ReadAllBytes(Path.Combine(dir, "stars.csv")));
        var (sha, stars) = UploadParsing.ReadStars(starsFile);
        if (!stars.IsSuccess) throw new InvalidOperationException("Demo star list is invalid: " + string.Join("; ", stars.Errors.Take(5)));
        var known = stars.Rows.Select(s => s.Name).ToHashSet(StringComparer.Ordinal);
        var photometry = new List<PhotometryFile>();
        foreach (var path in Directory.GetFiles(dir, "photometry-*.csv").Order(StringComparer.Ordinal))
        {
            var f = new IncomingFile(Path.GetFileName(path), File.ReadAllBytes(path));
            var parsed = UploadParsing.ReadPhotometry(f, TimeScale.JdUtc, DemoCampaign.TimeOffset, known, null, null, null, int.MaxValue);
            if (!parsed.Result.IsSuccess) throw new InvalidOperationException($"Demo photometry {f.FileName} is invalid: " + string.Join("; ", parsed.Result.Errors.Take(5)));
            photometry.Add(new PhotometryFile(f.FileName, parsed.Sha256, TimeScale.JdUtc, DemoCampaign.TimeOffset, parsed.Result.Rows));
        }
        var outcome = UploadWriter.Store(db, new StarListFile("stars.csv", sha, stars.Rows), photometry, "demo", clock);
        return outcome.StarsToAnalyse.Count;
    }
}
