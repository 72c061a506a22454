using Microsoft.AspNetCore.Http.HttpResults;
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

    public static async Task<Results<Created<UploadResponse>, Ok<UploadResponse>, ProblemHttpResult>> Create(
        HttpRequest request, Database db, IAnalysisQueue queue, TimeProvider clock, IOptions<PulseLadderOptions> options)
    {
        if (!request.HasFormContentType)
            return Problem(400, "Not a form upload", "Send multipart/form-data with 'stars' and/or 'photometry' files.", []);
        // Kestrel refuses an oversize Content-Length itself; other servers (test host, proxies) may not.
        if (request.ContentLength is { } claimed && claimed > options.Value.MaxUploadBytes)
            return Problem(413, "Upload too large", $"The request announces {claimed} bytes; the limit is {options.Value.MaxUploadBytes} (setting 'PulseLadder:MaxUploadBytes').", []);
        IFormCollection form;
        try
        {
            form = await request.ReadFormAsync();
        }
        catch (InvalidDataException e) when (e.Message.Contains("limit", StringComparison.OrdinalIgnoreCase))
        {
            return Problem(413, "Upload too large", e.Message + $" (setting 'PulseLadder:MaxUploadBytes' is {options.Value.MaxUploadBytes} bytes).", []);
        }
        catch (Exception e) when (e is InvalidDataException or IOException or BadHttpRequestException)
        {
            // A broken multipart body (unclosed boundary, truncated stream) is the sender's error, not a server fault.
            return Problem(400, "Malformed form upload", "The multipart/form-data body could not be read: " + e.Message, []);
        }
        bool preview = string.Equals(form["preview"], "true", StringComparison.OrdinalIgnoreCase);
        var starFile = form.Files.GetFile("stars");
        var photFiles = form.Files.GetFiles("photometry");
        if (starFile is null && photFiles.Count == 0)
            return Problem(400, "Nothing to upload", "Send a 'stars' file, 'photometry' files, or both.", []);

        var errors = new List<RowError>();
        var reports = new List<UploadFileReport>();
        TimeScale scale = default;
        double offset = 0;
        if (photFiles.Count > 0 && !UploadMetadata.TryParse(form["time_scale"], form["time_offset"], out scale, out offset, out var metaError))
            errors.Add(new RowError("(form)", 0, form["time_scale"].Count == 0 ? "time_scale" : "time_offset", metaError!));

        StarListFile? starList = null;
        var known = new HashSet<string>(StringComparer.Ordinal);
        using (var c = db.Open()) known.UnionWith(StarStore.IdsByName(c).Keys);
        if (starFile is not null)
        {
            var f = await Read(starFile);
            var (sha, parsed) = UploadParsing.ReadStars(f);
            errors.AddRange(parsed.Errors.Select(ToRowError));
            known.UnionWith(parsed.Rows.Select(s => s.Name));
            starList = new StarListFile(f.FileName, sha, parsed.Rows);
            reports.Add(new UploadFileReport(f.FileName, "stars", "csv", parsed.Rows.Count, false, UploadParsing.HeaderColumns(f.Content),
                parsed.Warnings.Select(w => w.ToString()).ToList(), []));
        }

        var photometry = new List<PhotometryFile>();
        if (errors.Count == 0 || photFiles.Count > 0)
        {
            foreach (var pf in photFiles)
            {
                var f = await Read(pf);
                var parsed = UploadParsing.ReadPhotometry(f, scale, offset, known, form["star"], form["band"], form["observer"], options.Value.MaxUploadRows);
                errors.AddRange(parsed.Result.Errors.Select(ToRowError));
                photometry.Add(new PhotometryFile(f.FileName, parsed.Sha256, scale, offset, parsed.Result.Rows));
                reports.Add(new UploadFileReport(f.FileName, "photometry", parsed.Format, parsed.Result.Rows.Count, false, parsed.Columns,
                    parsed.Result.Warnings.Select(w => w.ToString()).ToList(),
                    parsed.Result.Rows.Take(10).Select(r => new PreviewRow(r.Line, r.Star, r.Observation.Time, r.Observation.Band,
                        r.Observation.Mag, r.Observation.MagErr, r.Observation.Observer, r.Observation.Flag)).ToList()));
            }
        }

        if (errors.Count > 0)
            return Problem(400, "Upload refused", $"{errors.Count} problem(s) found; nothing was stored.", errors);
        if (preview)
            return TypedResults.Ok(new UploadResponse(null, false, false, reports, 0, 0, 0));

        // The signed-in account, never a form field: the audit trail must name who really sent the data.
        string actor = request.HttpContext.User.Identity!.Name!;
        var outcome = UploadWriter.Store(db, starList, photometry, actor, clock);
        foreach (var (starId, revision) in outcome.StarsToAnalyse) queue.EnqueueStar(starId, revision);
        var dup = outcome.DuplicateFiles.ToHashSet();
        reports = reports.Select(r => r with { Duplicate = dup.Contains(r.File) }).ToList();
        bool allDuplicate = reports.Count > 0 && reports.All(r => r.Duplicate);
        var body = new UploadResponse(outcome.BatchId, true, allDuplicate, reports, outcome.StarsAdded, outcome.ObservationsAdded, outcome.StarsToAnalyse.Count);
        return TypedResults.Created($"/api/v1/uploads/{outcome.BatchId}", body);
    }

    public static Results<Ok<UploadStatus>, ProblemHttpResult> Status(Database db, long uploadId)
    {
        using var c = db.Open();
        var files = UploadStore.Batch(c, uploadId);
        if (files.Count == 0) return FieldsApi.NotFound($"No upload with id {uploadId}.");
        var (total, done) = UploadStore.BatchProgress(c, uploadId, PipelineVersion.Current);
        return TypedResults.Ok(new UploadStatus(uploadId, files.Select(f => f.FileName).ToList(), total, done, done >= total ? "done" : "analysing"));
    }

    private static async Task<IncomingFile> Read(IFormFile f)
    {
        using var ms = new MemoryStream();
        await f.CopyToAsync(ms);
        return new IncomingFile(Path.GetFileName(f.FileName), ms.ToArray());
    }

    private static RowError ToRowError(IngestIssue i) => new(i.File, i.Line, i.Column, i.Message);

    private static ProblemHttpResult Problem(int status, string title, string detail, IReadOnlyList<RowError> errors) =>
        TypedResults.Problem(new ProblemDetails
        {
            Status = status, Title = title, Detail = detail,
            Extensions = { ["errors"] = errors.Take(1000).ToList(), ["error_count"] = errors.Count },
        });
}
