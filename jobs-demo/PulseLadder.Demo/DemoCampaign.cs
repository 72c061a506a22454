namespace PulseLadder.Demo;

/// <summary>
/// Seeded generator of an invented multi-site photometry campaign (three fields, classical Cepheids, RR Lyrae and
/// constant stars; three observers at three invented sites). Independent of PulseLadder.Core on purpose: it is the
/// truth the pipeline is checked against. The model (PL relations, extinction, light-curve shapes, sampling, noise)
/// is documented in the README it writes and in <see cref="DemoFiles"/>.
/// </summary>
public static class DemoCampaign
{
    /// <summary>Times in the photometry files are JD (UTC) minus this; upload them with time scale jd_utc and this offset.</summary>
    public const double TimeOffset = 2450000;

    /// <summary>Time-scale code to declare on upload.</summary>
    public const string TimeScaleCode = "jd_utc";

    /// <summary>2025-08-01 00:00 UTC, the first evening of the campaign.</summary>
    public const double StartJdUtc = 2460888.5;

    internal const string Consortium = "Tidewater Pulse Collaboration";

    // Visits fail when the field transits more than this far from local midnight (twilight or daytime).
    private const double MaxTransitHoursFromMidnight = 5.0;

    private static readonly DemoField[] Fields =
    [
        new("ember-knot", "EMB", "Galactic open-cluster field behind a dust lane, 3.2 kpc", 118.42, -26.31, 0.12, 12.5, 0.75, 0.04),
        new("lantern-cloud", "LAN", "nearby dwarf galaxy, 50 kpc", 88.61, -58.17, 0.30, 18.5, 0.09, 0.02),
        new("hollow-spiral", "HOL", "distant spiral galaxy, 6.3 Mpc (Cepheids only)", 104.93, -44.72, 0.05, 24.0, 0.05, 0.01),
    ];

    private static readonly DemoObserver[] Observers =
    [
        new("sablewood-0.8m", "Sablewood Ridge", -70.82, -30.47, 0.000, 0.000, 0.000),
        new("tamsin-0.6m", "Tamsin Plateau", 20.55, -32.21, 0.041, 0.032, 0.025),
        new("wrenfold-0.5m", "Wrenfold Hill", 149.07, -31.28, -0.030, -0.021, -0.028),
    ];

    // Probability that an observer visits a field on a clear night it is up, per [observer, field].
    private static readonly double[,] VisitProbability =
    {
        { 0.65, 0.65, 0.65 },
        { 0.55, 0.65, 0.65 },
        { 0.45, 0.65, 0.50 },
    };

    // Designed class mix for 150 stars: F, 1O, RRab, RRc, constant per field.
    private static readonly int[,] ClassMix =
    {
        { 8, 2, 10, 5, 5 },
        { 30, 6, 20, 12, 12 },
        { 34, 6, 0, 0, 0 },
    };

    private static readonly string[] MixClasses = [DemoClass.CepheidF, DemoClass.CepheidFirstOvertone, DemoClass.RRab, DemoClass.RRc, DemoClass.Constant];

    // Period ranges (days) per field for F and 1O Cepheids, chosen so mean V stays within about 10-21 mag.
    private static readonly (double Min, double Max)[] FundamentalPeriods = [(2, 12), (2, 60), (15, 60)];
    private static readonly (double Min, double Max)[] OvertonePeriods = [(1, 5), (1, 5), (3, 5)];

    /// <summary>Generates the campaign in memory. Deterministic: the same options give the same data.</summary>
    public static DemoCampaignData Generate(DemoOptions? options = null)
    {
        options ??= new DemoOptions();
        options.Validate();
        var starRng = new DemoRandom(options.Seed, 1);
        var skyRng = new DemoRandom(options.Seed, 2);
        var noiseRng = new DemoRandom(options.Seed, 3);

        var stars = new List<(DemoStar Star, DemoLightCurve? Curve, int Field)>();
        for (int f = 0; f < Fields.Length; f++) stars.AddRange(MakeFieldStars(f, options, starRng));

        var measurements = new List<DemoMeasurement>(200_000);
        var curves = stars.Select(s => s.Curve is null ? null : new CurveState(s.Star, s.Curve)).ToArray();
        for (int o = 0; o < Observers.Length; o++)
        {
            foreach (var (field, time) in ScheduleVisits(o, options, skyRng))
            {
                for (int s = 0; s < stars.Count; s++)
                {
                    if (stars[s].Field != field) continue;
                    var star = stars[s].Star;
                    // B first, then V, then I: one filter sequence per visit, a few minutes per exposure.
                    if (star.HasB && o == 0) measurements.Add(Measure(star, curves[s], Observers[o], "B", time - 0.003, options, noiseRng));
                    measurements.Add(Measure(star, curves[s], Observers[o], "V", time, options, noiseRng));
                    measurements.Add(Measure(star, curves[s], Observers[o], "I", time + 0.003, options, noiseRng));
                }
            }
        }
        return new DemoCampaignData(options, Consortium, Fields, Observers, stars.Select(s => s.Star).ToArray(), measurements);
    }

