using System.Security.Cryptography;
using System.Text;
using PulseLadder.Core.Photometry;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Quantities;
using PulseLadder.Jobs;
using PulseLadder.Storage;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>
/// The input hash is provenance stored with every result and compared by "reproduce": a faster way of computing it
/// must give the same bytes to SHA-256. The reference below is the plain definition, one piece at a time: a SHA-256
/// digest of the observations, then the hash of the other inputs and that digest.
/// </summary>
public sealed class InputHashTests
{
    private static string Reference(StarInfo star, IReadOnlyList<Observation> obs, PipelineSettings settings, ReviewOverrides overrides)
    {
        using var d = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        foreach (var o in obs)
        {
            d.AppendData(BitConverter.GetBytes(o.Id));
            d.AppendData(BitConverter.GetBytes(o.Time));
            d.AppendData(BitConverter.GetBytes(o.Mag));
            d.AppendData(BitConverter.GetBytes(o.MagErr));
            d.AppendData(Encoding.UTF8.GetBytes(o.Band + "|" + o.Observer + "|" + o.Flag + "|" + o.Scale.ToCode()));
        }
        string digest = Convert.ToHexString(d.GetHashAndReset()).ToLowerInvariant();
        using var h = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(star)));
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(settings)));
        h.AppendData(Encoding.UTF8.GetBytes(Json.Serialize(overrides)));
        h.AppendData(Encoding.UTF8.GetBytes(PipelineVersion.Current));
        h.AppendData(Encoding.UTF8.GetBytes("observations:" + digest));
        return Convert.ToHexString(h.GetHashAndReset()).ToLowerInvariant();
    }

    private static List<Observation> Observations(int n, Func<int, string> observer) =>
        Enumerable.Range(0, n).Select(i => new Observation(i + 1, 2_460_000.5 + i * 0.37, i % 3 == 0 ? TimeScale.HjdUtc : TimeScale.JdUtc,
            i % 2 == 0 ? "V" : "I", 14 + 0.001 * i, 0.01 + 1e-5 * i, observer(i), i % 5 == 0 ? "suspect" : null)).ToList();

    [Theory]
    [InlineData(0)]
    [InlineData(1)]
    [InlineData(600)]
    [InlineData(5000)] // more than one 64 KiB buffer of observations
    public void InputHash_EqualsThePieceByPieceDefinition(int n)
    {
        var star = new StarInfo("KX-17", "ember-knot", SkyPosition.FromDegrees(81.25, -69.5), PulsatorClass.RRLyraeAB, 0.07, 0.01, -1.4);
        var obs = Observations(n, i => i % 7 == 0 ? "Ørsted-Süd" : "obs" + (i % 3));
        var s = PipelineSettings.Default;
        Assert.Equal(Reference(star, obs, s, ReviewOverrides.None), AnalyzeStarJob.InputHash(star, obs, s, ReviewOverrides.None));
    }

    [Fact]
    public void InputHash_EqualsTheDefinition_ForObserverNamesLongerThanTheBuffer()
    {
        var star = new StarInfo("KX-18", "ember-knot", SkyPosition.FromDegrees(81.3, -69.4));
        var obs = Observations(3, i => new string('é', 40_000 + i));
        var s = PipelineSettings.Default;
        Assert.Equal(Reference(star, obs, s, ReviewOverrides.None), AnalyzeStarJob.InputHash(star, obs, s, ReviewOverrides.None));
    }
}
