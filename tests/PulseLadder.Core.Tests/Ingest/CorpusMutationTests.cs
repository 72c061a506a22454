using System.Text;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Tests.Ingest;

/// <summary>
/// Bounded, reproducible mutation fuzzing over the seed corpus in tests/data/fuzz-corpus: fixed seed, fixed count
/// per file. Each mutant is fed to the parser its folder names (and, for cross-talk, to the other two). The
/// contract checked is the one in docs/formats.md: bad input gives error values, never an exception; reading is
/// bounded by the input (lines read never exceed the line breaks + 1, rows never exceed lines, errors never exceed the
/// error limit + 1); every error names the file, a line within the file, and a column for every field-level code.
/// A failure message carries the corpus file, the mutant index and the mutation, so it can be replayed.
/// </summary>
public sealed class CorpusMutationTests
{
    private const int Seed = 20261202;
    private const int MutantsPerFile = 250;
    private static readonly IngestLimits Limits = new(MaxRows: 100_000, MaxLineLength: 4096, MaxErrors: 200);
    private static readonly PhotometryParseOptions Options = new(TimeScale.JdUtc, 2450000) { Limits = Limits };

    private static string CorpusDir => Path.Combine(AppContext.BaseDirectory, "data", "fuzz-corpus");

    /// <summary>Codes about one field of one row: the issue must say which column.</summary>
    private static readonly HashSet<IngestIssueCode> FieldCodes =
    [
        IngestIssueCode.EmptyField, IngestIssueCode.NotANumber, IngestIssueCode.NotFinite, IngestIssueCode.ErrorNotPositive,
        IngestIssueCode.ErrorTooLarge, IngestIssueCode.MagnitudeOutOfRange, IngestIssueCode.UnknownBand, IngestIssueCode.TimeOutOfRange,
        IngestIssueCode.UnknownStar, IngestIssueCode.PositionOutOfRange, IngestIssueCode.UnknownClass, IngestIssueCode.ValueOutOfRange,
        IngestIssueCode.MissingColumn, IngestIssueCode.DuplicateColumn, IngestIssueCode.ControlCharacter,
    ];

    public static TheoryData<string> Folders() => new() { "photometry-csv", "plain-text", "star-list" };

    [Fact]
    public void Corpus_HasValidAndHostileFilesForEveryParser()
    {
        foreach (var folder in new[] { "photometry-csv", "plain-text", "star-list" })
        {
            var files = Directory.GetFiles(Path.Combine(CorpusDir, folder));
            Assert.Contains(files, f => Path.GetFileName(f).StartsWith("valid-", StringComparison.Ordinal));
            Assert.Contains(files, f => !Path.GetFileName(f).StartsWith("valid-", StringComparison.Ordinal));
        }
    }

    [Theory]
    [MemberData(nameof(Folders))]
    public void Parse_AcceptsEveryRow_OfTheValidSeedFiles(string folder)
    {
        foreach (var path in Directory.GetFiles(Path.Combine(CorpusDir, folder), "valid-*"))
        {
            var (summary, rows) = Run(folder, File.ReadAllBytes(path), Path.GetFileName(path));
            Assert.True(summary.IsSuccess, $"{path}: {string.Join("; ", summary.Errors)}");
            Assert.True(rows > 0, path);
        }
    }

