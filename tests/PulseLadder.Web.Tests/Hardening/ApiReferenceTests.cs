using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;

namespace PulseLadder.Web.Tests.Hardening;

/// <summary>
/// The browsable API reference (wwwroot/api.html) and the API's stable surface. The reference is the service's own
/// OpenAPI document (/openapi/v1.json, OpenAPI 3.1); the page's grouping code is run under node (Debian's nodejs).
/// </summary>
public sealed class ApiReferenceTests
{
    private static readonly string[] Methods = ["get", "post", "put", "patch", "delete", "head", "options"];

    private static List<(string Method, string Path)> Operations(JsonElement doc) =>
        doc.GetProperty("paths").EnumerateObject()
            .SelectMany(p => p.Value.EnumerateObject().Where(m => Methods.Contains(m.Name)).Select(m => (Method: m.Name, Path: p.Name)))
            .OrderBy(o => o.Path, StringComparer.Ordinal).ThenBy(o => o.Method, StringComparer.Ordinal).ToList();

    [Fact]
    public async Task ApiPage_ListsEveryOperationOfTheOpenApiDocument_GroupedWithTypes()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        using var page = await t.Client.GetAsync("/api.html");
        Assert.Equal(HttpStatusCode.OK, page.StatusCode);
        Assert.Equal("text/html", page.Content.Headers.ContentType?.MediaType);
        string html = await page.Content.ReadAsStringAsync();
        Assert.Contains("<script type=\"module\" src=\"js/apiref.js\"></script>", html);
        Assert.DoesNotContain("http://", html.Replace("http://www.w3.org", "", StringComparison.Ordinal), StringComparison.Ordinal);   // no CDN
        Assert.DoesNotContain("https://", html, StringComparison.Ordinal);
        string main = await t.Client.GetStringAsync("/js/apiref.js");
        Assert.Contains("from './apiref-model.js'", main);
        string model = await t.Client.GetStringAsync("/js/apiref-model.js");
        string docText = await t.Client.GetStringAsync("/openapi/v1.json");
        var doc = JsonDocument.Parse(docText).RootElement;
        var expected = Operations(doc);
        Assert.True(expected.Count >= 20, $"only {expected.Count} operations");

        string dir = Path.Combine(t.DataDir, "apiref");
        Directory.CreateDirectory(dir);
        await File.WriteAllTextAsync(Path.Combine(dir, "apiref-model.mjs"), model);
        await File.WriteAllTextAsync(Path.Combine(dir, "openapi.json"), docText);
        await File.WriteAllTextAsync(Path.Combine(dir, "run.mjs"), """
            import { readFileSync } from 'node:fs';
            import { groups, typeText } from './apiref-model.mjs';
            const doc = JSON.parse(readFileSync(new URL('./openapi.json', import.meta.url)));
            const out = groups(doc).map(([name, ops]) => ({ name, ops: ops.map((o) => ({ method: o.method, path: o.path,
              params: (o.op.parameters ?? []).map((p) => `${p.name}:${typeText(doc, p.schema)}`),
              responses: Object.entries(o.op.responses ?? {}).map(([code, r]) => `${code}:${Object.values(r.content ?? {}).map((c) => typeText(doc, c.schema)).join('|')}`) })) }));
            console.log(JSON.stringify(out));
            """);
        var psi = new ProcessStartInfo("node") { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add(Path.Combine(dir, "run.mjs"));
        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        Assert.True(p.ExitCode == 0, "node (Debian nodejs) could not run the page's model: " + await stderr);
        var grouped = JsonDocument.Parse(await stdout).RootElement.EnumerateArray().ToList();

        var listed = grouped.SelectMany(g => g.GetProperty("ops").EnumerateArray().Select(o => (o.GetProperty("method").GetString()!, o.GetProperty("path").GetString()!)))
            .OrderBy(o => o.Item2, StringComparer.Ordinal).ThenBy(o => o.Item1, StringComparer.Ordinal).ToList();
        Assert.Equal(expected, listed);   // every operation exactly once
        var names = grouped.Select(g => g.GetProperty("name").GetString()!).ToList();
        // Tags are the declaring classes (FieldsApi ...); the inline time-scales handler is grouped by its resource.
        Assert.Equal(["Account", "Admin", "Export", "Fields", "Review", "Stars", "time-scales", "Uploads"], names);   // localeCompare order
        var stars = grouped.SelectMany(g => g.GetProperty("ops").EnumerateArray()).Single(o => o.GetProperty("path").GetString() == "/api/v1/fields/{fieldId}/stars");
        var parameters = stars.GetProperty("params").EnumerateArray().Select(x => x.GetString()!).ToList();
        Assert.Contains(parameters, x => x.StartsWith("fieldId:integer", StringComparison.Ordinal));
        Assert.Contains(parameters, x => x.StartsWith("page_size:", StringComparison.Ordinal));
        Assert.Contains(stars.GetProperty("responses").EnumerateArray(), r => r.GetString()!.StartsWith("200:StarPage", StringComparison.Ordinal));
    }

    [Fact]
    public async Task OpenApiDocument_PutsEveryRouteUnderApiV1()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var doc = await t.Client.GetFromJsonAsync<JsonElement>("/openapi/v1.json");
        var paths = doc.GetProperty("paths").EnumerateObject().Select(p => p.Name).ToList();
        Assert.NotEmpty(paths);
        Assert.All(paths, p => Assert.StartsWith("/api/v1/", p, StringComparison.Ordinal));
        Assert.Contains("/api/v1/fields/{fieldId}/figures/pl.png", paths);
        Assert.Contains("/api/v1/fields/{fieldId}/audit", paths);
    }

    [Fact]
    public async Task FieldStars_PagesThroughALargeFieldWithoutGapsOrRepeats()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var sb = new StringBuilder("star,field,ra_deg,dec_deg\n");
        for (int i = 0; i < 1203; i++) sb.Append(System.Globalization.CultureInfo.InvariantCulture, $"BIG-{i:D4},big-field,{10 + i * 0.001:F4},-5\n");
        (await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(sb.ToString(), [], timeScale: null, offset: null))).EnsureSuccessStatusCode();
        long fieldId = (await t.Client.GetFromJsonAsync<JsonElement>("/api/v1/fields"))[0].GetProperty("field_id").GetInt64();

        var seen = new List<string>();
        for (int page = 1; ; page++)
        {
            var body = await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fieldId}/stars?page={page}&page_size=500");
            Assert.Equal(1203, body.GetProperty("total").GetInt32());
            Assert.Equal(page, body.GetProperty("page").GetInt32());
            Assert.Equal(500, body.GetProperty("page_size").GetInt32());
            var items = body.GetProperty("items").EnumerateArray().Select(x => x.GetProperty("star").GetString()!).ToList();
            if (items.Count == 0) { Assert.Equal(4, page); break; }
            Assert.Equal(page < 3 ? 500 : 203, items.Count);
            seen.AddRange(items);
        }
        Assert.Equal(1203, seen.Distinct().Count());
        Assert.Equal(Enumerable.Range(0, 1203).Select(i => $"BIG-{i:D4}").Order(StringComparer.Ordinal), seen.Order(StringComparer.Ordinal));
        // Without page_size the default page holds 500; page_size is clamped to 1..5000.
        Assert.Equal(500, (await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fieldId}/stars")).GetProperty("items").GetArrayLength());
        Assert.Equal(1203, (await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fieldId}/stars?page_size=100000")).GetProperty("items").GetArrayLength());
        Assert.Single((await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fieldId}/stars?page_size=0")).GetProperty("items").EnumerateArray());
    }
}
