using System.Diagnostics;
using System.Globalization;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;
using Dapper;
using PulseLadder.Core.Calibration;
using PulseLadder.Web.Export;

namespace PulseLadder.Web.Tests.Export;

[Collection(ExportCollection.Name)]
public sealed class ExportTests(ExportFixture fx)
{
    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    private async Task<JsonElement> JsonExport(string query = "") =>
        await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/export?format=json{query}");

    private async Task<string[][]> CsvExport(string query = "")
    {
        var text = await fx.App.Client.GetStringAsync($"/api/v1/fields/{fx.FieldId}/export?format=csv{query}");
        // The fixture's values hold no quoted commas (star names, class codes, numbers, relation ids).
        return text.Split('\n', StringSplitOptions.RemoveEmptyEntries).Select(l => l.Split(',')).ToArray();
    }

    [Fact]
    public async Task Export_CsvAndJsonCarrySameNumbers_ForEveryColumn()
    {
        var json = await JsonExport();
        var csv = await CsvExport();
        var head = csv[0];
        var cols = json.GetProperty("columns").EnumerateArray().Select(c => c.GetProperty("name").GetString()!).ToArray();
        Assert.Equal(cols, head);
        var rows = json.GetProperty("rows").EnumerateArray().ToList();
        Assert.Equal(2, rows.Count);
        Assert.Equal(rows.Count, csv.Length - 1);
        int numbersCompared = 0;
        for (int i = 0; i < rows.Count; i++)
        {
            for (int j = 0; j < head.Length; j++)
            {
                var v = rows[i].GetProperty(head[j]);
                string cell = csv[i + 1][j];
                switch (v.ValueKind)
                {
                    case JsonValueKind.Null: Assert.Equal("", cell); break;
                    case JsonValueKind.Number:
                        Assert.Equal(v.GetDouble(), double.Parse(cell, Inv));
                        numbersCompared++;
                        break;
                    default: Assert.Equal(v.GetString(), cell); break;
                }
            }
        }
        Assert.True(numbersCompared >= 20, $"only {numbersCompared} numbers compared");
        // The synthetic light curve was made with P = 5.37 d (Fixtures.Photometry): the export carries the fitted period.
        var cep1 = rows.Single(r => r.GetProperty("star").GetString() == "T-CEP-1");
        Assert.InRange(cep1.GetProperty("period_days").GetDouble(), 5.37 * 0.998, 5.37 * 1.002);
    }

    [Fact]
    public async Task Export_JsonNumbersEqualStoredRows_AndCarryMethods()
    {
        var json = await JsonExport();
        var stars = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/stars");
        foreach (var s in stars.GetProperty("items").EnumerateArray())
        {
            var row = json.GetProperty("rows").EnumerateArray().Single(r => r.GetProperty("star").GetString() == s.GetProperty("star").GetString());
            Assert.Equal(s.GetProperty("period_days").GetDouble(), row.GetProperty("period_days").GetDouble());
            Assert.Equal(s.GetProperty("mean_mag").GetProperty("V").GetDouble(), row.GetProperty("mean_mag_V").GetDouble());
            Assert.Equal(s.GetProperty("distance_modulus").GetDouble(), row.GetProperty("distance_modulus").GetDouble());
        }
        Assert.Contains("R_V", json.GetProperty("methods").GetString());
        Assert.Equal(Core.Pipeline.PipelineVersion.Current, json.GetProperty("pipeline_versions")[0].GetString());
        Assert.NotEmpty(json.GetProperty("relation_ids").EnumerateArray());
    }

    [Fact]
    public async Task Export_SelectsColumnsInGivenOrder_AndHonoursAcceptedOnly()
    {
        var csv = await CsvExport("&accepted_only=true&columns=distance_modulus,star,mean_mag_I");
        Assert.Equal(["distance_modulus", "star", "mean_mag_I"], csv[0]);
        Assert.Single(csv[1..]);
        Assert.Equal("T-CEP-1", csv[1][1]);
        var json = await JsonExport("&columns=star,period_days");
        var row = json.GetProperty("rows")[0];
        Assert.Equal(["star", "period_days"], row.EnumerateObject().Select(p => p.Name).ToArray());
    }

    [Theory]
    [InlineData("csv")]
    [InlineData("votable")]
    public async Task Export_Returns400NamingTheColumn_WhenAColumnIsUnknown(string format)
    {
        var resp = await fx.App.Client.GetAsync($"/api/v1/fields/{fx.FieldId}/export?format={format}&columns=star,perod_days");
        Assert.Equal(HttpStatusCode.BadRequest, resp.StatusCode);
        Assert.Equal("application/problem+json", resp.Content.Headers.ContentType?.MediaType);
        var body = await resp.Content.ReadFromJsonAsync<JsonElement>();
        Assert.Contains("'perod_days'", body.GetProperty("detail").GetString());
    }

