using System.Net;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using System.Xml.Linq;
using Dapper;

namespace PulseLadder.Web.Tests.Hardening;

/// <summary>
/// Names are data, never markup or paths: export file names (RFC 6266 Content-Disposition) stay inside a safe
/// alphabet whatever the field is called, XML exports and figures stay well-formed with the name as text, and the
/// pages' scripts never hand API data to an HTML parser.
/// </summary>
public sealed partial class NameSafetyTests
{
    [GeneratedRegex("^[A-Za-z0-9._-]+$")]
    private static partial Regex SafeName();

    // Names a star list can carry (quotes, slashes, markup, non-ASCII) plus ones only older data or direct SQL can
    // hold (CR/LF, NUL, which the parsers now refuse).
    private static readonly string[] HostileFieldNames =
    [
        "field \"A\"; filename=evil.exe", "../../etc/passwd", "C:\\Windows\\win.ini", "a\r\nSet-Cookie: x=1", "Ωmega-星団 ☃",
        "<img src=x onerror=alert(1)>", "...", "tab\there", "nul\0byte", "\u202Egnp.exe",
    ];

    [Fact]
    public async Task Export_ServesSafeFileNamesAndWellFormedXml_WhenFieldNamesAreHostile()
    {
        await using var t = await TestApp.StartAsync(runJobs: false);
        var ids = new List<long>();
        using (var c = t.Db.Open())
            foreach (var name in HostileFieldNames)
                ids.Add(c.ExecuteScalar<long>("INSERT INTO fields (name, created_at) VALUES (@name, '2026-01-01T00:00:00Z') RETURNING id", new { name }));
        foreach (var (id, name) in ids.Zip(HostileFieldNames))
        {
            foreach (var (format, ext) in new[] { ("csv", ".csv"), ("json", ".json"), ("votable", ".vot") })
            {
                using var resp = await t.Client.GetAsync($"/api/v1/fields/{id}/export?format={format}");
                Assert.True(resp.StatusCode == HttpStatusCode.OK, $"{format} of field {Show(name)}: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync()}");
                var cd = resp.Content.Headers.ContentDisposition;
                Assert.NotNull(cd);
                Assert.Equal("attachment", cd.DispositionType);
                string file = cd.FileName!.Trim('"');
                Assert.Matches(SafeName(), file);
                Assert.EndsWith(ext, file, StringComparison.Ordinal);
                Assert.False(file.StartsWith('.'), file);
                if (cd.FileNameStar is { } star) Assert.Equal(file, star);
                foreach (var h in resp.Headers.Concat(resp.Content.Headers))
                    Assert.All(h.Value, v => Assert.DoesNotContain('\n', v));
                Assert.DoesNotContain(resp.Headers, h => h.Key.Equals("Set-Cookie", StringComparison.OrdinalIgnoreCase));
                byte[] body = await resp.Content.ReadAsByteArrayAsync();
                if (format == "votable")
                {
                    // Well-formed XML whose RESOURCE name is the field name, minus the characters XML 1.0 cannot hold.
                    var doc = XDocument.Parse(Encoding.UTF8.GetString(body));
                    var resource = doc.Root!.Elements().First(e => e.Name.LocalName == "RESOURCE");
                    Assert.Equal(XmlSafe(name), resource.Attribute("name")!.Value.Replace("\r\n", "\n", StringComparison.Ordinal).Replace('\r', '\n'));
                }
                if (format == "json") Assert.Equal(name, JsonDocument.Parse(body).RootElement.GetProperty("title").GetString());
            }
            using var svg = await t.Client.GetAsync($"/api/v1/fields/{id}/figures/pl.svg");
            Assert.Equal(HttpStatusCode.OK, svg.StatusCode);
            var figure = XDocument.Parse(await svg.Content.ReadAsStringAsync());
            Assert.DoesNotContain(figure.Descendants(), e => e.Name.LocalName is "img" or "script" or "foreignObject");
        }
    }

    private static string XmlSafe(string s) => new(s.Replace("\r\n", "\n", StringComparison.Ordinal).Replace('\r', '\n')
        .Select(ch => System.Xml.XmlConvert.IsXmlChar(ch) ? ch : '\uFFFD').ToArray());