    /// <summary>The files of a generated campaign (names and exact text), see <see cref="DemoFiles"/>.</summary>
    public static IReadOnlyList<DemoFile> Render(DemoCampaignData data) => DemoFiles.Render(data);

    /// <summary>
    /// Generates the campaign and writes its files (UTF-8 without BOM, LF line ends) into <paramref name="directory"/>
    /// (created if needed; existing files of the same names are overwritten). Returns the written paths.
    /// </summary>
    public static IReadOnlyList<string> WriteTo(string directory, DemoOptions? options = null)
    {
        ArgumentException.ThrowIfNullOrWhiteSpace(directory);
        var data = Generate(options);
        Directory.CreateDirectory(directory);
        var paths = new List<string>();
        var utf8 = new System.Text.UTF8Encoding(encoderShouldEmitUTF8Identifier: false);
        foreach (var file in Render(data))
        {
            string path = Path.Combine(directory, file.Name);
            File.WriteAllText(path, file.Content, utf8);
            paths.Add(path);
        }
        return paths;
    }

    private static int Scaled(int designed, int starCount) =>
        designed == 0 ? 0 : Math.Max(1, (int)Math.Round(designed * starCount / 150.0, MidpointRounding.AwayFromZero));

    private static IEnumerable<(DemoStar, DemoLightCurve?, int)> MakeFieldStars(int f, DemoOptions options, DemoRandom rng)
    {
        var field = Fields[f];
        var classes = new List<string>();
        for (int c = 0; c < MixClasses.Length; c++)
            for (int i = 0, n = Scaled(ClassMix[f, c], options.StarCount); i < n; i++) classes.Add(MixClasses[c]);
        // Shuffled so that star names say nothing about classes.
        rng.Shuffle(classes);
        var result = new List<(DemoStar, DemoLightCurve?, int)>();
        for (int i = 0; i < classes.Count; i++)
        {
            string name = $"{field.Code}-{i + 1:D3}";
            result.Add(MakeStar(name, f, classes[i], rng));
        }
        return result;
    }

