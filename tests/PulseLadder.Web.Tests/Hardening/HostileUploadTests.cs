using System.Globalization;
using System.Net;
using System.Net.Http.Headers;
using System.Net.Http.Json;
using System.Text;
using System.Text.Json;
using Dapper;

namespace PulseLadder.Web.Tests.Hardening;

/// <summary>One server holding a small valid campaign; every hostile upload must leave its tables exactly as they were.</summary>
public sealed class HostileUploadFixture : IAsyncLifetime
{
    public TestApp App { get; private set; } = null!;

    public async Task InitializeAsync()
    {
        App = await TestApp.StartAsync(runJobs: false);
        var resp = await App.Client.PostAsync("/api/v1/uploads", Fixtures.Form(Fixtures.StarList, [("base.csv", Fixtures.Photometry("T-CEP-1", 5.37, 13.9, nights: 20))]));
        Assert.Equal(HttpStatusCode.Created, resp.StatusCode);
    }

    public async Task DisposeAsync() => await App.DisposeAsync();
}

/// <summary>
/// The hostile-input list of issue 7 at the HTTP edge: each answered with a 4xx ProblemDetails that says what is
/// wrong, and nothing stored (every table's row count and the audit log compared before and after). The contract is
/// docs/formats.md and RFC 9457 (problem+json).
/// </summary>
public sealed class HostileUploadTests(HostileUploadFixture fx) : IClassFixture<HostileUploadFixture>
{
    private static readonly string[] Tables = ["fields", "stars", "uploads", "observations", "upload_stars", "analyses", "review_decisions", "audit_log"];
    private const string Header = "star,time,band,mag,mag_err\n";

    private string Counts()
    {
        using var c = fx.App.Db.Open();
        return string.Join(",", Tables.Select(t => t + "=" + c.ExecuteScalar<long>($"SELECT COUNT(*) FROM {t}").ToString(CultureInfo.InvariantCulture)));
    }

    private static MultipartFormDataContent Form(byte[]? stars, byte[]? photometry, string? timeScale = "jd_utc", string? offset = "2450000", string photName = "p.csv")
    {
        var form = new MultipartFormDataContent();
        if (stars is not null) form.Add(new ByteArrayContent(stars), "stars", "stars.csv");
        if (photometry is not null) form.Add(new ByteArrayContent(photometry), "photometry", photName);
        if (timeScale is not null) form.Add(new StringContent(timeScale), "time_scale");
        if (offset is not null) form.Add(new StringContent(offset), "time_offset");
        return form;
    }

    private static byte[] Utf8(string s) => Encoding.UTF8.GetBytes(s);

    /// <summary>Posts, checks a 4xx problem+json answer and that nothing was stored; returns the problem body.</summary>
    private async Task<JsonElement> Refused(HttpContent content, int? status = 400)
    {
        string before = Counts();
        using var resp = await fx.App.Client.PostAsync("/api/v1/uploads", content);
        int code = (int)resp.StatusCode;
        string text = await resp.Content.ReadAsStringAsync();
        Assert.True(code is >= 400 and < 500, $"status {code}: {text}");
        if (status is { } s) Assert.Equal(s, code);
        Assert.Equal("application/problem+json", resp.Content.Headers.ContentType?.MediaType);
        var body = JsonDocument.Parse(text).RootElement.Clone();
        Assert.Equal(code, body.GetProperty("status").GetInt32());
        Assert.False(string.IsNullOrWhiteSpace(body.GetProperty("title").GetString()));
        Assert.Equal(before, Counts());
        return body;
    }

