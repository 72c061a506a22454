using System.Net.Http.Json;
using System.Text.Json;

namespace PulseLadder.Cli;

/// <summary>HTTP client of a running PulseLadder server (upload, status, export).</summary>
public sealed class ServerClient : IDisposable
{
    private readonly HttpClient _http;
    private readonly bool _ownsHttp;

    /// <summary>A client of the server at <paramref name="server"/> (base URL), with its own HttpClient.</summary>
    public ServerClient(string server)
    {
        _http = new HttpClient { BaseAddress = new Uri(server.TrimEnd('/') + "/"), Timeout = TimeSpan.FromMinutes(30) };
        _ownsHttp = true;
    }

    /// <summary>
    /// A client over a caller's HttpClient (its BaseAddress is the server; in-process test servers, custom handlers).
    /// The caller keeps ownership: <see cref="Dispose"/> leaves <paramref name="http"/> open.
    /// </summary>
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
        if (!resp.IsSuccessStatusCode) throw new HttpRequestException($"GET {path}: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync(ct)}");
        return await resp.Content.ReadFromJsonAsync<JsonElement>(ct);
    }

    public async Task<byte[]> GetBytesAsync(string path, CancellationToken ct)
    {
        using var resp = await _http.GetAsync(path, ct);
        if (!resp.IsSuccessStatusCode) throw new HttpRequestException($"GET {path}: {(int)resp.StatusCode} {await resp.Content.ReadAsStringAsync(ct)}");
        return await resp.Content.ReadAsByteArrayAsync(ct);
    }

    public void Dispose()
    {
        if (_ownsHttp) _http.Dispose();
    }
}
