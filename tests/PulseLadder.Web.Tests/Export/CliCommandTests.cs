using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using System.Xml.Linq;
using Dapper;
using PulseLadder.Cli;
using Spectre.Console;

namespace PulseLadder.Web.Tests.Export;

/// <summary>Runs the real `pulseladder` command tree in-process against an in-process server (the ServerClient over the test HttpClient).</summary>
internal sealed class InProcessServer(HttpClient http) : IServerClientFactory
{
    public ServerClient Create(string server, string? token) => new(http);

    /// <summary>Runs the command line; returns the exit code and what it wrote to standard output and error.</summary>
    public (int Code, string Out, string Err) Run(params string[] args)
    {
        var (oldOut, oldErr, oldAnsi) = (Console.Out, Console.Error, AnsiConsole.Console);
        var o = new StringWriter();
        var e = new StringWriter();
        Console.SetOut(o);
        Console.SetError(e);
        AnsiConsole.Console = AnsiConsole.Create(new AnsiConsoleSettings { Ansi = AnsiSupport.No, ColorSystem = ColorSystemSupport.NoColors, Out = new AnsiConsoleOutput(o) });
        try
        {
            int code = CliApp.Create(this).Run(args);
            return (code, o.ToString(), e.ToString());
        }
        finally
        {
            Console.SetOut(oldOut);
            Console.SetError(oldErr);
            AnsiConsole.Console = oldAnsi;
        }
    }
}

/// <summary>
/// `export`, `reproduce` and `status` as a user runs them. The references are the server's own API answers (the CLI
/// must hand over exactly those bytes), the stored analysis (reproduce) and the database's pending count (status).
/// </summary>
[Collection(ExportCollection.Name)]
public sealed class CliCommandTests(ExportFixture fx)
{
    private InProcessServer Cli => new(fx.App.Client);

    private string OutFile(string ext) => Path.Combine(fx.App.DataDir, "cli-" + Guid.NewGuid().ToString("N") + ext);

    [Theory]
    [InlineData("csv")]
    [InlineData("json")]
    [InlineData("votable")]
    public async Task Export_WritesTheApisBytes_ForEachFormat(string format)
    {
        string path = OutFile("." + format);
        var (code, _, err) = Cli.Run("export", "--field", "test-field", "--format", format, "--out", path);
        Assert.True(code == 0, err);
        byte[] api = await fx.App.Client.GetByteArrayAsync($"/api/v1/fields/{fx.FieldId}/export?format={format}&accepted_only=false");
        Assert.Equal(api, await File.ReadAllBytesAsync(path));
        string text = Encoding.UTF8.GetString(api);
        switch (format)
        {
            case "csv": Assert.Equal(3, text.Split('\n', StringSplitOptions.RemoveEmptyEntries).Length); break;
            case "json": Assert.Equal(2, JsonDocument.Parse(api).RootElement.GetProperty("rows").GetArrayLength()); break;
            default:
                var distances = XDocument.Parse(text).Descendants().First(x => x.Name.LocalName == "TABLE");
                Assert.Equal(2, distances.Descendants().Count(x => x.Name.LocalName == "TR"));
                break;
        }
    }

    [Fact]
    public async Task Export_HonoursColumnsAndAcceptedOnly_WhenGiven()
    {
        string path = OutFile(".csv");
        var (code, _, err) = Cli.Run("export", "--field", fx.FieldId.ToString(System.Globalization.CultureInfo.InvariantCulture), "--columns", "star,period_days", "--accepted-only", "--out", path);
        Assert.True(code == 0, err);
        var lines = (await File.ReadAllTextAsync(path)).Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal("star,period_days", lines[0]);
        Assert.Equal("T-CEP-1", Assert.Single(lines[1..]).Split(',')[0]);   // the fixture accepted T-CEP-1 only
    }

    [Fact]
    public void Export_FailsNamingTheField_WhenItIsUnknown()
    {
        var (code, _, err) = Cli.Run("export", "--field", "no-such-field", "--out", OutFile(".csv"));
        Assert.Equal(1, code);
        Assert.Contains("no-such-field", err);
    }