    [Theory]
    [MemberData(nameof(Folders))]
    public void Parse_ReturnsLocatedErrorsNeverThrows_OnMutatedCorpus(string folder)
    {
        var rng = new Random(Seed + folder.Length);
        var files = Directory.GetFiles(Path.Combine(CorpusDir, folder)).Order(StringComparer.Ordinal).ToList();
        int mutants = 0, refused = 0;
        foreach (var path in files)
        {
            byte[] seed = File.ReadAllBytes(path);
            string name = Path.GetFileName(path);
            for (int i = 0; i < MutantsPerFile; i++)
            {
                var (bytes, what) = Mutate(seed, rng);
                foreach (var parser in new[] { "photometry-csv", "plain-text", "star-list" })
                {
                    string where = $"{folder}/{name} mutant {i} ({what}) through {parser}";
                    IngestSummary summary;
                    try { summary = Run(parser, bytes, name).Summary; }
                    catch (Exception e) { Assert.Fail($"{where}: threw {e.GetType().Name}: {e.Message}"); throw; }
                    CheckBounded(summary, bytes, where);
                    CheckLocated(summary, name, where);
                    if (!summary.IsSuccess) refused++;
                }
                mutants++;
            }
        }
        Assert.Equal(files.Count * MutantsPerFile, mutants);
        // The mutations must actually hurt: a run where nothing is refused would check nothing.
        Assert.True(refused > mutants, $"only {refused} refusals over {mutants} mutants x 3 parsers");
    }

    // Found by this run: every repeated header name was a fatal error outside the error limit, so a 64 KiB header
    // "a,a,a,..." listed thousands of errors, and two empty trailing header cells (a spreadsheet export) were
    // refused as "column '' appears twice".
    [Fact]
    public void Parse_ListsEachDuplicateColumnOnceWithinTheLimit_WhenHeaderRepeatsNamesThousandsOfTimes()
    {
        string header = string.Join(",", Enumerable.Range(0, 1000).Select(i => "c" + (i % 300).ToString(System.Globalization.CultureInfo.InvariantCulture)));
        var options = new PhotometryParseOptions(TimeScale.JdUtc, 0) { Limits = new IngestLimits(MaxErrors: 200) };
        var r = PhotometryCsv.Parse(new StringReader(header + ",star,time,band,mag,mag_err\n"), "h.csv", options);
        Assert.True(r.Summary.Stopped);
        var duplicates = r.Errors.Where(e => e.Code == IngestIssueCode.DuplicateColumn).ToList();
        Assert.Equal(200, duplicates.Count);
        Assert.Equal(200, duplicates.Select(e => e.Column).Distinct().Count());
        Assert.Single(r.Errors, e => e.Code == IngestIssueCode.TooManyErrors);
    }

    [Fact]
    public void Parse_IgnoresEmptyTrailingHeaderCells_WhenSpreadsheetExport()
    {
        var r = PhotometryCsv.Parse(new StringReader("star,time,band,mag,mag_err,,\nS1,10955.9,V,15.5,0.01,,\n"), "x.csv", Options);
        Assert.True(r.IsSuccess, string.Join("; ", r.Errors));
        Assert.Single(r.Rows);
        Assert.Equal(["#6", "#7"], r.Warnings.Select(w => w.Column));
    }

    private static (IngestSummary Summary, long Rows) Run(string parser, byte[] bytes, string name)
    {
        using var s = new MemoryStream(bytes, writable: false);
        switch (parser)
        {
            case "photometry-csv": { var r = PhotometryCsv.Parse(s, name, Options); return (r.Summary, r.Rows.Count); }
            case "plain-text": { var r = PlainTextPhotometry.Parse(s, name, "S1", "V", Options); return (r.Summary, r.Rows.Count); }
            default: { var r = StarListCsv.Parse(s, name, Limits); return (r.Summary, r.Rows.Count); }
        }
    }

    private static void CheckBounded(IngestSummary s, byte[] bytes, string where)
    {
        // Line breaks in any of the encodings the readers accept (UTF-8/16/32): counting 0x0A and 0x0D bytes over-counts, never under-counts.
        long breaks = bytes.Count(b => b is (byte)'\n' or (byte)'\r');
        Assert.True(s.LinesRead <= breaks + 1, $"{where}: {s.LinesRead} lines read from {breaks} line breaks");
        Assert.True(s.AcceptedRows + s.RejectedRows <= s.LinesRead, $"{where}: more rows than lines");
        // The limit, its TooManyErrors entry, and the missing required columns of a refused header (at most 5).
        Assert.True(s.Errors.Count <= Limits.MaxErrors + 1 + 5, $"{where}: {s.Errors.Count} errors: {string.Join(", ", s.Errors.GroupBy(e => e.Code).Select(g => g.Key + "x" + g.Count()))}; first {s.Errors.FirstOrDefault()}; last {s.Errors.LastOrDefault()}");
    }

