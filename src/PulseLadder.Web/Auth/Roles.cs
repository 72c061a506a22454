namespace PulseLadder.Web.Auth;

/// <summary>
/// The three roles, each including everything the one before may do: observer (upload, view), reviewer (+ review
/// decisions, exports), admin (+ users, other people's tokens, field settings, the job dashboard, the audit log).
/// </summary>
public static class Roles
{
    public const string Observer = "observer";
    public const string Reviewer = "reviewer";
    public const string Admin = "admin";

    public static readonly IReadOnlyList<string> All = [Observer, Reviewer, Admin];

    public static bool IsKnown(string? role) => role is Observer or Reviewer or Admin;
}

/// <summary>Authorisation policy names; each endpoint names one of these (or AllowAnonymous) explicitly.</summary>
public static class Policies
{
    /// <summary>Any signed-in account (observer, reviewer or admin).</summary>
    public const string Observer = "observer";

    /// <summary>Reviewers and admins.</summary>
    public const string Reviewer = "reviewer";

    /// <summary>Admins only.</summary>
    public const string Admin = "admin";
}

/// <summary>Claim types and values PulseLadder adds to a signed-in principal.</summary>
internal static class PlxClaims
{
    /// <summary>How the request was authenticated: <see cref="ViaCookie"/>, <see cref="ViaToken"/> or <see cref="ViaSingleUser"/>.</summary>
    public const string AuthMethod = "plx:auth";
    public const string SecurityStamp = "plx:stamp";
    public const string TokenId = "plx:token";
    public const string UserId = "plx:uid";

    public const string ViaCookie = "cookie";
    public const string ViaToken = "token";
    public const string ViaSingleUser = "single-user";
}
