using System.Buffers.Binary;
using System.Diagnostics;
using System.Net;
using System.Net.Http.Json;
using System.Text.Json;

namespace PulseLadder.Web.Tests.Export;

/// <summary>
/// PNG figures: a valid PNG (signature and IHDR per the PNG specification, ISO/IEC 15948), decoded by an independent
/// decoder (Debian's python3-PIL), of the requested size, with the figure's ink: data points (#224466), the fit or
/// relation line (#cc3333) and dark text/axes.
/// </summary>
[Collection(ExportCollection.Name)]
public sealed class FigurePngTests(ExportFixture fx)
{
    private const string Python = "/usr/bin/python3";

    private const string Inspect = """
        import json, sys
        from PIL import Image
        im = Image.open(sys.argv[1]); im.load()
        rgb = im.convert("RGB"); w, h = rgb.size; px = rgb.load()
        def near(c, t, d=40): return all(abs(a - b) <= d for a, b in zip(c, t))
        panels = int(sys.argv[2]); red_panel = [0] * panels; ink_panel = [0] * panels
        ink = red = dark = nonwhite = 0; colours = set()
        left_dark = 0
        for y in range(h):
            for x in range(w):
                c = px[x, y]; colours.add(c)
                if c != (255, 255, 255): nonwhite += 1
                k = min(panels - 1, y * panels // h)
                if near(c, (0x22, 0x44, 0x66)): ink += 1; ink_panel[k] += 1
                if near(c, (0xcc, 0x33, 0x33)): red += 1; red_panel[k] += 1
                if max(c) < 90: dark += 1; left_dark += x < w * 0.12
        print(json.dumps({"format": im.format, "width": w, "height": h, "colours": len(colours), "nonwhite": nonwhite, "ink": ink, "red": red, "dark": dark, "left_dark": left_dark, "red_panel": red_panel, "ink_panel": ink_panel}))
        """;

    private async Task<JsonElement> Decode(byte[] png, int panels = 1)
    {
        Assert.True(File.Exists(Python), "Debian's /usr/bin/python3 with python3-PIL is required to decode PNG figures");
        string path = Path.Combine(fx.App.DataDir, Guid.NewGuid().ToString("N") + ".png");
        await File.WriteAllBytesAsync(path, png);
        var psi = new ProcessStartInfo(Python) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        psi.ArgumentList.Add("-c");
        psi.ArgumentList.Add(Inspect);
        psi.ArgumentList.Add(path);
        psi.ArgumentList.Add(panels.ToString(System.Globalization.CultureInfo.InvariantCulture));
        using var p = Process.Start(psi)!;
        var stdout = p.StandardOutput.ReadToEndAsync();
        var stderr = p.StandardError.ReadToEndAsync();
        await p.WaitForExitAsync();
        Assert.True(p.ExitCode == 0, $"PIL could not decode the PNG (is python3-PIL installed?): {await stderr}");
        return JsonDocument.Parse(await stdout).RootElement.Clone();
    }

    /// <summary>Signature and the IHDR chunk (first chunk, 13 bytes: width, height big-endian).</summary>
    private static (int Width, int Height) Header(byte[] png)
    {
        Assert.True(png.Length > 33, "too short for a PNG");
        Assert.Equal([0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A], png[..8]);
        Assert.Equal(13, BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(8)));
        Assert.Equal("IHDR"u8.ToArray(), png[12..16]);
        return (BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(16)), BinaryPrimitives.ReadInt32BigEndian(png.AsSpan(20)));
    }

    private async Task<long> StarId(string name)
    {
        var stars = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/fields/{fx.FieldId}/stars");
        return stars.GetProperty("items").EnumerateArray().Single(s => s.GetProperty("star").GetString() == name).GetProperty("star_id").GetInt64();
    }

    [Fact]
    public async Task PlFigurePng_IsDecodableImageOfRequestedSize_WithPointsLineAndLabels()
    {
        using var resp = await fx.App.Client.GetAsync($"/api/v1/fields/{fx.FieldId}/figures/pl.png?accepted_only=false&width=800&height=600");
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        Assert.Equal("image/png", resp.Content.Headers.ContentType?.MediaType);
        var png = await resp.Content.ReadAsByteArrayAsync();
        Assert.Equal((800, 600), Header(png));
        var d = await Decode(png);
        Assert.Equal("PNG", d.GetProperty("format").GetString());
        Assert.Equal(800, d.GetProperty("width").GetInt32());
        Assert.Equal(600, d.GetProperty("height").GetInt32());
        Assert.True(d.GetProperty("colours").GetInt32() > 20, d.ToString());
        Assert.True(d.GetProperty("ink").GetInt32() > 2 * 20, d.ToString());     // two stars: filled circles plus error bars
        Assert.True(d.GetProperty("red").GetInt32() > 200, d.ToString());        // the relation line across the plot
        Assert.True(d.GetProperty("left_dark").GetInt32() > 50, d.ToString());   // y tick labels and axis title were drawn (a font was found)
    }

    [Fact]
    public async Task PlFigurePng_HasDefaultSize_AndRefusesAbsurdSizes()
    {
        var png = await fx.App.Client.GetByteArrayAsync($"/api/v1/fields/{fx.FieldId}/figures/pl.png");
        Assert.Equal((640, 480), Header(png));
        foreach (var q in new[] { "width=10", "height=100000", "width=-1" })
        {
            using var bad = await fx.App.Client.GetAsync($"/api/v1/fields/{fx.FieldId}/figures/pl.png?{q}");
            Assert.Equal(HttpStatusCode.BadRequest, bad.StatusCode);
            Assert.Equal("application/problem+json", bad.Content.Headers.ContentType?.MediaType);
        }
        using var missing = await fx.App.Client.GetAsync("/api/v1/fields/987654/figures/pl.png");
        Assert.Equal(HttpStatusCode.NotFound, missing.StatusCode);
    }

    [Fact]
    public async Task LightCurveFigurePng_StacksOnePanelPerBand_WithPointsAndFit()
    {
        long id = await StarId("T-CEP-1");
        var detail = await fx.App.Client.GetFromJsonAsync<JsonElement>($"/api/v1/stars/{id}");
        int bands = detail.GetProperty("result").GetProperty("fits").GetArrayLength();
        int used = detail.GetProperty("observations").EnumerateArray().Count(o => o.GetProperty("used").GetBoolean());
        var png = await fx.App.Client.GetByteArrayAsync($"/api/v1/stars/{id}/figures/lightcurve.png");
        Assert.Equal((640, 260 * bands), Header(png));
        var d = await Decode(png, bands);
        Assert.True(d.GetProperty("ink").GetInt32() > used, d.ToString());   // every used point drawn (twice, 4 px markers)
        // Each band's strip has its own points and fitted curve (the curve spans two cycles across the panel).
        Assert.All(d.GetProperty("red_panel").EnumerateArray(), r => Assert.True(r.GetInt32() > 300, d.ToString()));
        Assert.All(d.GetProperty("ink_panel").EnumerateArray(), r => Assert.True(r.GetInt32() > used / bands, d.ToString()));
        Assert.True(d.GetProperty("left_dark").GetInt32() > 50, d.ToString());
        var sized = await fx.App.Client.GetByteArrayAsync($"/api/v1/stars/{id}/figures/lightcurve.png?width=1000&height=900");
        Assert.Equal((1000, 900), Header(sized));
    }
}
