using Microsoft.AspNetCore.Http.HttpResults;
using Microsoft.AspNetCore.WebUtilities;
using Microsoft.Net.Http.Headers;
using Microsoft.AspNetCore.Mvc;
using Microsoft.Extensions.Options;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Jobs;
using PulseLadder.Storage;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web.Api;

public sealed record RowError(string File, long Line, string? Column, string Message);

public sealed record PreviewRow(long Line, string Star, double Time, string Band, double Mag, double MagErr, string Observer, string? Flag);

public sealed record UploadFileReport(string File, string Kind, string Format, long Rows, bool Duplicate, IReadOnlyList<string> Columns,
    IReadOnlyList<string> Warnings, IReadOnlyList<PreviewRow> Preview);

public sealed record UploadResponse(long? UploadId, bool Stored, bool Duplicate, IReadOnlyList<UploadFileReport> Files,
    int StarsAdded, long ObservationsAdded, int StarsQueued);

public sealed record UploadStatus(long UploadId, IReadOnlyList<string> FileNames, long StarsTotal, long StarsDone, string State);

/// <summary>Uploads of star lists and nightly photometry. Bad input is refused whole, with every bad row listed.</summary>
public static class UploadsApi
{
    public static void Map(RouteGroupBuilder api)
    {
        api.MapPost("/uploads", Create).DisableAntiforgery().RequireAuthorization(Policies.Observer).WithRequestTimeout(AuthSetup.LongRequest).WithName("CreateUpload");
        api.MapGet("/uploads/{uploadId:long}", Status).RequireAuthorization(Policies.Observer).WithName("GetUpload");
        api.MapGet("/time-scales", () => TypedResults.Ok(TimeScales.AllCodes)).RequireAuthorization(Policies.Observer).WithName("ListTimeScales");
    }

