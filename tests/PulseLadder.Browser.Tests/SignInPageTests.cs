using Microsoft.Playwright;

namespace PulseLadder.Browser.Tests;

[Collection("browser")]
public sealed class SignInPageTests(ServerFixture server) : IClassFixture<ServerFixture>
{
    [Fact]
    public async Task SignIn_RedirectsBackToTheAskedPage_AfterAWrongThenTheRightPassword()
    {
        var (page, problems) = await server.NewPageAsync(signIn: false);
        // Not signed in: a page sends the browser to the sign-in page, remembering where it was going.
        await page.GotoAsync("/account.html?from=signin");
        await page.WaitForURLAsync("**/signin.html?return=*");
        Assert.Contains("return=%2Faccount.html%3Ffrom%3Dsignin", page.Url);

        await page.Locator("#name").FillAsync(ServerFixture.AdminName);
        await page.Locator("#password").FillAsync("not-the-password");
        await page.Locator("#signin-btn").ClickAsync();
        var error = page.Locator("#signin-error");
        await error.WaitForAsync();
        Assert.Equal("Wrong name or password.", await error.TextContentAsync());
        await ServerFixture.ShotAsync(page, "signin-1-wrong-password");

        await page.Locator("#password").FillAsync(server.AdminPassword);
        await page.Locator("#signin-btn").ClickAsync();
        await page.WaitForURLAsync("**/account.html?from=signin");
        await page.Locator("#who-name").WaitForAsync();
        Assert.Equal($"{ServerFixture.AdminName} (admin)", await page.Locator("#who-name").TextContentAsync());
        await ServerFixture.ShotAsync(page, "signin-2-signed-in");

        // Signing out ends the session: the next page load goes back to the sign-in page.
        await page.Locator("#signout-btn").ClickAsync();
        await page.WaitForURLAsync("**/signin.html*");
        await page.GotoAsync("/index.html");
        await page.WaitForURLAsync("**/signin.html?return=*");
        // The wrong password's 401 is expected; nothing else may fail.
        Assert.DoesNotContain(problems, p => !p.Contains("401"));
    }

    [Fact]
    public async Task AccountPage_ShowsANewTokenOnce_AndTheTokenWorksForTheApi()
    {
        var (page, problems) = await server.NewPageAsync();
        await page.GotoAsync("/account.html");
        await page.Locator("#token-name").FillAsync("from the browser test");
        await page.Locator("#token-create").ClickAsync();
        var shown = page.Locator("#new-token");
        await shown.WaitForAsync();
        string token = (await shown.TextContentAsync())!.Trim();
        Assert.StartsWith("plx_", token);
        await page.Locator("#tokens tbody tr", new() { HasText = "from the browser test" }).WaitForAsync();
        await ServerFixture.ShotAsync(page, "account-1-token-created");

        using var http = new HttpClient { BaseAddress = new Uri(server.BaseUrl) };
        http.DefaultRequestHeaders.Authorization = new System.Net.Http.Headers.AuthenticationHeaderValue("Bearer", token);
        Assert.Equal(System.Net.HttpStatusCode.OK, (await http.GetAsync("/api/v1/me")).StatusCode);

        // Revoked through the page (an antiforgery-protected DELETE): the token stops working.
        await page.Locator("#tokens tbody tr", new() { HasText = "from the browser test" }).Locator("button").ClickAsync();
        await page.Locator("#tokens tbody tr", new() { HasText = "revoked" }).WaitForAsync();
        Assert.Equal(System.Net.HttpStatusCode.Unauthorized, (await http.GetAsync("/api/v1/me")).StatusCode);
        Assert.Empty(problems);
    }

    [Fact]
    public async Task JobDashboard_OpensForTheAdmin_AndItsAntiforgeryProtectedPollingSucceeds()
    {
        var (page, problems) = await server.NewPageAsync();
        // Hangfire's dashboard polls POST /jobs/stats with the antiforgery header it reads from its own page.
        var stats = page.WaitForResponseAsync(r => r.Url.Contains("/jobs/stats", StringComparison.Ordinal) && r.Request.Method == "POST");
        var resp = await page.GotoAsync("/jobs");
        Assert.Equal(200, resp!.Status);
        Assert.Equal(200, (await stats).Status);
        await ServerFixture.ShotAsync(page, "jobs-dashboard-admin");
        Assert.Empty(problems);
    }
}

/// <summary>A server in single-user mode (`serve --single-user`): no accounts, every request is the local admin.</summary>
public sealed class SingleUserServerFixture : ServerFixture
{
    protected override string[] ServeOptions => ["--single-user"];
    protected override bool CreateAccounts => false;
}

[Collection("browser")]
public sealed class SingleUserModeTests(SingleUserServerFixture server) : IClassFixture<SingleUserServerFixture>
{
    [Fact]
    public async Task Pages_ShowTheSingleUserBanner_WithoutSigningIn()
    {
        var (page, problems) = await server.NewPageAsync(signIn: false);
        await page.GotoAsync("/index.html");
        var banner = page.Locator("#single-user-banner");
        await banner.WaitForAsync();
        Assert.Contains("Single-user mode", await banner.TextContentAsync());
        Assert.True(await banner.IsVisibleAsync());
        Assert.EndsWith("/index.html", page.Url);
        await ServerFixture.ShotAsync(page, "single-user-banner");
        Assert.Empty(problems);
    }
}