    private static List<(string File, long Line, string? Column, string Message)> Errors(JsonElement body) =>
        body.GetProperty("errors").EnumerateArray().Select(e => (e.GetProperty("file").GetString()!, e.GetProperty("line").GetInt64(),
            e.TryGetProperty("column", out var c) && c.ValueKind == JsonValueKind.String ? c.GetString() : null, e.GetProperty("message").GetString()!)).ToList();

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenPhotometryIsBinaryGarbage()
    {
        var bytes = new byte[64 * 1024];
        new Random(7).NextBytes(bytes);
        var e = Errors(await Refused(Form(null, bytes, photName: "noise.bin")));
        Assert.NotEmpty(e);
        Assert.All(e, x => Assert.Equal("noise.bin", x.File));
    }

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenStarListIsBinaryGarbage()
    {
        // A PNG signature and random bytes sent as the star list.
        var bytes = new byte[8192];
        new Random(8).NextBytes(bytes);
        new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }.CopyTo(bytes, 0);
        Assert.NotEmpty(Errors(await Refused(Form(bytes, null, null, null))));
    }

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenCsvIsDeeplyQuoted()
    {
        string deep = "\"" + string.Concat(Enumerable.Repeat("\"\"", 20_000)) + "\"";
        var e = Errors(await Refused(Form(null, Utf8(Header + deep + ",11000.5,V,13.9,0.02\n\"T-CEP-1,11001.5,V,13.9,0.02\n" + new string('"', 30_001) + "\n"))));
        Assert.Contains(e, x => x.Line == 2 && x.Column == "star");   // the 20,000 quote pairs are one star name nobody listed
        Assert.Contains(e, x => x.Line == 3 && x.Message.Contains("quote", StringComparison.OrdinalIgnoreCase));
        Assert.Contains(e, x => x.Line == 4);
    }

    [Theory]
    [InlineData("T-CEP-1,NaN,V,13.9,0.02", "time")]
    [InlineData("T-CEP-1,11000.5,V,NaN,0.02", "mag")]
    [InlineData("T-CEP-1,11000.5,V,Infinity,0.02", "mag")]
    [InlineData("T-CEP-1,11000.5,V,13.9,-Infinity", "mag_err")]
    [InlineData("T-CEP-1,11000.5,V,13.9,1e400", "mag_err")]
    [InlineData("T-CEP-1,∞,V,13.9,0.02", "time")]
    public async Task Upload_RefusesNamingTheColumn_WhenANumberIsNotFinite(string row, string column)
    {
        var e = Errors(await Refused(Form(null, Utf8(Header + "T-CEP-1,11000.5,V,13.9,0.02\n" + row + "\n"))));
        Assert.Contains(e, x => x.File == "p.csv" && x.Line == 3 && x.Column == column);
    }

    [Fact]
    public async Task Upload_RefusesNamingLineAndColumn_WhenDecimalCommasAreMixedIn()
    {
        string text = "star;time;band;mag;mag_err\nT-CEP-1;11000.5;V;13.9;0.02\nT-CEP-1;11001,5;V;13.9;0.02\nT-CEP-1;11002.5;V;13,95;0.02\n";
        var e = Errors(await Refused(Form(null, Utf8(text))));
        Assert.Contains(e, x => x.Line == 3 && x.Column == "time" && x.Message.Contains("decimal separator"));
        Assert.Contains(e, x => x.Line == 4 && x.Column == "mag");
    }

    [Fact]
    public async Task Upload_KeepsLineNumbers_WhenBomAndCrlfSurroundABadRow()
    {
        byte[] utf8 = [0xEF, 0xBB, 0xBF, .. Utf8("star,time,band,mag,mag_err\r\nT-CEP-1,11000.5,V,13.9,0.02\r\nT-CEP-1,11001.5,V,x,0.02\r\n")];
        Assert.Contains(Errors(await Refused(Form(null, utf8))), x => x.Line == 3 && x.Column == "mag");
        byte[] utf16 = [0xFF, 0xFE, .. Encoding.Unicode.GetBytes("star,time,band,mag,mag_err\r\nT-CEP-1,11000.5,V,13.9,0.02\r\nT-CEP-1,11001.5,V,13.9,zero\r\n")];
        Assert.Contains(Errors(await Refused(Form(null, utf16))), x => x.Line == 3 && x.Column == "mag_err");
        // A BOM in the middle of a file is not a BOM: the row's star name is "\uFEFFT-CEP-1", which no star list holds.
        Assert.Contains(Errors(await Refused(Form(null, Utf8(Header + "T-CEP-1,11000.5,V,13.9,0.02\n\uFEFFT-CEP-1,11001.5,V,13.9,0.02\n")))), x => x.Line == 3 && x.Column == "star");
    }

    [Fact]
    public async Task Upload_StoresTheSameValues_WhenTheValidFileHasBomAndCrlf()
    {
        // BOM and CRLF are legal (docs/formats.md): the file must be read exactly like its LF, BOM-less twin.
        string lf = "star,time,band,mag,mag_err\nT-CEP-2,11000.5,V,13.10,0.02\nT-CEP-2,11001.5,I,12.40,0.03\n";
        byte[] bomCrlf = [0xEF, 0xBB, 0xBF, .. Utf8(lf.Replace("\n", "\r\n", StringComparison.Ordinal))];
        var preview = new MultipartFormDataContent { { new ByteArrayContent(bomCrlf), "photometry", "crlf.csv" }, { new StringContent("jd_utc"), "time_scale" },
            { new StringContent("2450000"), "time_offset" }, { new StringContent("true"), "preview" } };
        string before = Counts();
        var resp = await fx.App.Client.PostAsync("/api/v1/uploads", preview);
        Assert.Equal(HttpStatusCode.OK, resp.StatusCode);
        var file = (await resp.Content.ReadFromJsonAsync<JsonElement>()).GetProperty("files")[0];
        Assert.Equal(2, file.GetProperty("rows").GetInt64());
        Assert.Equal(["star", "time", "band", "mag", "mag_err"], file.GetProperty("columns").EnumerateArray().Select(c => c.GetString()));
        var rows = file.GetProperty("preview").EnumerateArray().ToList();
        Assert.Equal("T-CEP-2", rows[0].GetProperty("star").GetString());
        Assert.Equal(2461000.5, rows[0].GetProperty("time").GetDouble());
        Assert.Equal(12.40, rows[1].GetProperty("mag").GetDouble());
        Assert.Equal(before, Counts());   // a preview stores nothing either
    }

    [Theory]
    // Declared MJD but the values are full JDs (JD 2459000.5 read as MJD is JD 4859001).
    [InlineData("mjd_utc", "0", "2459000.5")]
    // Declared JD but the values are MJDs (JD 59000.5 is 4551 BC).
    [InlineData("jd_utc", "0", "59000.5")]
    // Declared BJD with the usual "- 2450000" columns but no offset.
    [InlineData("bjd_tdb", "0", "9000.5")]
    // An offset on values that already are full JDs.
    [InlineData("hjd_utc", "2450000", "2459000.5")]
    public async Task Upload_RefusesNamingTheTimeColumn_WhenTheTimeScaleContradictsTheValues(string scale, string offset, string time)
    {
        var e = Errors(await Refused(Form(null, Utf8(Header + $"T-CEP-1,{time},V,13.9,0.02\n"), scale, offset)));
        Assert.Contains(e, x => x.Line == 2 && x.Column == "time" && x.Message.Contains("offset", StringComparison.OrdinalIgnoreCase));
    }

    [Theory]
    [InlineData("T-\u0000CEP")]
    [InlineData("T-CEP\u0007")]
    [InlineData("T-\u001bCEP")]
    [InlineData("T-CEP\u0085")]
    public async Task Upload_RefusesNamingTheColumn_WhenANameHoldsControlCharacters(string name)
    {
        var e = Errors(await Refused(Form(Utf8("star,field,ra_deg,dec_deg\n" + name + ",f1,10,10\nOK-1,f\u0001x,10,10\n"), null, null, null)));
        Assert.Contains(e, x => x.Line == 2 && x.Column == "star");
        Assert.Contains(e, x => x.Line == 3 && x.Column == "field");
        var p = Errors(await Refused(Form(null, Utf8("star,time,band,mag,mag_err,observer\nT-CEP-1,11000.5,V,13.9,0.02,site\u0000x\n"))));
        Assert.Contains(p, x => x.Line == 2 && x.Column == "observer");
    }

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenBodyIsNotAForm()
    {
        await Refused(new StringContent("{\"photometry\": \"star,time\"}", Encoding.UTF8, "application/json"));
        await Refused(new ByteArrayContent([0x1F, 0x8B, 0x08, 0x00, 1, 2, 3]) { Headers = { ContentType = new MediaTypeHeaderValue("application/gzip") } });
    }

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenMultipartIsBroken()
    {
        // A boundary that never closes, and a boundary parameter the body never uses.
        var broken = new ByteArrayContent(Utf8("--b0\r\nContent-Disposition: form-data; name=\"photometry\"; filename=\"p.csv\"\r\n\r\n" + Header + "T-CEP-1,11000.5,V,13.9,0.02\r\n"));
        broken.Headers.ContentType = MediaTypeHeaderValue.Parse("multipart/form-data; boundary=b0");
        Assert.Contains("could not be read", (await Refused(broken)).GetProperty("detail").GetString());
        var wrong = new ByteArrayContent(Utf8("garbage without any boundary\r\n"));
        wrong.Headers.ContentType = MediaTypeHeaderValue.Parse("multipart/form-data; boundary=zzz");
        await Refused(wrong);
    }

    [Fact]
    public async Task Upload_RefusesWithProblem_WhenContentLengthClaimsTwoGigabytes()
    {
        var claim = new ClaimingContent(Utf8("--b1\r\nContent-Disposition: form-data; name=\"photometry\"; filename=\"p.csv\"\r\n\r\n" + Header), 2L << 30);
        claim.Headers.ContentType = MediaTypeHeaderValue.Parse("multipart/form-data; boundary=b1");
        var body = await Refused(claim, status: 413);
        Assert.Contains("PulseLadder:MaxUploadBytes", body.GetProperty("detail").GetString());
    }

    [Fact]
    public async Task Upload_Refuses413_WhenAStreamedBodyPassesTheConfiguredLimit()
    {
        // The limit comes from configuration (environment, as an operator sets it); Web.Tests run one test at a time.
        Environment.SetEnvironmentVariable("PulseLadder__MaxUploadBytes", "65536");
        TestApp small;
        try { small = await TestApp.StartAsync(runJobs: false); }
        finally { Environment.SetEnvironmentVariable("PulseLadder__MaxUploadBytes", null); }
        await using (small)
        {
            var sb = new StringBuilder(Header);
            for (int i = 0; sb.Length < 300_000; i++) sb.Append(CultureInfo.InvariantCulture, $"T-CEP-1,{11000.5 + i * 0.01:F2},V,13.9,0.02\n");
            var form = new MultipartFormDataContent
            {
                { new StringContent(Fixtures.StarList), "stars", "stars.csv" },
                // A non-seekable stream: no Content-Length, so only reading the body can find the size.
                { new StreamContent(new OneWayStream(Utf8(sb.ToString()))), "photometry", "big.csv" },
                { new StringContent("jd_utc"), "time_scale" }, { new StringContent("2450000"), "time_offset" },
            };
            using var resp = await small.Client.PostAsync("/api/v1/uploads", new OneWayContent(form));
            Assert.Equal(HttpStatusCode.RequestEntityTooLarge, resp.StatusCode);
            Assert.Equal("application/problem+json", resp.Content.Headers.ContentType?.MediaType);
            using var c = small.Db.Open();
            Assert.Equal(0, c.ExecuteScalar<long>("SELECT COUNT(*) FROM observations") + c.ExecuteScalar<long>("SELECT COUNT(*) FROM stars") + c.ExecuteScalar<long>("SELECT COUNT(*) FROM uploads"));
        }
    }

    /// <summary>Sends another content's bytes without announcing a length (chunked).</summary>
    private sealed class OneWayContent : HttpContent
    {
        private readonly HttpContent _inner;

        public OneWayContent(HttpContent inner)
        {
            _inner = inner;
            foreach (var h in inner.Headers) if (h.Key != "Content-Length") Headers.TryAddWithoutValidation(h.Key, h.Value);
        }

        protected override Task SerializeToStreamAsync(Stream stream, TransportContext? context) => _inner.CopyToAsync(stream);

        protected override bool TryComputeLength(out long length)
        {
            length = 0;
            return false;
        }
    }

    private sealed class OneWayStream(byte[] data) : MemoryStream(data)
    {
        public override bool CanSeek => false;
    }

    /// <summary>A body that announces <paramref name="claimed"/> bytes and sends far fewer.</summary>
    private sealed class ClaimingContent(byte[] actual, long claimed) : HttpContent
    {
        protected override Task SerializeToStreamAsync(Stream stream, TransportContext? context) => stream.WriteAsync(actual).AsTask();

        protected override bool TryComputeLength(out long length)
        {
            length = claimed;
            return true;
        }
    }
}
