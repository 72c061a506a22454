using System.Text.Json;
using System.Net.Http.Json;

namespace PulseLadder.Browser.Tests;

[Collection("browser")]
public sealed class ReviewQueueTests(SeededServerFixture server) : IClassFixture<SeededServerFixture>
{
    [Fact]
    public async Task ReviewQueue_AdvancesAndAccepts_WhenKeysPressed()
    {
        var (page, problems) = await server.NewPageAsync();
        await page.GotoAsync("/review.html");
        await page.Locator("#star-name").WaitForAsync();
        await page.Locator("#fold-V canvas").WaitForAsync();
        string first = await page.Locator("#star-name").TextContentAsync() ?? "";
        Assert.StartsWith("BT-FOLD-", first);
        await ServerFixture.ShotAsync(page, "review-1-first");

        // N skips to the next star without deciding.
        await page.Keyboard.PressAsync("n");
        await page.Locator("#star-name", new() { HasNotText = first }).WaitForAsync();
        string second = await page.Locator("#star-name").TextContentAsync() ?? "";
        Assert.NotEqual(first, second);
        await page.Locator("#fold-V canvas").WaitForAsync();

        // A accepts the star on screen and moves on.
        await page.Keyboard.PressAsync("a");
        await page.Locator("#star-name", new() { HasNotText = second }).Or(page.Locator("#queue-empty")).WaitForAsync();
        var row = await server.StarRowAsync(SeededServerFixture.Field, second);
        Assert.Equal("accepted", row.GetProperty("state").GetString());
        string third = await page.Locator("#star-name").CountAsync() > 0 ? await page.Locator("#star-name").TextContentAsync() ?? "" : "";
        Assert.NotEqual(second, third);

        // R rejects.
        if (third.Length > 0)
        {
            await page.Locator("#fold-V canvas").WaitForAsync();
            await page.Keyboard.PressAsync("r");
            await page.Locator("#star-name", new() { HasNotText = third }).Or(page.Locator("#queue-empty")).WaitForAsync();
            Assert.Equal("rejected", (await server.StarRowAsync(SeededServerFixture.Field, third)).GetProperty("state").GetString());
        }
        await ServerFixture.ShotAsync(page, "review-2-after-keys");
        Assert.Contains("accept", await page.Locator("#shortcuts").TextContentAsync() ?? "");
        Assert.Empty(problems);
    }
}