    private static void CheckLocated(IngestSummary s, string name, string where)
    {
        foreach (var e in s.Errors.Concat(s.Warnings))
        {
            Assert.True(e.File == name, $"{where}: issue names file '{e.File}'");
            Assert.True(e.Line >= 0 && e.Line <= Math.Max(1, s.LinesRead), $"{where}: line {e.Line} of {s.LinesRead}: {e}");
            Assert.False(string.IsNullOrWhiteSpace(e.Message), $"{where}: empty message");
            if (FieldCodes.Contains(e.Code)) Assert.False(string.IsNullOrEmpty(e.Column), $"{where}: {e.Code} without a column: {e}");
        }
    }

    private static readonly byte[][] Inserts =
    [
        "\""u8.ToArray(), "\"\""u8.ToArray(), [0], "\r\n"u8.ToArray(), "\n"u8.ToArray(), [0xEF, 0xBB, 0xBF], [0xFF, 0xFE],
        "1e308"u8.ToArray(), "-1e400"u8.ToArray(), "NaN"u8.ToArray(), "Infinity"u8.ToArray(), "99999999999999999999999999"u8.ToArray(),
        ","u8.ToArray(), ";"u8.ToArray(), "\t"u8.ToArray(), "#"u8.ToArray(), "12,5"u8.ToArray(), [0xC3], [0xF0, 0x9F, 0x98], "\u202e"u8.ToArray(),
    ];

    /// <summary>One to three random edits: byte flip, truncation, duplication of a range, insertion of a nasty token, deletion.</summary>
    private static (byte[] Bytes, string What) Mutate(byte[] seed, Random rng)
    {
        var b = new List<byte>(seed);
        var what = new StringBuilder();
        int edits = 1 + rng.Next(3);
        for (int k = 0; k < edits; k++)
        {
            int pos = b.Count == 0 ? 0 : rng.Next(b.Count + 1);
            switch (rng.Next(6))
            {
                case 0 when b.Count > 0:
                    int at = Math.Min(pos, b.Count - 1);
                    b[at] ^= (byte)(1 << rng.Next(8));
                    what.Append($"flip@{at} ");
                    break;
                case 1:
                    b.RemoveRange(pos, b.Count - pos);
                    what.Append($"truncate@{pos} ");
                    break;
                case 2:
                    int len = Math.Min(b.Count - Math.Min(pos, b.Count), 1 + rng.Next(64));
                    var range = b.GetRange(Math.Min(pos, b.Count), len);
                    int times = 1 + rng.Next(rng.Next(2) == 0 ? 3 : 200);
                    for (int t = 0; t < times; t++) b.InsertRange(Math.Min(pos, b.Count), range);
                    what.Append($"dup@{pos}x{len}x{times} ");
                    break;
                case 3:
                    var ins = Inserts[rng.Next(Inserts.Length)];
                    int reps = rng.Next(4) == 0 ? 1 + rng.Next(500) : 1;
                    for (int t = 0; t < reps; t++) b.InsertRange(pos, ins);
                    what.Append($"insert@{pos}:{Convert.ToHexString(ins)}x{reps} ");
                    break;
                case 4 when b.Count > 0:
                    int from = Math.Min(pos, b.Count - 1), n = Math.Min(b.Count - from, 1 + rng.Next(16));
                    b.RemoveRange(from, n);
                    what.Append($"delete@{from}x{n} ");
                    break;
                default:
                    b.Insert(pos, (byte)rng.Next(256));
                    what.Append($"byte@{pos} ");
                    break;
            }
        }
        return (b.ToArray(), what.ToString().TrimEnd());
    }
}