    [Fact]
    public async Task ExportFigure_WritesPngAndSvg_ForPlAndLightCurve()
    {
        string png = OutFile(".png");
        var r = Cli.Run("export", "--figure", "pl", "--field", "test-field", "--format", "png", "--width", "500", "--height", "400", "--out", png);
        Assert.True(r.Code == 0, r.Err);
        byte[] bytes = await File.ReadAllBytesAsync(png);
        Assert.Equal([0x89, 0x50, 0x4E, 0x47], bytes[..4]);
        Assert.Equal(500, System.Buffers.Binary.BinaryPrimitives.ReadInt32BigEndian(bytes.AsSpan(16)));
        Assert.Equal(400, System.Buffers.Binary.BinaryPrimitives.ReadInt32BigEndian(bytes.AsSpan(20)));
        string svg = OutFile(".svg");
        r = Cli.Run("export", "--figure", "lightcurve", "--star", "T-CEP-1", "--format", "svg", "--out", svg);
        Assert.True(r.Code == 0, r.Err);
        var doc = XDocument.Load(svg);
        Assert.Contains(doc.Descendants(), x => x.Name.LocalName == "polyline");
        Assert.Equal(1, Cli.Run("export", "--figure", "lightcurve", "--format", "png").Code);   // no --star
    }

    [Fact]
    public void Reproduce_ExitsZeroReportingIdentical_OnTheStoredAnalysis()
    {
        var (code, output, err) = Cli.Run("reproduce", "T-CEP-1", "--data-dir", fx.App.DataDir);
        Assert.True(code == 0, output + err);
        Assert.Contains("identical: the rerun reproduces the stored analysis", output);
        Assert.Contains("period_days", output);
    }

    [Fact]
    public void Reproduce_ExitsOneListingTheDifference_WhenAStoredNumberWasTampered()
    {
        using var c = fx.App.Db.Open();
        long id = c.ExecuteScalar<long>("SELECT a.id FROM analyses a JOIN stars s ON s.id = a.star_id WHERE s.name = 'T-CEP-2' ORDER BY a.revision DESC LIMIT 1");
        double? mu = c.ExecuteScalar<double?>("SELECT distance_modulus FROM analyses WHERE id = @id", new { id });
        Assert.NotNull(mu);
        c.Execute("UPDATE analyses SET distance_modulus = @v WHERE id = @id", new { v = mu + 0.25, id });
        try
        {
            var (code, output, _) = Cli.Run("reproduce", "T-CEP-2", "--data-dir", fx.App.DataDir);
            Assert.Equal(1, code);
            Assert.Contains("1 difference(s):", output);
            Assert.Contains("distance_modulus: stored " + (mu + 0.25)!.Value.ToString("R", System.Globalization.CultureInfo.InvariantCulture), output);
        }
        finally
        {
            c.Execute("UPDATE analyses SET distance_modulus = @v WHERE id = @id", new { v = mu, id });
        }
        Assert.Equal(2, Cli.Run("reproduce", "NO-SUCH-STAR", "--data-dir", fx.App.DataDir).Code);
    }

    [Fact]
    public async Task Status_ReportsEveryStarAnalysed_AndEachField()
    {
        var (code, output, err) = Cli.Run("status");
        Assert.True(code == 0, err);
        var progress = await fx.App.Client.GetFromJsonAsync<JsonElement>("/api/v1/progress");
        long total = progress.GetProperty("stars_total").GetInt64();
        Assert.Contains($"{total} of {total} stars analysed", output);
        Assert.Contains("field test-field: 2 analysed, 1 accepted", output);
    }
}

/// <summary>`status` on a server with work still to do (no job server: nothing moves).</summary>
public sealed class CliStatusPendingTests
{
    [Fact]
    public async Task Status_ShowsProgressAndExitsOne_WhenStarsArePending()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        (await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList,
            [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 30) + Fixtures.Photometry("T-CEP-2", 11.2, 13.1, nights: 30, seed: 2).Split('\n', 2)[1])]))).EnsureSuccessStatusCode();
        var cli = new InProcessServer(t.Client);
        var (code, output, _) = cli.Run("status");
        Assert.Equal(1, code);
        Assert.Contains("0 of 2 stars analysed", output);
        // --wait draws the progress bar until the timeout passes.
        (code, output, _) = cli.Run("status", "--wait", "--timeout", "1");
        Assert.Equal(1, code);
        Assert.Contains("stars analysed", output);
        Assert.Contains("0%", output);
        var upload = cli.Run("status", "--upload", "1");
        Assert.Equal(1, upload.Code);
        Assert.Contains("0 of 2 stars analysed", upload.Out);
    }
}