    [Fact]
    public async Task ExportCampaign_HoldsEveryFieldsRows()
    {
        var json = await fx.App.Client.GetFromJsonAsync<JsonElement>("/api/v1/export?format=json&columns=star,field");
        Assert.Equal(["T-CEP-1", "T-CEP-2"], json.GetProperty("rows").EnumerateArray().Select(r => r.GetProperty("star").GetString()!).Order().ToArray());
        Assert.Equal("campaign", json.GetProperty("title").GetString());
    }

    [Fact]
    public async Task Methods_NamesRelationSourceAndRv_OfTheStoredResults()
    {
        var text = await fx.App.Client.GetStringAsync($"/api/v1/fields/{fx.FieldId}/methods");
        var json = await JsonExport("&accepted_only=true");
        string relationId = json.GetProperty("relation_ids")[0].GetString()!;
        Assert.True(CalibrationRegistry.Embedded.TryGet(relationId, out var rel));
        // The relation's published source is the registry's entry (src/PulseLadder.Core/Data/calibration/relations.csv).
        Assert.Contains(rel.Source, text);
        Assert.Contains(relationId, text);
        // R_V = 3.1 is the stored DistanceSettings default (Cardelli et al. 1989 diffuse-ISM value, common practice).
        Assert.Contains("R_V = 3.1", text);
        Assert.Contains("Cardelli, Clayton & Mathis (1989", text);
        Assert.Contains("BJD_TDB", text);
        Assert.Contains("Photometry of 1 star ", text);
        Assert.Contains("oversampled by a factor 5", text);
    }

    private const string ReadVoTable = """
        import json, sys
        import numpy as np
        from astropy.io.votable import parse
        vot = parse(sys.argv[1], verify='exception')
        t = vot.get_first_table()
        out = {'version': vot.version, 'fields': [], 'params': {p.name: str(p.value) for p in t.params}, 'rows': []}
        for f in t.fields:
            out['fields'].append({'name': f.name, 'unit': None if f.unit is None else str(f.unit), 'ucd': f.ucd, 'datatype': f.datatype})
        for i in range(len(t.array)):
            row = {}
            for f in t.fields:
                v = t.array[f.name][i]
                if np.ma.is_masked(v): row[f.name] = None
                elif isinstance(v, (float, np.floating)): row[f.name] = None if np.isnan(v) else float(v)
                else: row[f.name] = str(v)
            out['rows'].append(row)
        out['methods'] = [i.value for i in vot.resources[0].infos if i.name == 'methods']
        out['colnames'] = list(t.to_table().colnames)
        print(json.dumps(out))
        """;

