using System.Globalization;
using System.Text;
using BenchmarkDotNet.Attributes;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Benchmarks;

/// <summary>Photometry CSV and plain-text parse throughput (rows per second = Rows / mean time).</summary>
[MemoryDiagnoser]
public class IngestBenchmarks
{
    public const int Rows = 200_000;

    private string _csv = string.Empty;
    private string _plain = string.Empty;
    private PhotometryParseOptions _withDuplicates = null!;
    private PhotometryParseOptions _withoutDuplicates = null!;
    private HashSet<string> _stars = [];

    [GlobalSetup]
    public void Setup()
    {
        var csv = new StringBuilder("star,time,band,mag,mag_err,observer\n");
        var plain = new StringBuilder();
        for (int i = 0; i < Rows; i++)
        {
            string star = "LAN-" + (i % 150).ToString("D3", CultureInfo.InvariantCulture);
            _stars.Add(star);
            csv.Append(CultureInfo.InvariantCulture, $"{star},{10955.0 + i * 0.0007:F6},{(i % 2 == 0 ? "V" : "I")},{14 + (i % 97) * 0.013:F3},0.011,obs-{i % 3}\n");
            plain.Append(CultureInfo.InvariantCulture, $"{2165.0 + i * 0.0007:F5} {14 + (i % 97) * 0.013:F3} 0.006\n");
        }
        _csv = csv.ToString();
        _plain = plain.ToString();
        _withDuplicates = new PhotometryParseOptions(TimeScale.JdUtc, 2450000) { KnownStars = _stars };
        _withoutDuplicates = _withDuplicates with { RejectDuplicates = false };
    }

    [Benchmark]
    public long PhotometryCsv_AllChecks() =>
        PhotometryCsv.Parse(new StringReader(_csv), "b.csv", _withDuplicates, _ => { }).AcceptedRows;

    [Benchmark]
    public long PhotometryCsv_NoDuplicateIndex() =>
        PhotometryCsv.Parse(new StringReader(_csv), "b.csv", _withoutDuplicates, _ => { }).AcceptedRows;

    [Benchmark]
    public long PlainText_AllChecks() =>
        PlainTextPhotometry.Parse(new StringReader(_plain), "b.dat", "S", "I", new PhotometryParseOptions(TimeScale.HjdUtc, 2450000), _ => { }).AcceptedRows;
}
