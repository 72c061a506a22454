namespace PulseLadder.Demo;

/// <summary>Class codes as the star list and truth file write them (the codes PulseLadder's star list accepts).</summary>
public static class DemoClass
{
    public const string CepheidF = "dcep_f", CepheidFirstOvertone = "dcep_1o", RRab = "rrab", RRc = "rrc", Constant = "constant";
}

/// <summary>An invented field: where it is, how far, how reddened.</summary>
/// <param name="Name">Field name as written in the star list.</param>
/// <param name="Code">Prefix of its star names.</param>
/// <param name="Description">One line for the README.</param>
/// <param name="RaDeg">Centre RA (ICRS, degrees).</param>
/// <param name="DecDeg">Centre Dec (degrees).</param>
/// <param name="RadiusDeg">Stars lie within this radius of the centre.</param>
/// <param name="DistanceModulus">True distance modulus mu0 (mag).</param>
/// <param name="Ebv">Mean colour excess E(B-V) of the field (mag).</param>
/// <param name="EbvScatter">Star-to-star 1-sigma spread of E(B-V) (mag).</param>
public sealed record DemoField(string Name, string Code, string Description, double RaDeg, double DecDeg, double RadiusDeg,
    double DistanceModulus, double Ebv, double EbvScatter)
{
    /// <summary>Distance in parsecs, 10^(mu/5 + 1).</summary>
    public double DistancePc => Math.Pow(10, DistanceModulus / 5 + 1);
}

/// <summary>An invented observer (one telescope at one invented site) and its photometric zero-point offsets.</summary>
/// <param name="Name">Observer label written in the observer column.</param>
/// <param name="Site">Site name.</param>
/// <param name="LongitudeDeg">East longitude (degrees; west negative).</param>
/// <param name="LatitudeDeg">Latitude (degrees).</param>
/// <param name="ZeroPointB">Offset added to every B magnitude this observer reports (mag).</param>
/// <param name="ZeroPointV">Same for V.</param>
/// <param name="ZeroPointI">Same for I.</param>
public sealed record DemoObserver(string Name, string Site, double LongitudeDeg, double LatitudeDeg,
    double ZeroPointB, double ZeroPointV, double ZeroPointI)
{
    public double ZeroPoint(string band) => band switch { "B" => ZeroPointB, "V" => ZeroPointV, _ => ZeroPointI };
}

/// <summary>A star with its true parameters.</summary>
/// <param name="Name">Star name.</param>
/// <param name="Field">Field name.</param>
/// <param name="Class">One of the <see cref="DemoClass"/> codes.</param>
/// <param name="RaDeg">RA (degrees).</param>
/// <param name="DecDeg">Dec (degrees).</param>
/// <param name="PeriodDays">True (observed-mode) period in days; null for constant stars.</param>
/// <param name="FundamentalPeriodDays">Period the PL relation was evaluated at (fundamentalised for overtones); null for constants.</param>
/// <param name="EpochMaxLightJd">A time of maximum V light (full JD, UTC); null for constants.</param>
/// <param name="AbsV">Absolute V magnitude (intensity mean) including the star's own PL scatter.</param>
/// <param name="AbsI">Absolute I magnitude (intensity mean).</param>
/// <param name="MeanB">True apparent intensity-mean B (mag).</param>
/// <param name="MeanV">True apparent intensity-mean V (mag).</param>
/// <param name="MeanI">True apparent intensity-mean I (mag).</param>
/// <param name="AmplitudeV">Peak-to-peak V amplitude (mag); 0 for constants.</param>
/// <param name="DistanceModulus">True distance modulus (mag).</param>
/// <param name="Ebv">True E(B-V) of this star (mag).</param>
/// <param name="ListedEbv">E(B-V) written in the star list (true value plus a 0.02 mag measurement error).</param>
/// <param name="FeH">True [Fe/H] (dex) for RR Lyrae; null for the others.</param>
/// <param name="HasB">Whether B photometry is generated.</param>
public sealed record DemoStar(string Name, string Field, string Class, double RaDeg, double DecDeg,
    double? PeriodDays, double? FundamentalPeriodDays, double? EpochMaxLightJd, double AbsV, double AbsI,
    double MeanB, double MeanV, double MeanI, double AmplitudeV, double DistanceModulus, double Ebv, double ListedEbv,
    double? FeH, bool HasB);

/// <summary>One generated measurement, exactly as written to the photometry file.</summary>
/// <param name="Star">Star name.</param>
/// <param name="Observer">Observer name.</param>
/// <param name="Band">B, V or I.</param>
/// <param name="Time">JD (UTC) minus 2450000, rounded to 1e-6 d as written.</param>
/// <param name="Mag">Reported magnitude (rounded to 0.001 as written), including the observer's zero point, noise and any outlier shift.</param>
/// <param name="MagErr">Reported 1-sigma error (0.001 mag steps).</param>
/// <param name="IsOutlier">True when an outlier shift was added (not written to the photometry file).</param>
public readonly record struct DemoMeasurement(string Star, string Observer, string Band, double Time, double Mag, double MagErr, bool IsOutlier);

/// <summary>One output file's name and exact text.</summary>
public sealed record DemoFile(string Name, string Content);

/// <summary>Everything the generator produced, in memory.</summary>
public sealed record DemoCampaignData(
    DemoOptions Options,
    string Consortium,
    IReadOnlyList<DemoField> Fields,
    IReadOnlyList<DemoObserver> Observers,
    IReadOnlyList<DemoStar> Stars,
    IReadOnlyList<DemoMeasurement> Measurements);
