using Microsoft.AspNetCore.Mvc;

namespace PulseLadder.Web.Auth;

/// <summary>ProblemDetails answers written from middleware and authentication events (outside endpoint results).</summary>
internal static class Problems
{
    public static async Task WriteAsync(HttpContext ctx, int status, string title, string detail)
    {
        ctx.Response.StatusCode = status;
        var pd = new ProblemDetails { Status = status, Title = title, Detail = detail };
        var service = ctx.RequestServices.GetService<IProblemDetailsService>();
        if (service is null || !await service.TryWriteAsync(new ProblemDetailsContext { HttpContext = ctx, ProblemDetails = pd }))
        {
            ctx.Response.ContentType = "application/problem+json";
            await ctx.Response.WriteAsJsonAsync(pd);
        }
    }

    /// <summary>API and machine-read paths answer with status codes; everything else is a page and may be redirected.</summary>
    public static bool IsApi(HttpRequest r) =>
        r.Path.StartsWithSegments("/api") || r.Path.StartsWithSegments("/openapi") || r.Path.StartsWithSegments("/health")
        || r.Headers.Authorization.Count > 0;
}
