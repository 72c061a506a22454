using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;
using static PulseLadder.Core.Tests.Ingest.IngestTestSupport;

namespace PulseLadder.Core.Tests.Ingest;

// The light duplicate check (PhotometryParseOptions.FullyIndexedGroups): latest time per (star, band, observer) group,
// full index only for groups named. Expected lines worked out by hand from the files below.
public class DuplicateGroupsTests
{
    private static PhotometryParseOptions Light(params DuplicateGroup[] full) =>
        new(TimeScale.JdUtc, 0) { FullyIndexedGroups = full.ToHashSet() };

    [Fact]
    public void Parse_FindsRepeatOfLatestTime_WithoutFullIndex_WhenGroupIsInOrder()
    {
        // Two groups interleaved, each strictly increasing; line 6 repeats line 4's time in the same group.
        var r = Csv(Header + ",observer\nS1,2455001,V,12,0.01,ann\nS1,2455001,V,12,0.01,bob\nS1,2455002,V,12,0.01,ann\n" +
                    "S1,2455002,V,12,0.01,bob\nS1,2455002,V,12,0.01,ann\nS1,2455003,V,12,0.01,ann\n", Light());
        var e = SingleError(r);
        Assert.Equal(IngestIssueCode.DuplicateRow, e.Code);
        Assert.Equal(6, e.Line);
        Assert.Equal("duplicate of line 4 (same star, time, band and observer)", e.Message);
        Assert.Empty(r.Summary.OutOfOrderGroups);
        Assert.Equal(5, r.Rows.Count);
    }

    [Fact]
    public void Parse_ListsGroupThatGoesBack_AndSecondReadingWithItIndexedFindsEveryDuplicate()
    {
        // Same file as PhotometryCsvValidationTests.Parse_ReportsEveryDuplicate_WhenTimesOutOfOrder.
        string text = Header + "\nS1,2455003,V,12,0.01\nS1,2455005,V,12,0.01\nS1,2455003,V,12,0.01\nS1,2455004,V,12,0.01\n" +
                      "S1,2455001,V,12,0.01\nS1,2455004,V,12,0.01\nS1,2455001,V,12,0.01\nS1,2455001,I,12,0.01\nS2,2455001,V,12,0.01\n";
        var first = Csv(text, Light());
        // S1/V goes back at line 4 (2455003 after 2455005): not checked from there on, so this reading misses its repeats.
        Assert.Equal([new DuplicateGroup("S1", "V", "")], first.Summary.OutOfOrderGroups);
        Assert.Empty(first.Errors);

        var second = Csv(text, Light(new DuplicateGroup("S1", "V", "")));
        Assert.Empty(second.Summary.OutOfOrderGroups);
        var full = Csv(text);
        Assert.Equal(full.Errors.Select(e => (e.Line, e.Message)), second.Errors.Select(e => (e.Line, e.Message)));
        Assert.Equal([4L, 7, 8], second.Errors.Select(e => e.Line).ToArray());
        Assert.Equal(6, second.Rows.Count);
    }

    [Fact]
    public void Parse_NamesNormalisedBandAndDefaultObserver_InOutOfOrderGroup()
    {
        var options = Light() with { DefaultObserver = "site-a" };
        var r = Csv(Header + "\nS1,2455002,Ic,12,0.01\nS1,2455001,I,12,0.01\n", options);
        Assert.Equal([new DuplicateGroup("S1", "I", "site-a")], r.Summary.OutOfOrderGroups);
    }

    [Fact]
    public void Parse_ListsNothing_WithDefaultFullIndex()
    {
        var r = Csv(Header + "\nS1,2455002,V,12,0.01\nS1,2455001,V,12,0.01\nS1,2455002,V,12,0.01\n");
        Assert.Empty(r.Summary.OutOfOrderGroups);
        Assert.Equal(4, SingleError(r).Line);
    }

    [Fact]
    public void PlainText_ListsItsGroup_WhenTimesGoBack()
    {
        using var reader = new StringReader("2455002 12 0.01\n2455001 12 0.01\n2455001 12 0.01\n");
        var r = PlainTextPhotometry.Parse(reader, "lc.dat", "S1", "I", Light());
        Assert.Equal([new DuplicateGroup("S1", "I", "")], r.Summary.OutOfOrderGroups);
        using var again = new StringReader("2455002 12 0.01\n2455001 12 0.01\n2455001 12 0.01\n");
        var r2 = PlainTextPhotometry.Parse(again, "lc.dat", "S1", "I", Light(new DuplicateGroup("S1", "I", "")));
        Assert.Equal(3, SingleError(r2).Line);
    }
}