    [Fact]
    public async Task Export_VoTableIsReadByAstropy_WithNamesUnitsUcdsAndValues()
    {
        const string python = "/usr/bin/python3";
        Assert.True(File.Exists(python), "Debian's /usr/bin/python3 with python3-astropy is required to check VOTable exports (apt-get install python3-astropy)");
        var bytes = await fx.App.Client.GetByteArrayAsync($"/api/v1/fields/{fx.FieldId}/export?format=votable");
        var expected = await JsonExport();
        string path = Path.Combine(fx.App.DataDir, "export-test.vot");
        await File.WriteAllBytesAsync(path, bytes);
        var psi = new ProcessStartInfo(python) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add("-c");
        psi.ArgumentList.Add(ReadVoTable);
        psi.ArgumentList.Add(path);
        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        Assert.True(p.ExitCode == 0, $"astropy could not read the VOTable (is python3-astropy installed?): {await stderr}");
        var got = JsonDocument.Parse(await stdout).RootElement;

        Assert.Equal("1.4", got.GetProperty("version").GetString());
        // astropy's Table conversion keys columns by FIELD name (no ID attributes are written).
        Assert.Equal(expected.GetProperty("columns").EnumerateArray().Select(c => c.GetProperty("name").GetString()!).ToArray(),
            got.GetProperty("colnames").EnumerateArray().Select(c => c.GetString()!).ToArray());
        var fields = got.GetProperty("fields").EnumerateArray().ToDictionary(f => f.GetProperty("name").GetString()!);
        Assert.Equal(expected.GetProperty("columns").EnumerateArray().Select(c => c.GetProperty("name").GetString()).ToArray(), fields.Keys.ToArray());
        // astropy's Unit strings for the VOUnits d, mag, pc and deg.
        Assert.Equal("d", fields["period_days"].GetProperty("unit").GetString());
        Assert.Equal("mag", fields["mean_mag_V"].GetProperty("unit").GetString());
        Assert.Equal("mag", fields["distance_modulus"].GetProperty("unit").GetString());
        Assert.Equal("pc", fields["distance_pc"].GetProperty("unit").GetString());
        Assert.Equal("deg", fields["ra_deg"].GetProperty("unit").GetString());
        Assert.Equal(JsonValueKind.Null, fields["star"].GetProperty("unit").ValueKind);
        Assert.Equal("meta.id;meta.main", fields["star"].GetProperty("ucd").GetString());
        Assert.Equal("pos.eq.ra;meta.main", fields["ra_deg"].GetProperty("ucd").GetString());
        Assert.Equal("phot.mag;em.opt.V", fields["mean_mag_V"].GetProperty("ucd").GetString());
        Assert.Equal(Core.Pipeline.PipelineVersion.Current, got.GetProperty("params").GetProperty("pipeline_version").GetString());
        Assert.Contains("R_V", got.GetProperty("methods")[0].GetString());

        var rows = got.GetProperty("rows").EnumerateArray().ToList();
        Assert.Equal(2, rows.Count);
        foreach (var want in expected.GetProperty("rows").EnumerateArray())
        {
            var row = rows.Single(r => r.GetProperty("star").GetString() == want.GetProperty("star").GetString());
            foreach (var col in new[] { "period_days", "mean_mag_V", "mean_mag_I", "distance_modulus", "distance_pc", "ra_deg", "fap" })
            {
                var w = want.GetProperty(col);
                if (w.ValueKind == JsonValueKind.Null) Assert.Equal(JsonValueKind.Null, row.GetProperty(col).ValueKind);
                else Assert.Equal(w.GetDouble(), row.GetProperty(col).GetDouble());
            }
            Assert.Equal(want.GetProperty("relation_id").ValueKind == JsonValueKind.Null ? "" : want.GetProperty("relation_id").GetString(), row.GetProperty("relation_id").GetString());
        }
    }

    [Fact]
    public void Reproduce_ReportsNoDifference_OnTheStoredAnalysis()
    {
        var r = Reproduction.Run(fx.App.Db, "T-CEP-1");
        Assert.Null(r.FailureReason);
        Assert.True(r.Identical, string.Join("; ", r.Differences.Select(d => $"{d.Quantity}: {d.Stored} vs {d.Rerun}")));
        Assert.Equal(r.StoredInputHash, r.RerunInputHash);
        Assert.Contains(r.KeyNumbers, k => k.Quantity == "period_days");
    }

    [Fact]
    public void Reproduce_ReportsTheDifference_WhenAStoredNumberWasTampered()
    {
        using var c = fx.App.Db.Open();
        long id = c.ExecuteScalar<long>("SELECT a.id FROM analyses a JOIN stars s ON s.id = a.star_id WHERE s.name = 'T-CEP-2' ORDER BY a.revision DESC LIMIT 1");
        double p = c.ExecuteScalar<double>("SELECT period_days FROM analyses WHERE id = @id", new { id });
        c.Execute("UPDATE analyses SET period_days = @v WHERE id = @id", new { v = p + 0.001, id });
        try
        {
            var r = Reproduction.Run(fx.App.Db, "T-CEP-2");
            Assert.False(r.Identical);
            var d = Assert.Single(r.Differences);
            Assert.Equal("period_days", d.Quantity);
            Assert.Equal((p + 0.001).ToString("R", Inv), d.Stored);
            Assert.Equal(p.ToString("R", Inv), d.Rerun);
        }
        finally
        {
            c.Execute("UPDATE analyses SET period_days = @v WHERE id = @id", new { v = p, id });
        }
    }

    [Fact]
    public void Reproduce_ReportsInputHashDifference_WhenAnObservationChanged()
    {
        using var c = fx.App.Db.Open();
        long obs = c.ExecuteScalar<long>("SELECT o.id FROM observations o JOIN stars s ON s.id = o.star_id WHERE s.name = 'T-CEP-2' ORDER BY o.id LIMIT 1");
        double mag = c.ExecuteScalar<double>("SELECT mag FROM observations WHERE id = @obs", new { obs });
        c.Execute("UPDATE observations SET mag = @m WHERE id = @obs", new { m = mag + 0.5, obs });
        try
        {
            var r = Reproduction.Run(fx.App.Db, "T-CEP-2");
            Assert.Contains(r.Differences, d => d.Quantity == "input_hash");
            Assert.NotEqual(r.StoredInputHash, r.RerunInputHash);
        }
        finally
        {
            c.Execute("UPDATE observations SET mag = @m WHERE id = @obs", new { m = mag, obs });
        }
    }

