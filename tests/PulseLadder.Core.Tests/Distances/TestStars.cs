using PulseLadder.Core.LightCurves;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Quantities;

namespace PulseLadder.Core.Tests.Distances;

internal static class TestStars
{
    public static StarInfo Star(string name = "delta Cep", double? ebv = null, double? ebvErr = null, double? feh = null)
        => new(name, "F1", SkyPosition.FromDegrees(337.29277, 58.41520), null, ebv, ebvErr, feh);

    public static BandFit Fit(string band, double mag, double err = 0.01)
        => new() { Band = band, IntensityMeanMag = mag, IntensityMeanErr = err };

    public static string DataPath(params string[] parts)
        => Path.Combine([AppContext.BaseDirectory, "data", "open", .. parts]);
}
