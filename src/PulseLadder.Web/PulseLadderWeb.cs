using Hangfire;
using Microsoft.AspNetCore.Http.Features;
using Microsoft.Extensions.Options;
using PulseLadder.Jobs;
using PulseLadder.Storage;
using PulseLadder.Web.Api;
using PulseLadder.Web.Auth;

namespace PulseLadder.Web;

/// <summary>Builds the web host: API, pages, and (embedded default) the job server in the same process.</summary>
public static class PulseLadderWeb
{
    /// <summary>Creates the application. <paramref name="configure"/> lets the CLI and tests adjust the builder.</summary>
    public static WebApplication Build(string[] args, Action<WebApplicationBuilder>? configure = null)
    {
        var builder = WebApplication.CreateBuilder(new WebApplicationOptions
        {
            Args = args,
            ContentRootPath = AppContext.BaseDirectory,
            WebRootPath = Path.Combine(AppContext.BaseDirectory, "wwwroot"),
        });
        configure?.Invoke(builder);

        var options = builder.Configuration.GetSection(PulseLadderOptions.Section).Get<PulseLadderOptions>() ?? new PulseLadderOptions();
        if (options.Validate() is { } optionsError) throw new InvalidOperationException(optionsError);
        var jobs = builder.Configuration.GetSection(JobsOptions.Section).Get<JobsOptions>() ?? new JobsOptions();
        if (!options.EffectiveDatabase.StartsWith("postgres:", StringComparison.OrdinalIgnoreCase))
            Directory.CreateDirectory(Path.GetFullPath(options.DataDir));
        var database = Database.FromSetting(options.EffectiveDatabase);
        // Before anything touches the database: a bad administrator file stops start-up with file, line and field.
        var calibrations = Calibrations.LoadFolderOrThrow(options.EffectiveCalibrationDir);

        builder.Services.AddSingleton(Options.Create(options));
        builder.Services.AddSingleton(database);
        builder.Services.AddSingleton(TimeProvider.System);
        builder.Services.AddPulseLadderCalibrations(calibrations);
        builder.Services.AddPulseLadderJobs(jobs, database, isWorkerOnly: false);
        builder.Services.AddHostedService<StartupRecovery>();
        builder.Services.AddProblemDetails();
        builder.Services.AddOpenApi("v1");
        builder.Services.ConfigureHttpJsonOptions(o =>
        {
            o.SerializerOptions.PropertyNamingPolicy = Json.Options.PropertyNamingPolicy;
            o.SerializerOptions.NumberHandling = Json.Options.NumberHandling;
            foreach (var conv in Json.Options.Converters) o.SerializerOptions.Converters.Add(conv);
        });
        builder.Services.Configure<FormOptions>(o => o.MultipartBodyLengthLimit = options.MaxUploadBytes);
        builder.WebHost.ConfigureKestrel(k => k.Limits.MaxRequestBodySize = options.MaxUploadBytes);
        builder.AddPulseLadderAuth(options);
        builder.Services.Configure<ExceptionHandlerOptions>(o =>
        {
            o.StatusCodeSelector = ex => ex switch
            {
                // Kestrel's body limit (a body without Content-Length that grows too long) and the multipart limit.
                BadHttpRequestException b => b.StatusCode,
                InvalidDataException d when IsLengthLimit(d) => 413,
                _ => 500,
            };
            // A client's oversized or malformed request is its error, not the server's: no error log for it.
            o.SuppressDiagnosticsCallback = ctx => ctx.Exception is BadHttpRequestException || (ctx.Exception is InvalidDataException d && IsLengthLimit(d));
        });
        builder.Services.Configure<ProblemDetailsOptions>(o => o.CustomizeProblemDetails = ctx =>
        {
            if (ctx.ProblemDetails.Status == 413 && ctx.ProblemDetails.Detail is null)
                ctx.ProblemDetails.Detail = $"The request body is over the limit of {options.MaxUploadBytes} bytes (setting 'PulseLadder:MaxUploadBytes').";
        });

        var app = builder.Build();
        if (options.Auth.SingleUser) AuthSetup.StopUnlessBoundToLoopback(app);

        // The web host owns the schema: migrate before anything (hosted services, requests) touches the database.
        database.Migrate(app.Services.GetRequiredService<TimeProvider>());
        Calibrations.RecordInUse(database, calibrations, options.EffectiveCalibrationDir, app.Services.GetRequiredService<TimeProvider>().GetUtcNow().ToString("O"));
        app.Logger.LogInformation("Calibration registry {Hash} ({Count} relations; administrator files: {Files}) from {Folder}",
            calibrations.Hash[..12], calibrations.Relations.Count, calibrations.UserFiles.Count == 0 ? "none" : string.Join(", ", calibrations.UserFiles), options.EffectiveCalibrationDir);

        app.UseExceptionHandler();
        app.Use(async (ctx, next) =>
        {
            var h = ctx.Response.Headers;
            h.XContentTypeOptions = "nosniff";
            h.XFrameOptions = "DENY";
            h["Referrer-Policy"] = "no-referrer";
            await next();
        });
        app.UseStatusCodePages();
        app.Use((ctx, next) => AuthSetup.BodySizeGuardAsync(ctx, next, options.MaxUploadBytes));
        app.UseDefaultFiles();
        // The sign-in page and its files are the only static files served without an account.
        app.UseWhen(ctx => AuthSetup.IsPublicFile(ctx.Request.Path), b => b.UseStaticFiles());
        app.UseRouting();
        app.UseAuthentication();
        app.UseRateLimiter();
        app.UseRequestTimeouts();
        app.Use(AuthSetup.CsrfGuardAsync);
        app.UseAuthorization();
        // After UseAuthorization: the fallback policy (signed in) covers every other page and file.
        app.UseStaticFiles();
        app.MapOpenApi("/openapi/{documentName}.json").RequireAuthorization(Policies.Observer);
        app.MapGet("/health", () => TypedResults.Ok(new { status = "ok" })).AllowAnonymous().ExcludeFromDescription();
        app.MapHangfireDashboard("/jobs", new DashboardOptions { Authorization = [new AdminDashboardFilter()] })
            .RequireAuthorization(Policies.Admin);
        var api = app.MapGroup("/api/v1");
        AccountApi.Map(api);
        AdminApi.Map(api);
        UploadsApi.Map(api);
        FieldsApi.Map(api);
        StarsApi.Map(api);
        ReviewApi.Map(api);
        ExportApi.Map(api);
        return app;
    }

    private static bool IsLengthLimit(InvalidDataException e) => e.Message.Contains("length limit", StringComparison.OrdinalIgnoreCase);
}
