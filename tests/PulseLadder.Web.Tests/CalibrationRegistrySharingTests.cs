using PulseLadder.Core.Calibration;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.Web.Tests;

/// <summary>
/// The calibration folder as web host and workers read it (docs/calibrations.md, "the calibration folder"): the same
/// files give the same registry hash, the web host records its hash, a worker compares with it and refuses bad files.
/// Expected values are the contract's own invariants (file/line/field naming, hash equality).
/// </summary>
public sealed class CalibrationRegistrySharingTests
{
    private const string Header = "id,family,class,kind,mag,color1,color2,wesenheit_r,a,a_err,b,b_err,p0,gamma,gamma_err,metallicity_scale,z_ref,feh_default,feh_default_err,alpha_fe,scatter,logp_min,logp_max,period_mode,anchor,source,table,tag,notes";
    private static string Row(string id, string mag = "K") => $"{id},team,dcep_f,absolute,{mag},,,,-5.61,0.03,-3.32,0.12,1,0,0,feh,0,0,0,0,0.11,0.4,1.6,F,hst_fgs_parallax,Team (test),,X,";

    private static string NewFolder()
    {
        var d = Path.Combine(Path.GetTempPath(), "plx-web-tests", Guid.NewGuid().ToString("N"), "calibrations");
        Directory.CreateDirectory(d);
        return d;
    }

    [Fact]
    public void LoadFolder_GivesSameHash_ForSameFiles_AndNamesSecondFileOnDuplicateId()
    {
        string a = NewFolder(), b = NewFolder();
        foreach (var d in new[] { a, b })
        {
            File.WriteAllText(Path.Combine(d, "1-team.csv"), Header + "\n" + Row("team_k") + "\n");
            File.WriteAllText(Path.Combine(d, "2-more.csv"), Header + "\n# comment\n" + Row("team_v", "V") + "\n");
        }
        var ra = Calibrations.LoadFolder(a);
        var rb = Calibrations.LoadFolder(b);
        Assert.True(ra.Ok, string.Join("; ", ra.Errors));
        Assert.Equal(ra.Registry.Hash, rb.Registry.Hash);
        Assert.NotEqual(CalibrationRegistry.Embedded.Hash, ra.Registry.Hash);
        Assert.Equal(["1-team.csv", "2-more.csv"], ra.Registry.UserFiles);
        Assert.True(ra.Registry.TryGet("team_v", out var v) && v.UserSupplied && v.UserFile == "2-more.csv");
        Assert.Equal(CalibrationRegistry.Embedded.Relations.Count + 2, ra.Registry.Relations.Count);
        // No folder: the embedded registry, unchanged.
        Assert.Equal(CalibrationRegistry.Embedded.Hash, Calibrations.LoadFolder(Path.Combine(a, "missing")).Registry.Hash);

        // One changed coefficient changes the hash.
        File.WriteAllText(Path.Combine(b, "2-more.csv"), Header + "\n# comment\n" + Row("team_v", "V").Replace("-5.61", "-5.62") + "\n");
        Assert.NotEqual(ra.Registry.Hash, Calibrations.LoadFolder(b).Registry.Hash);

        // An id defined in two files: the second file's line 2 is named.
        File.WriteAllText(Path.Combine(b, "3-dup.csv"), Header + "\n" + Row("team_k") + "\n");
        var dup = Calibrations.LoadFolder(b);
        var e = Assert.Single(dup.Errors);
        Assert.Equal("3-dup.csv, line 2, field 'id': 'team_k' is already defined", e.ToString());
    }

    [Fact]
    public void WorkerHost_RefusesToStart_WhenCalibrationFileIsBad()
    {
        string d = NewFolder();
        File.WriteAllText(Path.Combine(d, "bad.csv"), Header + "\n" + Row("bad_band", "Q") + "\n");
        // The folder is read before the database is touched: port 1 is never connected to.
        var ex = Assert.Throws<InvalidOperationException>(() => WorkerHost.Build(
            ["--PulseLadder:Database", "postgres:Host=127.0.0.1;Port=1;Username=u;Database=d", "--PulseLadder:Jobs:Storage", "postgres",
             "--" + Calibrations.Setting, d]));
        Assert.Contains("bad.csv, line 2, field 'mag': 'Q' is not a known band", ex.Message);
        Assert.Contains(Calibrations.Setting, ex.Message);
    }

    [Fact]
    public async Task WebHost_RecordsRegistryHash_AndWorkerComparisonWarnsOnDifference()
    {
        string cal = NewFolder();
        string dataDir = Path.GetDirectoryName(cal)!;
        File.WriteAllText(Path.Combine(cal, "team.csv"), Header + "\n" + Row("team_k") + "\n");
        var same = Calibrations.LoadFolderOrThrow(cal);
        await using (var t = await TestApp.StartAsync(dataDir, runJobs: false))
        {
            using (var c = t.Db.Open())
            {
                var rec = AuditStore.LatestOfAction(c, Calibrations.AuditAction);
                Assert.NotNull(rec);
                Assert.Equal(same.Hash, rec!.Subject);
                Assert.Contains("team.csv", rec.Detail);
            }
            Assert.Null(Calibrations.CompareWithWebHost(t.Db, same));
            var warning = Calibrations.CompareWithWebHost(t.Db, CalibrationRegistry.Embedded);
            Assert.NotNull(warning);
            Assert.Contains(same.Hash[..12], warning);
            Assert.Contains(CalibrationRegistry.Embedded.Hash[..12], warning);
        }
        // A restart with the same files adds no entry; with changed files it records the new hash.
        await using (var t = await TestApp.StartAsync(dataDir, runJobs: false))
        {
            using var c = t.Db.Open();
            Assert.Single(AuditStore.Recent(c, 100), r => r.Action == Calibrations.AuditAction);
        }
        File.Delete(Path.Combine(cal, "team.csv"));
        await using (var t = await TestApp.StartAsync(dataDir, runJobs: false))
        {
            using var c = t.Db.Open();
            Assert.Equal(CalibrationRegistry.Embedded.Hash, AuditStore.LatestOfAction(c, Calibrations.AuditAction)!.Subject);
        }
    }
}
