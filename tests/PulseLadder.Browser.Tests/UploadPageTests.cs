using System.Text;
using Microsoft.Playwright;

namespace PulseLadder.Browser.Tests;

[Collection("browser")]
public sealed class UploadPageTests(ServerFixture server) : IClassFixture<ServerFixture>
{
    private static readonly SyntheticStar[] Stars =
    [
        new("BT-UP-001", 4.1234, 15.40, 0.60, 81.00, -69.00),
        new("BT-UP-002", 7.6543, 14.90, 0.75, 81.10, -69.10),
    ];

    [Fact]
    public async Task Upload_ShowsRowErrorsThenPreviewThenCompletedProgress_WhenFilesDropped()
    {
        var (page, problems) = await server.NewPageAsync();
        await page.GotoAsync("/index.html");
        await page.Locator("#fields .empty").WaitForAsync();

        // A photometry file with a bad magnitude on line 3: the report names the line and nothing is stored.
        var bad = "star,time,band,mag,mag_err,observer\nBT-UP-001,2460201.3,V,15.2,0.01,x\nBT-UP-001,2460202.3,V,abc,0.01,x\n";
        await page.Locator("#file-input").SetInputFilesAsync(
        [
            new FilePayload { Name = "bad-stars.csv", MimeType = "text/csv", Buffer = Encoding.UTF8.GetBytes(SyntheticCepheids.StarList("BT-UP", Stars)) },
            new FilePayload { Name = "bad-night.csv", MimeType = "text/csv", Buffer = Encoding.UTF8.GetBytes(bad) },
        ]);
        await page.Locator("#check-btn").ClickAsync();
        var errors = page.Locator("#row-errors tbody tr");
        await errors.First.WaitForAsync();
        Assert.Contains("3", await errors.First.Locator("td").Nth(1).TextContentAsync() ?? "");
        Assert.True(await page.Locator("#send-btn").IsDisabledAsync());
        await ServerFixture.ShotAsync(page, "upload-1-row-errors");
        await page.Locator("#clear-btn").ClickAsync();

        // Several good files dropped at once onto the drop zone.
        await DropFilesAsync(page,
        [
            ("up-stars.csv", SyntheticCepheids.StarList("BT-UP", Stars)),
            ("up-night.csv", SyntheticCepheids.Photometry(Stars, nights: 90, seed: 7)),
        ]);
        Assert.Equal(2, await page.Locator("#file-list li").CountAsync());
        await page.Locator("#check-btn").ClickAsync();
        await page.Locator(".preview-table").First.WaitForAsync();
        var columns = await page.Locator("#upload-report .chip.mono").AllTextContentsAsync();
        Assert.Contains("mag_err", columns);
        Assert.Contains("observer", columns);
        await ServerFixture.ShotAsync(page, "upload-2-preview");

        await page.Locator("#send-btn").ClickAsync();
        await page.Locator("#upload-progress[data-state='done']").WaitForAsync(new() { Timeout = 90_000 });
        Assert.Equal("100", await page.Locator("#upload-progress .progress").GetAttributeAsync("aria-valuenow"));
        Assert.Contains("2 of 2", await page.Locator("#progress-text").TextContentAsync() ?? "");
        await page.Locator("#fields .field-card a", new() { HasText = "BT-UP" }).WaitForAsync();
        await ServerFixture.ShotAsync(page, "upload-3-done");
        // The bad file's 400 answer is expected; nothing else may fail.
        Assert.DoesNotContain(problems, p => !p.Contains("400"));
    }

    /// <summary>Dispatches a real drop event carrying File objects, as a file manager drag does.</summary>
    private static Task DropFilesAsync(IPage page, (string Name, string Text)[] files) =>
        page.EvaluateAsync(@"(files) => {
            const dt = new DataTransfer();
            for (const f of files) dt.items.add(new File([f.text], f.name, { type: 'text/csv' }));
            const zone = document.getElementById('dropzone');
            zone.dispatchEvent(new DragEvent('dragover', { dataTransfer: dt, bubbles: true, cancelable: true }));
            zone.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
        }", files.Select(f => new { name = f.Name, text = f.Text }).ToArray());
}
