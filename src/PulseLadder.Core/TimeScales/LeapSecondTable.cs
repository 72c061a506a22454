using System.Globalization;
using System.Reflection;

namespace PulseLadder.Core.TimeScales;

/// <summary>Why a UTC date could not be put on TT.</summary>
internal enum UtcStatus
{
    Ok,
    /// <summary>Before 1960-01-01: no UTC existed; TAI-UTC = 0 is used (the value is still returned).</summary>
    PreUtc,
    /// <summary>After the table's expiry: a leap second may have happened that the table does not know.</summary>
    Expired,
}

/// <summary>
/// TAI-UTC as a function of the UTC Julian date.
/// From 1972-01-01: the embedded IERS leap-second list (Data/time/leap-seconds.list, see its SOURCE.md), which
/// carries its own expiry date. From 1960-01-01 to 1971-12-31: the official rubber-second offsets and drift
/// rates of that era (the segments of the BIH/USNO TAI-UTC table, written here from memory as tabulated in ERFA's
/// eraDat; tests check them against astropy/ERFA). Before 1960 no UTC existed: the time is taken as UT with
/// TAI-UTC = 0 (the same convention as ERFA/astropy, which warn "dubious year"); the true TT-UT (Delta T) was
/// between about -3 s (1900) and +33 s (1960), so such times may be off by up to ~35 s.
/// </summary>
internal sealed class LeapSecondTable
{
    private const double NtpEpochJd = 2415020.5; // 1900-01-01 00:00 UTC

    // (JD of start, TAI-UTC at MJD0, MJD0, rate s/day): TAI-UTC = offset + (MJD - MJD0) * rate.
    private static readonly (double StartJd, double Offset, double Mjd0, double Rate)[] RubberSecondEra =
    [
        (2436934.5, 1.4178180, 37300, 0.0012960), // 1960-01-01
        (2437300.5, 1.4228180, 37300, 0.0012960), // 1961-01-01
        (2437512.5, 1.3728180, 37300, 0.0012960), // 1961-08-01
        (2437665.5, 1.8458580, 37665, 0.0011232), // 1962-01-01
        (2438334.5, 1.9458580, 37665, 0.0011232), // 1963-11-01
        (2438395.5, 3.2401300, 38761, 0.0012960), // 1964-01-01
        (2438486.5, 3.3401300, 38761, 0.0012960), // 1964-04-01
        (2438639.5, 3.4401300, 38761, 0.0012960), // 1964-09-01
        (2438761.5, 3.5401300, 38761, 0.0012960), // 1965-01-01
        (2438820.5, 3.6401300, 38761, 0.0012960), // 1965-03-01
        (2438942.5, 3.7401300, 38761, 0.0012960), // 1965-07-01
        (2439004.5, 3.8401300, 38761, 0.0012960), // 1965-09-01
        (2439126.5, 4.3131700, 39126, 0.0025920), // 1966-01-01
        (2439887.5, 4.2131700, 39126, 0.0025920), // 1968-02-01
    ];

    private readonly double[] _stepJd;
    private readonly double[] _taiMinusUtc;

    /// <summary>Expiry of the leap-second list (UTC JD): later dates are refused.</summary>
    public double ExpiresJd { get; }

    /// <summary>Last update of the list (UTC JD).</summary>
    public double UpdatedJd { get; }

    /// <summary>The table embedded in the assembly.</summary>
    public static LeapSecondTable Embedded { get; } = LoadEmbedded();

    private LeapSecondTable(double[] stepJd, double[] taiMinusUtc, double expiresJd, double updatedJd)
    {
        _stepJd = stepJd;
        _taiMinusUtc = taiMinusUtc;
        ExpiresJd = expiresJd;
        UpdatedJd = updatedJd;
    }

    /// <summary>
    /// Manifest name of the embedded list. The csproj names resources "PulseLadder.Core.Data." + RecursiveDir + file,
    /// and MSBuild keeps the directory separator of the build machine in RecursiveDir ("time/" on Linux, "time\\" on
    /// Windows), so the name is looked up rather than hard-coded.
    /// </summary>
    public static string ResourceName =>
        typeof(LeapSecondTable).Assembly.GetManifestResourceNames()
            .FirstOrDefault(n => n.StartsWith("PulseLadder.Core.Data.time", StringComparison.Ordinal) && n.EndsWith("leap-seconds.list", StringComparison.Ordinal))
        ?? "PulseLadder.Core.Data.time/leap-seconds.list";