    /// <summary>
    /// Stores an upload. The multipart body is streamed: each file is spooled to a temporary file while its SHA-256 is
    /// computed, then read once to validate (rows not kept) and, when clean, once more inside the storing
    /// transaction, so memory does not grow with the upload. PulseLadder:MaxUploadBytes and PulseLadder:MaxUploadRows
    /// are refused with 413 naming the limit.
    /// </summary>
    public static async Task<Results<Created<UploadResponse>, Ok<UploadResponse>, ProblemHttpResult>> Create(
        HttpRequest request, Database db, IAnalysisQueue queue, TimeProvider clock, IOptions<PulseLadderOptions> options)
    {
        if (!request.HasFormContentType || !MediaTypeHeaderValue.TryParse(request.ContentType, out var mediaType)
            || !mediaType.MediaType.Equals("multipart/form-data", StringComparison.OrdinalIgnoreCase)
            || HeaderUtilities.RemoveQuotes(mediaType.Boundary).Value is not { Length: > 0 } boundary)
            return Problem(400, "Not a form upload", "Send multipart/form-data with 'stars' and/or 'photometry' files.", []);
        long maxBytes = options.Value.MaxUploadBytes;
        if (request.ContentLength > maxBytes) return TooLarge(BytesLimit(maxBytes));

        using var spool = new UploadSpool();
        var fields = new Dictionary<string, string>(StringComparer.Ordinal);
        try
        {
            if (await spool.ReadAsync(request.Body, boundary, fields, maxBytes, request.HttpContext.RequestAborted) is { } limitError)
                return TooLarge(limitError);
        }
        catch (BadHttpRequestException e) when (e.StatusCode == StatusCodes.Status413PayloadTooLarge)
        {
            return TooLarge(BytesLimit(maxBytes));
        }
        catch (Exception e) when (e is InvalidDataException or IOException or BadHttpRequestException)
        {
            // A broken multipart body (unclosed boundary, truncated stream) is the sender's error, not a server fault.
            return Problem(400, "Malformed form upload", "The multipart/form-data body could not be read: " + e.Message, []);
        }
        string? Field(string name) => fields.TryGetValue(name, out var v) ? v : null;

        bool preview = string.Equals(Field("preview"), "true", StringComparison.OrdinalIgnoreCase);
        var starFile = spool.Files.Where(f => f.Name == "stars").Select(f => f.File).FirstOrDefault();
        var photFiles = spool.Files.Where(f => f.Name == "photometry").Select(f => f.File).ToList();
        if (starFile is null && photFiles.Count == 0)
            return Problem(400, "Nothing to upload", "Send a 'stars' file, 'photometry' files, or both.", []);

        var errors = new List<RowError>();
        var reports = new List<UploadFileReport>();
        TimeScale scale = default;
        double offset = 0;
        if (photFiles.Count > 0 && !UploadMetadata.TryParse(Field("time_scale"), Field("time_offset"), out scale, out offset, out var metaError))
            errors.Add(new RowError("(form)", 0, Field("time_scale") is null ? "time_scale" : "time_offset", metaError!));

        StarListFile? starList = null;
        var known = new HashSet<string>(StringComparer.Ordinal);
        using (var c = db.Open()) known.UnionWith(StarStore.IdsByName(c).Keys);
        if (starFile is not null)
        {
            var parsed = UploadParsing.ReadStars(starFile);
            errors.AddRange(parsed.Errors.Select(ToRowError));
            known.UnionWith(parsed.Rows.Select(s => s.Name));
            starList = new StarListFile(starFile.FileName, starFile.Sha256, parsed.Rows);
            IReadOnlyList<string> columns;
            using (var head = File.OpenRead(starFile.Path)) columns = UploadParsing.HeaderColumns(head);
            reports.Add(new UploadFileReport(starFile.FileName, "stars", "csv", parsed.Rows.Count, false, columns,
                parsed.Warnings.Select(w => w.ToString()).ToList(), []));
        }

        int maxRows = options.Value.MaxUploadRows;
        long rowsSoFar = 0;
        var validated = new List<ValidatedPhotometry>();
        bool keepRows = !preview && photFiles.Sum(f => f.Length) <= options.Value.InMemoryUploadBytes;
        foreach (var pf in photFiles)
        {
            int budget = (int)Math.Max(0, maxRows - rowsSoFar);
            var v = UploadParsing.ValidatePhotometry(pf, scale, offset, known, Field("star"), Field("band"), Field("observer"), budget, keepRows: keepRows);
            if (v.Summary.Errors.Any(e => e.Code == IngestIssueCode.TooManyRows))
                return TooLarge($"The photometry has more than {maxRows} rows in total (setting '{PulseLadderOptions.Section}:MaxUploadRows'); nothing was stored.");
            rowsSoFar += v.Summary.AcceptedRows + v.Summary.RejectedRows;
            errors.AddRange(v.Summary.Errors.Select(ToRowError));
            validated.Add(v);
            reports.Add(new UploadFileReport(pf.FileName, "photometry", v.Format, v.Summary.AcceptedRows, false, v.Columns,
                v.Summary.Warnings.Select(w => w.ToString()).ToList(),
                v.Preview.Select(r => new PreviewRow(r.Line, r.Star, r.Observation.Time, r.Observation.Band,
                    r.Observation.Mag, r.Observation.MagErr, r.Observation.Observer, r.Observation.Flag)).ToList()));
        }

        if (errors.Count > 0)
            return Problem(400, "Upload refused", $"{errors.Count} problem(s) found; nothing was stored.", errors);
        if (preview)
            return TypedResults.Ok(new UploadResponse(null, false, false, reports, 0, 0, 0));

        // Small uploads are stored from the rows their validation kept; larger files are read a second time inside the
        // storing transaction, with the same checks, streaming their rows (PulseLadder:InMemoryUploadBytes).
        var photometry = validated.Select(v => new PhotometryFile(v.File.FileName, v.File.Sha256, scale, offset, [])
        {
            RowCount = v.Summary.AcceptedRows,
            StreamRows = onBatch => UploadParsing.StreamPhotometry(v, scale, offset, known, Field("star"), Field("band"), Field("observer"), maxRows, onBatch),
        }).ToList();
        // The signed-in account, never a form field: the audit trail must name who really sent the data.
        string actor = request.HttpContext.User.Identity!.Name!;
        var outcome = UploadWriter.Store(db, starList, photometry, actor, clock);
        queue.EnqueueStars(outcome.StarsToAnalyse);
        var dup = outcome.DuplicateFiles.ToHashSet();
        reports = reports.Select(r => r with { Duplicate = dup.Contains(r.File) }).ToList();
        bool allDuplicate = reports.Count > 0 && reports.All(r => r.Duplicate);
        var body = new UploadResponse(outcome.BatchId, true, allDuplicate, reports, outcome.StarsAdded, outcome.ObservationsAdded, outcome.StarsToAnalyse.Count);
        return TypedResults.Created($"/api/v1/uploads/{outcome.BatchId}", body);
    }

    private static string BytesLimit(long maxBytes) =>
        $"The upload is larger than {maxBytes} bytes (setting '{PulseLadderOptions.Section}:MaxUploadBytes'); nothing was stored.";

    private static ProblemHttpResult TooLarge(string detail) => Problem(413, "Upload too large", detail, []);

    public static Results<Ok<UploadStatus>, ProblemHttpResult> Status(Database db, long uploadId)
    {
        using var c = db.Open();
        var files = UploadStore.Batch(c, uploadId);
        if (files.Count == 0) return FieldsApi.NotFound($"No upload with id {uploadId}.");
        var (total, done) = UploadStore.BatchProgress(c, uploadId, PipelineVersion.Current);
        return TypedResults.Ok(new UploadStatus(uploadId, files.Select(f => f.FileName).ToList(), total, done, done >= total ? "done" : "analysing"));
    }

    private static RowError ToRowError(IngestIssue i) => new(i.File, i.Line, i.Column, i.Message);

    private static ProblemHttpResult Problem(int status, string title, string detail, IReadOnlyList<RowError> errors) =>
        TypedResults.Problem(new ProblemDetails
        {
            Status = status, Title = title, Detail = detail,
            Extensions = { ["errors"] = errors.Take(1000).ToList(), ["error_count"] = errors.Count },
        });
}