    private static (DemoStar, DemoLightCurve?, int) MakeStar(string name, int f, string cls, DemoRandom rng)
    {
        var field = Fields[f];
        // Uniform over the field's disc.
        double r = field.RadiusDeg * Math.Sqrt(rng.NextDouble());
        double angle = rng.Uniform(0, 2 * Math.PI);
        double dec = field.DecDeg + r * Math.Sin(angle);
        double ra = field.RaDeg + r * Math.Cos(angle) / Math.Cos(field.DecDeg * Math.PI / 180);
        double ebv = Math.Max(0.005, rng.Normal(field.Ebv, field.EbvScatter));
        double listedEbv = Math.Max(-0.05, Math.Round(rng.Normal(ebv, 0.02), 3));
        double av = 3.1 * ebv, ai = 0.6 * av, ab = av + ebv;

        double? period = null, fundamental = null, feh = null;
        double absV, absI, bv0, ampV = 0;
        DemoLightCurve? curve = null;
        switch (cls)
        {
            case DemoClass.CepheidF:
            case DemoClass.CepheidFirstOvertone:
            {
                bool overtone = cls == DemoClass.CepheidFirstOvertone;
                var (min, max) = overtone ? OvertonePeriods[f] : FundamentalPeriods[f];
                double p = Math.Pow(10, rng.Uniform(Math.Log10(min), Math.Log10(max)));
                double p0 = overtone ? p / (0.716 - 0.027 * Math.Log10(p)) : p;
                period = p;
                fundamental = p0;
                double x = Math.Log10(p0) - 1;
                double scatter = rng.Normal(0, 0.10);
                absV = -2.43 * x - 4.05 + scatter;
                absI = -2.81 * x - 4.78 + 0.7 * scatter;
                bv0 = 0.416 * Math.Log10(p0) + 0.314;
                if (overtone)
                {
                    ampV = rng.Uniform(0.25, 0.5);
                    curve = new DemoLightCurve(Clamp(rng.Normal(0.15, 0.04), 0.03, 0.25), Clamp(rng.Normal(0.05, 0.02), 0.0, 0.1),
                        rng.Normal(4.6, 0.2), rng.Normal(3.0, 0.3));
                }
                else
                {
                    ampV = rng.Uniform(0.4, 1.2);
                    bool nearBumpResonance = p is > 8 and < 13;
                    curve = nearBumpResonance
                        ? new DemoLightCurve(Clamp(rng.Normal(0.18, 0.03), 0.08, 0.3), Clamp(rng.Normal(0.10, 0.02), 0.03, 0.2), rng.Normal(3.0, 0.2), rng.Normal(5.6, 0.2))
                        : new DemoLightCurve(Clamp(rng.Normal(0.42, 0.04), 0.3, 0.5), Clamp(rng.Normal(0.22, 0.03), 0.1, 0.35), rng.Normal(2.5, 0.15), rng.Normal(5.2, 0.2));
                }
                break;
            }
            case DemoClass.RRab:
            case DemoClass.RRc:
            {
                bool c = cls == DemoClass.RRc;
                double p = c ? rng.Uniform(0.28, 0.42) : rng.Uniform(0.45, 0.8);
                double p0 = c ? Math.Pow(10, Math.Log10(p) + 0.127) : p;
                period = p;
                fundamental = p0;
                double fe = Math.Round(Clamp(rng.Normal(-1.5, 0.25), -2.3, -0.5), 2);
                feh = fe;
                double scatter = rng.Normal(0, 0.05);
                absV = 0.59 + 0.214 * (fe + 1.5) + scatter;
                double logZ = fe + Math.Log10(0.638 * Math.Pow(10, 0.3) + 0.362) - 1.765;
                absI = 0.471 - 1.132 * Math.Log10(p0) + 0.205 * logZ + scatter;
                bv0 = c ? 0.25 : 0.30;
                if (c)
                {
                    ampV = rng.Uniform(0.3, 0.55);
                    curve = new DemoLightCurve(Clamp(rng.Normal(0.15, 0.04), 0.03, 0.25), Clamp(rng.Normal(0.06, 0.02), 0.0, 0.12),
                        rng.Normal(3.0, 0.3), rng.Normal(6.0, 0.3));
                }
                else
                {
                    // Bailey diagram: longer-period RRab have smaller amplitudes.
                    ampV = Clamp(1.25 - 1.4 * (p - 0.45) + rng.Normal(0, 0.08), 0.5, 1.3);
                    curve = new DemoLightCurve(Clamp(rng.Normal(0.48, 0.03), 0.4, 0.55), Clamp(rng.Normal(0.33, 0.03), 0.25, 0.4),
                        rng.Normal(2.45, 0.12), rng.Normal(5.1, 0.15));
                }
                break;
            }
            default:
            {
                double v = rng.Uniform(12.5, 19.5);
                double vi0 = rng.Uniform(0.4, 1.4);
                absV = v - field.DistanceModulus - av;
                absI = absV - vi0;
                bv0 = 0.85 * vi0;
                break;
            }
        }
        double meanV = absV + field.DistanceModulus + av;
        double meanI = absI + field.DistanceModulus + ai;
        double meanB = absV + bv0 + field.DistanceModulus + ab;
        double? epoch = null;
        if (curve is not null && period is { } per)
        {
            double t0 = StartJdUtc + rng.Uniform(0, per);
            epoch = t0 + curve.PhaseOfMaximumLight * per;
        }
        bool hasB = f == 0;
        var star = new DemoStar(name, field.Name, cls, Math.Round(ra, 6), Math.Round(dec, 6), period, fundamental, epoch,
            absV, absI, meanB, meanV, meanI, ampV, field.DistanceModulus, ebv, listedEbv, feh, hasB);
        return (star, curve, f);
    }

    private static double Clamp(double x, double min, double max) => Math.Min(max, Math.Max(min, x));