    private static LeapSecondTable LoadEmbedded()
    {
        using var stream = typeof(LeapSecondTable).Assembly.GetManifestResourceStream(ResourceName)
            ?? throw new InvalidOperationException("Embedded resource " + ResourceName + " is missing (build error).");
        using var reader = new StreamReader(stream);
        return Parse(reader.ReadToEnd());
    }

    /// <summary>Parses the IERS/NTP "leap-seconds.list" format; throws on a malformed file (a build-time bug).</summary>
    public static LeapSecondTable Parse(string text)
    {
        var steps = new List<(double Jd, double Dat)>();
        double expires = double.NaN, updated = double.NaN;
        foreach (var raw in text.Split('\n'))
        {
            var line = raw.Trim();
            if (line.Length == 0) continue;
            if (line.StartsWith("#@", StringComparison.Ordinal)) { expires = NtpToJd(line[2..]); continue; }
            if (line.StartsWith("#$", StringComparison.Ordinal)) { updated = NtpToJd(line[2..]); continue; }
            if (line[0] == '#') continue;
            var body = line.Split('#')[0];
            var parts = body.Split([' ', '\t'], StringSplitOptions.RemoveEmptyEntries);
            if (parts.Length < 2) throw new FormatException("Bad leap-second line: " + line);
            steps.Add((NtpToJd(parts[0]), double.Parse(parts[1], NumberStyles.Float, CultureInfo.InvariantCulture)));
        }
        if (steps.Count == 0 || double.IsNaN(expires)) throw new FormatException("Leap-second list without entries or expiry.");
        steps.Sort((a, b) => a.Jd.CompareTo(b.Jd));
        return new LeapSecondTable(steps.Select(s => s.Jd).ToArray(), steps.Select(s => s.Dat).ToArray(), expires, updated);
    }

    private static double NtpToJd(string s) =>
        NtpEpochJd + double.Parse(s.Trim(), NumberStyles.Float, CultureInfo.InvariantCulture) / 86400.0;

    /// <summary>Number of leap-second entries (1972 onwards).</summary>
    public int Count => _stepJd.Length;

    /// <summary>
    /// TAI-UTC in seconds at UTC Julian date <paramref name="jdUtc"/>. As in ERFA, a UTC day that ends with a leap
    /// second is treated as 86401 s long, so the Julian-date representation spreads that second over the day.
    /// </summary>
    public double TaiMinusUtc(double jdUtc, out UtcStatus status)
    {
        status = UtcStatus.Ok;
        if (jdUtc >= ExpiresJd) status = UtcStatus.Expired;
        if (jdUtc < _stepJd[0])
        {
            if (jdUtc < RubberSecondEra[0].StartJd) { status = UtcStatus.PreUtc; return 0.0; }
            return RubberSeconds(jdUtc);
        }
        int i = Array.BinarySearch(_stepJd, jdUtc);
        if (i < 0) i = ~i - 1;
        double dat = _taiMinusUtc[i];
        // Day that ends with a step: spread it linearly over that UTC day.
        if (i + 1 < _stepJd.Length && _stepJd[i + 1] - jdUtc < 1.0)
        {
            double dayStart = _stepJd[i + 1] - 1.0;
            dat += (jdUtc - dayStart) * (_taiMinusUtc[i + 1] - dat);
        }
        return dat;
    }

    private static double RubberSeconds(double jdUtc)
    {
        int i = RubberSecondEra.Length - 1;
        while (i > 0 && jdUtc < RubberSecondEra[i].StartJd) i--;
        var seg = RubberSecondEra[i];
        double mjd = jdUtc - 2400000.5;
        return seg.Offset + (mjd - seg.Mjd0) * seg.Rate;
    }

    /// <summary>Formats a Julian date as an ISO calendar date (for messages).</summary>
    public static string JdToIsoDate(double jd)
    {
        var date = new DateTime(1858, 11, 17, 0, 0, 0, DateTimeKind.Utc).AddDays(jd - 2400000.5);
        return date.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture);
    }
}