    private static string Show(string s) => JsonSerializer.Serialize(s);

    [Fact]
    public async Task Figures_CarryStarNameAsText_WhenTheNameIsMarkup()
    {
        const string star = "<script>alert('x')</script>&\"Cep\"";
        const string field = "f \"q\" </text><script>";
        await using var t = await TestApp.StartAsync();
        string stars = "star,field,ra_deg,dec_deg,class\n\"" + star.Replace("\"", "\"\"", StringComparison.Ordinal) + "\",\"" + field.Replace("\"", "\"\"", StringComparison.Ordinal) + "\",80.5,-69.2,dcep_f\n";
        string phot = Fixtures.Photometry("X", 5.37, 13.9, nights: 80).Replace("\nX,", "\n\"" + star.Replace("\"", "\"\"", StringComparison.Ordinal) + "\",", StringComparison.Ordinal);
        var resp = await t.Client.PostAsync("/api/v1/uploads", Fixtures.Form(stars, [("markup.csv", phot)]));
        Assert.Equal(HttpStatusCode.Created, resp.StatusCode);
        Assert.Equal(0, await t.WaitForAnalysesAsync(TimeSpan.FromSeconds(60)));
        var fields = await t.Client.GetFromJsonAsync<JsonElement>("/api/v1/fields");
        Assert.Equal(field, fields[0].GetProperty("name").GetString());
        long fieldId = fields[0].GetProperty("field_id").GetInt64();
        var row = (await t.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fieldId}/stars")).GetProperty("items")[0];
        Assert.Equal(star, row.GetProperty("star").GetString());
        long starId = row.GetProperty("star_id").GetInt64();

        var lc = XDocument.Parse(await t.Client.GetStringAsync($"/api/v1/stars/{starId}/figures/lightcurve.svg"));
        Assert.DoesNotContain(lc.Descendants(), e => e.Name.LocalName == "script");
        Assert.Contains(lc.Descendants().Where(e => e.Name.LocalName == "text"), e => e.Value.StartsWith(star, StringComparison.Ordinal));
        var pl = XDocument.Parse(await t.Client.GetStringAsync($"/api/v1/fields/{fieldId}/figures/pl.svg?accepted_only=false"));
        Assert.DoesNotContain(pl.Descendants(), e => e.Name.LocalName == "script");
        var vot = XDocument.Parse(await t.Client.GetStringAsync($"/api/v1/fields/{fieldId}/export?format=votable"));
        Assert.Contains(vot.Descendants().Where(e => e.Name.LocalName == "TD"), e => e.Value == star);
    }

    [Fact]
    public void Pages_PlaceApiDataAsText_NeverThroughAnHtmlParser()
    {
        // Every page script and page: no sink that parses a string as HTML (OWASP DOM-XSS sinks).
        string root = Path.Combine(AppContext.BaseDirectory, "wwwroot");
        var files = Directory.GetFiles(root, "*.js", SearchOption.AllDirectories).Concat(Directory.GetFiles(root, "*.html", SearchOption.AllDirectories))
            .Where(f => !f.Contains(Path.DirectorySeparatorChar + "lib" + Path.DirectorySeparatorChar, StringComparison.Ordinal)).ToList();
        Assert.Contains(files, f => f.EndsWith("dom.js", StringComparison.Ordinal));
        string[] sinks = [".innerHTML", ".outerHTML", "insertAdjacentHTML", "document.write", "createContextualFragment", "DOMParser", "eval(", "new Function(", "srcdoc"];
        foreach (var f in files)
        {
            var lines = File.ReadAllLines(f);
            for (int i = 0; i < lines.Length; i++)
            {
                string code = lines[i].TrimStart();
                if (code.StartsWith("//", StringComparison.Ordinal) || code.StartsWith('*') || code.StartsWith("/*", StringComparison.Ordinal)) continue;
                foreach (var sink in sinks)
                    Assert.False(code.Contains(sink, StringComparison.Ordinal), $"{Path.GetRelativePath(root, f)}:{i + 1} uses {sink}: {code}");
            }
        }
    }
}