    /// <summary>Visit times (full JD UTC) of one observer, in time order: 1 or 2 epochs per clear night near each field's transit.</summary>
    private static List<(int Field, double Time)> ScheduleVisits(int o, DemoOptions options, DemoRandom rng)
    {
        var obs = Observers[o];
        var visits = new List<(int, double)>();
        int nights = (int)Math.Round(options.Seasons * 365.25);
        for (int n = 0; n < nights; n++)
        {
            // Local mean midnight after the evening of day n, in UT.
            double midnight = StartJdUtc + n + 1 - obs.LongitudeDeg / 360.0;
            bool clear = rng.NextDouble() >= options.WeatherLoss;
            var tonight = new List<(int, double)>();
            for (int f = 0; f < Fields.Length; f++)
            {
                double transit = DemoSky.TransitHoursFromMidnight(midnight, obs.LongitudeDeg, Fields[f].RaDeg);
                double uVisit = rng.NextDouble(), uCount = rng.NextDouble(), u1 = rng.NextDouble(), u2 = rng.NextDouble();
                if (!clear || Math.Abs(transit) > MaxTransitHoursFromMidnight || uVisit >= VisitProbability[o, f]) continue;
                if (uCount < 0.5)
                {
                    AddIfDark(tonight, f, midnight, transit, -1.0 + 2.0 * u1);
                }
                else
                {
                    AddIfDark(tonight, f, midnight, transit, -1.6 + 1.2 * u1);
                    AddIfDark(tonight, f, midnight, transit, 0.4 + 1.2 * u2);
                }
            }
            tonight.Sort((a, b) => a.Item2.CompareTo(b.Item2));
            visits.AddRange(tonight);
        }
        return visits;
    }

    private static void AddIfDark(List<(int, double)> tonight, int field, double midnight, double transitHours, double offsetHours)
    {
        double fromMidnight = transitHours + offsetHours;
        // Astronomical night taken as +-6 h around local midnight (the sites are at ~30 deg latitude; a simplification).
        if (Math.Abs(fromMidnight) > 6.0) return;
        tonight.Add((field, midnight + fromMidnight / 24.0));
    }

    private sealed class CurveState(DemoStar star, DemoLightCurve curve)
    {
        private readonly double _t0 = star.EpochMaxLightJd!.Value - curve.PhaseOfMaximumLight * star.PeriodDays!.Value;
        private readonly double _period = star.PeriodDays!.Value;
        private readonly (double A0, double Scale) _b = curve.Calibrate(1.45 * star.AmplitudeV, star.MeanB);
        private readonly (double A0, double Scale) _v = curve.Calibrate(star.AmplitudeV, star.MeanV);
        private readonly (double A0, double Scale) _i = curve.Calibrate(0.6 * star.AmplitudeV, star.MeanI);

        public double Magnitude(string band, double time)
        {
            var (a0, scale) = band switch { "B" => _b, "V" => _v, _ => _i };
            double phase = (time - _t0) / _period;
            phase -= Math.Floor(phase);
            return a0 + scale * curve.Shape(phase);
        }
    }

    private static DemoMeasurement Measure(DemoStar star, CurveState? curve, DemoObserver observer, string band, double timeJd,
        DemoOptions options, DemoRandom rng)
    {
        double trueMag = curve is null
            ? band switch { "B" => star.MeanB, "V" => star.MeanV, _ => star.MeanI }
            : curve.Magnitude(band, timeJd);
        // Photon-noise-like error growing towards the faint end: 0.01 mag when bright, 0.05 mag cap at ~21 mag.
        double sigma = Math.Min(0.05, 0.01 + 0.04 * Math.Exp((trueMag - 21.0) / 1.5));
        double mag = trueMag + observer.ZeroPoint(band) + sigma * rng.Normal();
        double reportedErr = Math.Max(0.001, Math.Round(sigma * (1 + 0.05 * rng.Normal()), 3));
        bool outlier = rng.NextDouble() < options.OutlierFraction;
        double shift = rng.Uniform(0.3, 1.0) * (rng.NextDouble() < 0.5 ? -1 : 1);
        if (outlier) mag += shift;
        return new DemoMeasurement(star.Name, observer.Name, band, Math.Round(timeJd - TimeOffset, 6), Math.Round(mag, 3), reportedErr, outlier);
    }
}
