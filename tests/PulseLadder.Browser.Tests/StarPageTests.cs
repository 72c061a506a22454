using System.Globalization;
using System.Text.Json;
using Microsoft.Playwright;

namespace PulseLadder.Browser.Tests;

[Collection("browser")]
public sealed class StarPageTests(SeededServerFixture server) : IClassFixture<SeededServerFixture>
{
    private static double Period(string? s) => double.Parse(s ?? "nan", CultureInfo.InvariantCulture);

    private static Task<double[]> FoldedPhasesAsync(IPage page, string band) =>
        page.EvaluateAsync<double[]>($"() => Array.from(document.getElementById('fold-{band}')._plot.data[0].slice(0, 40))");

    [Fact]
    public async Task StarPage_RefoldsAtAlternatePeakAndSavesChosenPeriod_WhenReviewerPicksIt()
    {
        var star = SeededServerFixture.Stars[0];
        var row = await server.StarRowAsync(SeededServerFixture.Field, star.Name);
        long starId = row.GetProperty("star_id").GetInt64();
        long fieldId = row.GetProperty("field_id").GetInt64();

        var (page, problems) = await server.NewPageAsync();
        await page.GotoAsync($"/star.html?id={starId}");
        await page.Locator("#fold-V canvas").WaitForAsync();
        Assert.Equal(star.Name, await page.Locator("#star-name").TextContentAsync());

        // The pipeline found the period the data were made with (within 0.1 %).
        double pipelineP = Period(await page.Locator("#fold-period").GetAttributeAsync("data-period"));
        Assert.InRange(pipelineP, star.PeriodDays * 0.999, star.PeriodDays * 1.001);
        var phasesBefore = await FoldedPhasesAsync(page, "V");
        await ServerFixture.ShotAsync(page, "star-1-pipeline-period");

        // Click the second peak in the peak list: the fold changes at once, without a request.
        var second = page.Locator("#peaks-table tbody tr").Nth(1);
        double f2 = Period(await second.GetAttributeAsync("data-frequency"));
        int requestsBefore = 0;
        page.Request += (_, _) => requestsBefore++;
        await second.ClickAsync();
        double altP = Period(await page.Locator("#fold-period").GetAttributeAsync("data-period"));
        Assert.Equal(1 / f2, altP, 9);
        Assert.True(Math.Abs(altP - pipelineP) / pipelineP > 0.01, $"alternate peak {altP} should differ from {pipelineP}");
        Assert.Contains(altP.ToString("G6", CultureInfo.InvariantCulture)[..5], await page.Locator("#fold-period").TextContentAsync() ?? "");
        var phasesAfter = await FoldedPhasesAsync(page, "V");
        Assert.NotEqual(phasesBefore, phasesAfter);
        Assert.Equal(0, requestsBefore);
        await ServerFixture.ShotAsync(page, "star-2-alternate-peak");

        // Clicking the periodogram itself also refolds.
        var box = await page.Locator("#pg-chart .u-over").BoundingBoxAsync();
        Assert.NotNull(box);
        await page.Mouse.ClickAsync(box.X + box.Width * 0.8f, box.Y + box.Height * 0.5f);
        Assert.NotEqual(altP, Period(await page.Locator("#fold-period").GetAttributeAsync("data-period")));
        await second.ClickAsync();

        // Use that period: the decision is saved, the star reruns through the queue and the page shows the result.
        await page.Locator("#btn-use-period").ClickAsync();
        await page.Locator("#history li[data-action='choose_period']").WaitForAsync(new() { Timeout = 60_000 });
        await page.Locator("#pending-banner").WaitForAsync(new() { State = WaitForSelectorState.Hidden, Timeout = 60_000 });
        double newP = Period(await page.Locator("#fold-period").GetAttributeAsync("data-period"));
        Assert.InRange(newP, altP * 0.99, altP * 1.01);
        await ServerFixture.ShotAsync(page, "star-3-period-chosen");

        // Accept it: the field summary is rebuilt from the accepted star.
        await page.Locator("#btn-accept").ClickAsync();
        await page.Locator("#history li[data-action='accept']").WaitForAsync(new() { Timeout = 30_000 });
        Assert.Equal("Accepted", await page.Locator("#star-state").TextContentAsync());

        await server.WaitUntil(async () =>
        {
            var res = await server.Http.GetAsync($"/api/v1/fields/{fieldId}/summary");
            if (!res.IsSuccessStatusCode) return false;
            using var doc = JsonDocument.Parse(await res.Content.ReadAsStringAsync());
            return doc.RootElement.GetProperty("n_used").GetInt64() == 1;
        }, TimeSpan.FromSeconds(30), "the field summary to use the accepted star");

        await page.GotoAsync($"/field.html?id={fieldId}");
        await page.Locator("#summary-n").WaitForAsync();
        Assert.Equal("1", await page.Locator("#summary-n").TextContentAsync());
        var rowLoc = page.Locator($"#stars-table tbody tr[data-star-id='{starId}']");
        Assert.Contains("Accepted", await rowLoc.TextContentAsync() ?? "");
        Assert.InRange(Period(await rowLoc.Locator("td").Nth(2).TextContentAsync()), newP * 0.999, newP * 1.001);
        await page.Locator("#pl-chart canvas").WaitForAsync();
        await ServerFixture.ShotAsync(page, "field-after-decision");
        Assert.Empty(problems);
    }
}
