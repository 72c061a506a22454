using PulseLadder.Benchmarks;

// Bench commands outside BenchmarkDotNet (see docs/PERFORMANCE.md): "side-by-side <datafile> ..." and
// "throughput ...". Anything else goes to BenchmarkDotNet's switcher (e.g. --filter '*Gls*').
if (args.Length > 0 && args[0] == "side-by-side") return SideBySide.Run(args[1..]);
if (args.Length > 0 && args[0] == "fft-timing") return FftTiming.Run(args[1..]);
if (args.Length > 0 && args[0] == "nufft-accuracy") return NufftAccuracy.Run(args[1..]);
if (args.Length > 0 && args[0] == "throughput") return Throughput.Run(args[1..]);
if (args.Length > 0 && args[0] == "scaleout-ingest") return ScaleOutIngest.Run(args[1..]);
if (args.Length > 0 && args[0] == "sqlite-insert") return SqliteInsertTiming.Run(args[1..]);
BenchmarkDotNet.Running.BenchmarkSwitcher.FromAssembly(typeof(Program).Assembly).Run(args);
return 0;

/// <summary>Anchor type for the switcher.</summary>
public partial class Program;
