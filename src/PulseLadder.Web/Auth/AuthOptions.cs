namespace PulseLadder.Web.Auth;

/// <summary>Configuration section "PulseLadder:Auth".</summary>
public sealed class AuthOptions
{
    /// <summary>
    /// Every request acts as the local admin "local", without signing in. Refused at start-up unless every address
    /// the server listens on is a loopback address. For one person on their own machine only.
    /// </summary>
    public bool SingleUser { get; set; }

    /// <summary>Sign-in cookie lifetime, hours, renewed while in use (sliding).</summary>
    public double SessionHours { get; set; } = 12;

    public string? Validate()
    {
        if (!(SessionHours is >= 0.05 and <= 24 * 90)) return "Setting 'PulseLadder:Auth:SessionHours' must be between 0.05 and 2160.";
        return null;
    }
}

/// <summary>Configuration section "PulseLadder:Limits": request rates and time limits.</summary>
public sealed class LimitsOptions
{
    /// <summary>Requests per minute per account (per client address when not signed in); 0 switches the limit off.</summary>
    public int RequestsPerMinute { get; set; } = 1200;

    /// <summary>Sign-in attempts per minute per client address (guessing passwords).</summary>
    public int SignInAttemptsPerMinute { get; set; } = 10;

    /// <summary>Time limit of an ordinary request, seconds.</summary>
    public double RequestTimeoutSeconds { get; set; } = 100;

    /// <summary>Time limit of uploads and exports, seconds.</summary>
    public double LongRequestTimeoutSeconds { get; set; } = 1800;

    public string? Validate()
    {
        if (RequestsPerMinute < 0) return "Setting 'PulseLadder:Limits:RequestsPerMinute' must be 0 (off) or positive.";
        if (SignInAttemptsPerMinute < 1) return "Setting 'PulseLadder:Limits:SignInAttemptsPerMinute' must be positive.";
        if (!(RequestTimeoutSeconds is >= 1 and <= 86400)) return "Setting 'PulseLadder:Limits:RequestTimeoutSeconds' must be between 1 and 86400.";
        if (!(LongRequestTimeoutSeconds is >= 1 and <= 86400)) return "Setting 'PulseLadder:Limits:LongRequestTimeoutSeconds' must be between 1 and 86400.";
        return null;
    }
}
