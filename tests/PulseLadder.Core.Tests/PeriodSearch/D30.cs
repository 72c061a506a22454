using PulseLadder.Core.Pipeline;

namespace PulseLadder.Core.Tests.PeriodSearch;

/// <summary>Test light curve D30 of SCIENCE.md 7.1 (synthetic, true P = 5.366249 d, all errors 0.030 mag).</summary>
public static class D30
{
    public static readonly double[] T =
    [
        0.44233, 1.44484, 3.42126, 4.34569, 5.31465, 6.40263, 8.36602, 9.31831, 11.37428, 12.30516,
        13.43640, 15.33882, 16.39938, 17.34676, 19.37801, 24.38201, 25.32773, 26.44544, 27.41627, 29.44092,
        30.43422, 31.38968, 32.43828, 33.31327, 35.32940, 37.30678, 39.34880, 41.35830, 42.34070, 43.42431,
    ];

    public static readonly double[] Mag =
    [
        8.1329, 8.3210, 7.6999, 7.6785, 7.9963, 8.3545, 7.9000, 7.6739, 8.2327, 8.3186,
        7.9462, 7.7611, 8.1153, 8.3356, 7.8105, 7.8784, 7.6813, 7.8561, 8.1903, 8.0278,
        7.7210, 7.7400, 8.1422, 8.3480, 7.9256, 7.8687, 8.2919, 7.6608, 7.7347, 8.2227,
    ];

    public const double Err = 0.030;

    /// <summary>D30 as one band of one observer; times offset by <paramref name="epoch"/> (the search must not care).</summary>
    public static List<LightCurvePoint> Points(double epoch = 2_460_000.0)
        => T.Select((t, i) => new LightCurvePoint(i + 1, epoch + t, "V", Mag[i], Err, "obs")).ToList();
}
