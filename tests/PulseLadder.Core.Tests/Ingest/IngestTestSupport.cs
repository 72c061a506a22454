using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

internal static class IngestTestSupport
{
    public const string Header = "star,time,band,mag,mag_err";

    public static PhotometryParseOptions JdUtc(double offset = 0) => new(TimeScale.JdUtc, offset);

    public static ParseResult<PhotometryRow> Csv(string text, PhotometryParseOptions? options = null) =>
        PhotometryCsv.Parse(new StringReader(text), "upload.csv", options ?? JdUtc());

    public static ParseResult<StarInfo> Stars(string text) => StarListCsv.Parse(new StringReader(text), "stars.csv");

    /// <summary>The single error of a result, failing the test when there is not exactly one.</summary>
    public static IngestIssue SingleError<T>(ParseResult<T> result) => Assert.Single(result.Errors);
}