    [Fact]
    public void Reproduce_FailsWithReason_WhenTheStarIsUnknown()
    {
        var r = Reproduction.Run(fx.App.Db, "NO-SUCH-STAR");
        Assert.Equal("unknown_star", r.FailureReason);
        Assert.False(r.Identical);
    }
}

[Collection(ExportCollection.Name)]
public sealed class ReproduceOverrideTests
{
    [Fact]
    public async Task Reproduce_ReportsNoDifference_WhenAReviewerChoseThePeriod()
    {
        await using var t = await TestApp.StartAsync();
        (await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("n.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9))]))).EnsureSuccessStatusCode();
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        // A period slightly off the best peak, as a reviewer might choose it: the rerun must honour the stored override.
        (await t.Client.PostAsJsonAsync("/api/v1/stars/1/decisions", new { action = "choose_period", period_days = 5.371, by = "test" })).EnsureSuccessStatusCode();
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var r = Reproduction.Run(t.Db, "T-CEP-1");
        Assert.True(r.Identical, string.Join("; ", r.Differences.Select(d => $"{d.Quantity}: {d.Stored} vs {d.Rerun}")));
        Assert.Equal(2, r.Revision);
        // Without the stored override the pipeline would pick its own period: the override really is replayed.
        Assert.Contains(r.KeyNumbers, k => k.Quantity == "period_days");
        using var c = t.Db.Open();
        Assert.Equal(5.371, Dapper.SqlMapper.ExecuteScalar<double>(c, "SELECT chosen_period_days FROM stars WHERE id = 1"));
    }
}

[Collection(ExportCollection.Name)]
public sealed class FigureTests(ExportFixture fx)
{
    [Fact]
    public async Task PlFigure_IsWellFormedSvg_WithOnePointPerStarWithADistance()
    {
        var svg = await fx.App.Client.GetStringAsync($"/api/v1/fields/{fx.FieldId}/figures/pl.svg?accepted_only=false");
        var doc = System.Xml.Linq.XDocument.Parse(svg);
        System.Xml.Linq.XNamespace ns = "http://www.w3.org/2000/svg";
        Assert.Equal(ns + "svg", doc.Root!.Name);
        var json = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/export?format=json&columns=star,distance_modulus,relation_id");
        var withDistance = json.GetProperty("rows").EnumerateArray().Where(r => r.GetProperty("distance_modulus").ValueKind == JsonValueKind.Number).ToList();
        Assert.NotEmpty(withDistance);
        var stars = doc.Descendants(ns + "g").Where(g => (string?)g.Attribute("class") == "star").ToList();
        Assert.Equal(withDistance.Count, stars.Count);
        foreach (var r in withDistance)
            Assert.Contains(stars, g => g.Element(ns + "title")!.Value.StartsWith(r.GetProperty("star").GetString() + ":", StringComparison.Ordinal));
        Assert.Single(doc.Descendants(ns + "line"), l => (string?)l.Attribute("class") == "relation");
        Assert.Contains(withDistance[0].GetProperty("relation_id").GetString()!, svg);
    }

    [Fact]
    public async Task LightCurveFigure_DrawsEveryUsedObservationTwice_AndOneFitPerBand()
    {
        var stars = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/stars");
        long id = stars.GetProperty("items").EnumerateArray().Single(s => s.GetProperty("star").GetString() == "T-CEP-1").GetProperty("star_id").GetInt64();
        var detail = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/stars/{id}");
        int used = detail.GetProperty("observations").EnumerateArray().Count(o => o.GetProperty("used").GetBoolean());
        int fits = detail.GetProperty("result").GetProperty("fits").GetArrayLength();
        var svg = await fx.App.Client.GetStringAsync($"/api/v1/stars/{id}/figures/lightcurve.svg");
        var doc = System.Xml.Linq.XDocument.Parse(svg);
        System.Xml.Linq.XNamespace ns = "http://www.w3.org/2000/svg";
        Assert.Equal(2 * used, doc.Descendants(ns + "circle").Count(e => (string?)e.Attribute("class") == "point"));
        Assert.Equal(fits, doc.Descendants(ns + "polyline").Count(e => (string?)e.Attribute("class") == "fit"));
        Assert.Equal(["I", "V"], doc.Descendants(ns + "g").Select(g => (string?)g.Attribute("data-band")).OfType<string>().ToArray());
    }
}
