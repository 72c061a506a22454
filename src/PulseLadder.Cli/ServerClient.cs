using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text.Json;

namespace PulseLadder.Cli;

/// <summary>
/// HTTP client of a running PulseLadder server (upload, status, export). Authenticates with a personal API token
/// (<c>--token</c>, else the PULSELADDER_TOKEN environment variable); refusals (401, 403) become a clear error.
/// </summary>
public sealed class ServerClient : IDisposable
{
    public const string TokenVariable = "PULSELADDER_TOKEN";

    private readonly HttpClient _http;
    private readonly bool _ownsHttp;

    /// <param name="server">Base address, e.g. http://127.0.0.1:5000.</param>
    /// <param name="token">API token; null or empty: PULSELADDER_TOKEN, and none when that is unset too.</param>
    public ServerClient(string server, string? token = null)
    {
        _http = new HttpClient { BaseAddress = new Uri(server.TrimEnd('/') + "/"), Timeout = TimeSpan.FromMinutes(30) };
        _ownsHttp = true;
        string? t = string.IsNullOrWhiteSpace(token) ? Environment.GetEnvironmentVariable(TokenVariable) : token;
        if (!string.IsNullOrWhiteSpace(t)) _http.DefaultRequestHeaders.Authorization = new AuthenticationHeaderValue("Bearer", t.Trim());
    }

    /// <summary>Uses a configured client as is (base address and credentials already set; e.g. a test server's client).</summary>
    public ServerClient(HttpClient http)
    {
        ArgumentNullException.ThrowIfNull(http);
        _http = http;
        _ownsHttp = false;
    }

    public static readonly JsonSerializerOptions JsonOptions = new() { PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower };

    public async Task<(bool Ok, JsonElement Body)> UploadAsync(string? stars, IReadOnlyList<string> photometry, IReadOnlyDictionary<string, string?> fields, CancellationToken ct)
    {
        using var form = new MultipartFormDataContent();
        foreach (var (k, v) in fields) if (v is not null) form.Add(new StringContent(v), k);
        var streams = new List<Stream>();
        try
        {
            if (stars is not null) { var s = File.OpenRead(stars); streams.Add(s); form.Add(new StreamContent(s), "stars", Path.GetFileName(stars)); }
            foreach (var p in photometry) { var s = File.OpenRead(p); streams.Add(s); form.Add(new StreamContent(s), "photometry", Path.GetFileName(p)); }
            using var resp = await _http.PostAsync("api/v1/uploads", form, ct);
            await ThrowIfRefusedAsync(resp, "POST api/v1/uploads", ct);
            var body = await resp.Content.ReadFromJsonAsync<JsonElement>(ct);
            return (resp.IsSuccessStatusCode, body);
        }
        finally
        {
            foreach (var s in streams) s.Dispose();
        }
    }

    public async Task<JsonElement> GetJsonAsync(string path, CancellationToken ct)
    {
        using var resp = await _http.GetAsync(path, ct);
        await ThrowIfRefusedAsync(resp, "GET " + path, ct);
        if (!resp.IsSuccessStatusCode) throw new HttpRequestException($"GET {path}: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync(ct)}");
        return await resp.Content.ReadFromJsonAsync<JsonElement>(ct);
    }

    public async Task<byte[]> GetBytesAsync(string path, CancellationToken ct)
    {
        using var resp = await _http.GetAsync(path, ct);
        await ThrowIfRefusedAsync(resp, "GET " + path, ct);
        if (!resp.IsSuccessStatusCode) throw new HttpRequestException($"GET {path}: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync(ct)}");
        return await resp.Content.ReadAsByteArrayAsync(ct);
    }

    private async Task ThrowIfRefusedAsync(HttpResponseMessage resp, string what, CancellationToken ct)
    {
        if (resp.StatusCode == HttpStatusCode.Unauthorized)
            throw new HttpRequestException(_http.DefaultRequestHeaders.Authorization is null
                ? $"{what}: the server needs an account (401). Pass --token TOKEN or set {TokenVariable}; " +
                  "create a token on the account page or with `pulseladder user token NAME --label L` on the server."
                : $"{what}: the server refused the token (401): it is unknown, revoked, or its account is disabled.",
                null, resp.StatusCode);
        if (resp.StatusCode == HttpStatusCode.Forbidden)
            throw new HttpRequestException($"{what}: the token's account may not do this (403): {await Detail(resp, ct)}", null, resp.StatusCode);
    }

    private static async Task<string> Detail(HttpResponseMessage resp, CancellationToken ct)
    {
        try
        {
            var j = await resp.Content.ReadFromJsonAsync<JsonElement>(ct);
            return j.TryGetProperty("detail", out var d) ? d.GetString() ?? "" : "";
        }
        catch (JsonException) { return ""; }
    }

    public void Dispose()
    {
        if (_ownsHttp) _http.Dispose();
    }
}
