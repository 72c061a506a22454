using System.Globalization;
using System.Net;
using System.Text;
using System.Text.Json;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Storage;

namespace PulseLadder.Web.Tests;

// ValidatePhotometry checks duplicates with the latest time per group and a second reading for groups that go back
// in time; it must report exactly what the one-reading full index (ReadPhotometry) reports. Random files: common practice.
public class SpooledValidationTests
{
    private static string RandomFile(int seed, int rows)
    {
        var rng = new Random(seed);
        var sb = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        var last = new Dictionary<(int, int, int), double>();
        for (int i = 0; i < rows; i++)
        {
            int star = rng.Next(3), band = rng.Next(2), obs = rng.Next(3);
            last.TryGetValue((star, band, obs), out double t);
            // Mostly increasing times; sometimes a repeat of the latest, an earlier time, or a random one.
            double time = rng.Next(10) switch
            {
                0 => t,
                1 => Math.Max(0, t - rng.Next(1, 4)),
                2 => rng.Next(0, 30),
                _ => t + rng.Next(1, 3),
            };
            last[(star, band, obs)] = Math.Max(t, time);
            string mag = rng.Next(40) == 0 ? "bad" : "12.5";
            sb.Append(CultureInfo.InvariantCulture, $"S{star},{11000 + time:F1},{(band == 0 ? "V" : "I")},{mag},0.01,{(obs == 0 ? "" : "o" + obs)}\n");
        }
        return sb.ToString();
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(4)]
    [InlineData(5)]
    public void ValidatePhotometry_ReportsWhatTheFullIndexReports(int seed)
    {
        string text = RandomFile(seed, 400);
        byte[] bytes = Encoding.UTF8.GetBytes(text);
        string path = Path.GetTempFileName();
        try
        {
            File.WriteAllBytes(path, bytes);
            var known = new HashSet<string> { "S0", "S1", "S2" };
            var full = UploadParsing.ReadPhotometry(new IncomingFile("r.csv", bytes), TimeScale.JdUtc, 2450000, known, null, null, "site", 1_000_000);
            var spooled = new SpooledFile("r.csv", path, ContentHash.Sha256Hex(bytes), bytes.Length);
            var light = UploadParsing.ValidatePhotometry(spooled, TimeScale.JdUtc, 2450000, known, null, null, "site", 1_000_000);
            Assert.Contains(full.Result.Errors, e => e.Code == IngestIssueCode.DuplicateRow);
            Assert.Equal(full.Result.Errors.Select(e => (e.Line, e.Column, e.Message)), light.Summary.Errors.Select(e => (e.Line, e.Column, e.Message)));
            Assert.Equal(full.Result.Summary.AcceptedRows, light.Summary.AcceptedRows);
            Assert.Equal(full.Result.Summary.RejectedRows, light.Summary.RejectedRows);
            Assert.Empty(light.Summary.OutOfOrderGroups);
            Assert.Equal(full.Result.Rows.Take(10).Select(r => r.Line), light.Preview.Select(r => r.Line));
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Theory]
    [InlineData(11)]
    [InlineData(12)]
    public void KeptRows_AreWhatTheSecondReadingStores_AndWhatTheFullIndexAccepts(int seed)
    {
        // A clean file (no bad values, no repeats) with groups going back in time, so validation reads it twice.
        var rng = new Random(seed);
        var sb = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        for (int i = 0; i < 3000; i++)
            sb.Append(CultureInfo.InvariantCulture, $"S{rng.Next(3)},{11000 + i * 0.01 + (rng.Next(50) == 0 ? -5 - 0.000001 * i : 0):F6},{(rng.Next(2) == 0 ? "V" : "I")},{12 + rng.NextDouble():F3},0.01,o{rng.Next(3)}\n");
        byte[] bytes = Encoding.UTF8.GetBytes(sb.ToString());
        string path = Path.GetTempFileName();
        try
        {
            File.WriteAllBytes(path, bytes);
            var known = new HashSet<string> { "S0", "S1", "S2" };
            var full = UploadParsing.ReadPhotometry(new IncomingFile("k.csv", bytes), TimeScale.JdUtc, 2450000, known, null, null, null, 1_000_000);
            Assert.True(full.Result.Summary.IsSuccess);
            var spooled = new SpooledFile("k.csv", path, ContentHash.Sha256Hex(bytes), bytes.Length);
            var kept = UploadParsing.ValidatePhotometry(spooled, TimeScale.JdUtc, 2450000, known, null, null, null, 1_000_000, keepRows: true);
            var streamedOnly = UploadParsing.ValidatePhotometry(spooled, TimeScale.JdUtc, 2450000, known, null, null, null, 1_000_000);
            Assert.NotNull(kept.Rows);
            Assert.Null(streamedOnly.Rows);
            var fromMemory = new List<PhotometryRow>();
            var fromFile = new List<PhotometryRow>();
            UploadParsing.StreamPhotometry(kept, TimeScale.JdUtc, 2450000, known, null, null, null, 1_000_000, b => fromMemory.AddRange(b));
            UploadParsing.StreamPhotometry(streamedOnly, TimeScale.JdUtc, 2450000, known, null, null, null, 1_000_000, b => fromFile.AddRange(b));
            Assert.Equal(full.Result.Rows.Count, fromMemory.Count);
            Assert.Equal(fromFile, fromMemory);
            Assert.Equal(full.Result.Rows.Select(r => (r.Line, r.Star, r.Observation.Time, r.Observation.Mag)),
                fromMemory.Select(r => (r.Line, r.Star, r.Observation.Time, r.Observation.Mag)));
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void StreamPhotometry_Refuses_WhenTheFileDidNotValidate()
    {
        string text = "star,time,band,mag,mag_err\nS1,11000.5,V,12,0.01\nS1,11000.5,V,12,0.01\n";
        byte[] bytes = Encoding.UTF8.GetBytes(text);
        string path = Path.GetTempFileName();
        try
        {
            File.WriteAllBytes(path, bytes);
            var spooled = new SpooledFile("d.csv", path, ContentHash.Sha256Hex(bytes), bytes.Length);
            var v = UploadParsing.ValidatePhotometry(spooled, TimeScale.JdUtc, 2450000, null, null, null, null, 100);
            Assert.False(v.Summary.IsSuccess);
            Assert.Throws<InvalidOperationException>(() =>
                UploadParsing.StreamPhotometry(v, TimeScale.JdUtc, 2450000, null, null, null, null, 100, _ => { }));
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public async Task Upload_IsRefusedNamingBothLines_AndStoresNothing_WhenAnOutOfOrderRowRepeatsAnEarlierOne()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        // T-CEP-1/V goes back at line 4; line 5 repeats line 2, which only the second reading's full index can see.
        string phot = "star,time,band,mag,mag_err\nT-CEP-1,11000.5,V,13.9,0.02\nT-CEP-1,11002.5,V,13.8,0.02\n" +
                      "T-CEP-1,11001.5,V,13.7,0.02\nT-CEP-1,11000.5,V,13.6,0.02\nT-CEP-2,11000.5,V,13.6,0.02\n";
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("dup.csv", phot)]));
        Assert.Equal(HttpStatusCode.BadRequest, resp.StatusCode);
        using var body = JsonDocument.Parse(await resp.Content.ReadAsStringAsync());
        var e = Assert.Single(body.RootElement.GetProperty("errors").EnumerateArray());
        Assert.Equal("dup.csv", e.GetProperty("file").GetString());
        Assert.Equal(5, e.GetProperty("line").GetInt64());
        Assert.Equal("duplicate of line 2 (same star, time, band and observer)", e.GetProperty("message").GetString());
        using var c = t.Db.Open();
        Assert.Equal(0, ObservationStore.Count(c));
    }
}
