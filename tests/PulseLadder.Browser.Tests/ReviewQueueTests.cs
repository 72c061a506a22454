using Microsoft.Playwright;

namespace PulseLadder.Browser.Tests;

[Collection("browser")]
public sealed class ReviewQueueTests(SeededServerFixture server) : IClassFixture<SeededServerFixture>
{
    // Records every star name the view shows, to explain a failure.
    private const string NameRecorder = """
        window.__names = [];
        document.addEventListener('DOMContentLoaded', () => new MutationObserver(() => {
          const n = document.getElementById('star-name');
          const v = n ? n.textContent : '(none)';
          if (window.__names[window.__names.length - 1] !== v) window.__names.push(v);
        }).observe(document.getElementById('star-view'), { childList: true, subtree: true }));
        """;

    /// <summary>Waits until a star other than <paramref name="previous"/> is fully shown, or the queue is empty; returns its name ("" when empty).</summary>
    private static async Task<string> NextShownAsync(IPage page, string previous)
    {
        await page.WaitForFunctionAsync(
            "(prev) => document.getElementById('queue-empty') || (document.getElementById('star-name')?.textContent !== prev && document.querySelector('#fold-V canvas'))",
            previous, new() { Timeout = 30_000 });
        return await page.EvaluateAsync<string>("() => document.getElementById('star-name')?.textContent ?? ''");
    }

    private async Task<string> StateAsync(string star) =>
        (await server.StarRowAsync(SeededServerFixture.Field, star)).GetProperty("state").GetString() ?? "";

    [Fact]
    public async Task ReviewQueue_AdvancesAndAccepts_WhenKeysPressed()
    {
        var (page, problems) = await server.NewPageAsync();
        await page.AddInitScriptAsync(NameRecorder);
        await page.GotoAsync("/review.html");
        try
        {
            string first = await NextShownAsync(page, "");
            Assert.StartsWith("BT-FOLD-", first);
            Assert.Contains("accept", await page.Locator("#shortcuts").TextContentAsync() ?? "");
            await ServerFixture.ShotAsync(page, "review-1-first");

            // N skips to the next star without deciding.
            await page.Keyboard.PressAsync("n");
            string second = await NextShownAsync(page, first);
            Assert.StartsWith("BT-FOLD-", second);
            Assert.Equal("awaiting", await StateAsync(first));

            // A accepts the star on screen and moves on to another one.
            await page.Keyboard.PressAsync("a");
            string third = await NextShownAsync(page, second);
            Assert.Equal("accepted", await StateAsync(second));
            Assert.NotEqual(second, third);

            // R rejects the star on screen.
            Assert.StartsWith("BT-FOLD-", third);
            await page.Keyboard.PressAsync("r");
            await NextShownAsync(page, third);
            Assert.Equal("rejected", await StateAsync(third));
            await ServerFixture.ShotAsync(page, "review-2-after-keys");
            Assert.Empty(problems);
        }
        catch (Exception e)
        {
            await ServerFixture.ShotAsync(page, "review-failure");
            throw new Xunit.Sdk.XunitException(
                $"{e.Message}\nnames shown: {await page.EvaluateAsync<string>("() => JSON.stringify(window.__names)")}\nproblems: {string.Join(" | ", problems)}");
        }
    }
}
