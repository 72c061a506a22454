using System.ComponentModel;
using System.Globalization;
using PulseLadder.Storage;
using PulseLadder.Web.Export;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

/// <summary>
/// Reruns a star's stored analysis from the campaign database and reports every difference.
/// Exit codes: 0 identical, 1 differences found, 2 the star or its stored analysis is missing.
/// </summary>
public sealed class ReproduceCommand : Command<ReproduceCommand.Settings>
{
    public sealed class Settings : DatabaseSettings
    {
        [CommandArgument(0, "<STAR>"), Description("Star name (or numeric id).")]
        public string Star { get; init; } = "";

        [CommandOption("--calibration-dir <DIR>"), Description("Folder of administrator calibration files (default DATA-DIR/calibrations, as the service).")]
        public string? CalibrationDir { get; init; }

        [CommandOption("--tolerance <REL>"), Description("Relative tolerance for numbers (default 0: exact; the pipeline is deterministic).")]
        public double Tolerance { get; init; }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken ct)
    {
        if (s.OpenExisting("reproduce", Console.Error) is not { } db) return 2;
        db.EnsureSchemaIsCurrent();
        string calDir = !string.IsNullOrWhiteSpace(s.CalibrationDir) ? Path.GetFullPath(s.CalibrationDir)
            : s.ResolveOptions().EffectiveCalibrationDir;
        Core.Calibration.CalibrationRegistry registry;
        try { registry = Jobs.Calibrations.LoadFolderOrThrow(calDir); }
        catch (InvalidOperationException e)
        {
            Console.Error.WriteLine("pulseladder reproduce: " + e.Message);
            return 2;
        }
        var r = Reproduction.Run(db, s.Star, s.Tolerance, registry);
        return Print(r, Console.Out);
    }

    /// <summary>Writes the report; returns the exit code.</summary>
    internal static int Print(ReproductionReport r, TextWriter o)
    {
        if (r.FailureReason is not null)
        {
            o.WriteLine($"{r.Star}: cannot reproduce ({r.FailureReason})");
            return 2;
        }
        o.WriteLine($"{r.Star}: stored analysis revision {r.Revision}, pipeline {r.StoredPipelineVersion}");
        o.WriteLine($"  input hash stored {r.StoredInputHash}");
        o.WriteLine($"  input hash rerun  {r.RerunInputHash}");
        foreach (var (q, v) in r.KeyNumbers) o.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  {q,-22} {v}"));
        foreach (var n in r.Notes) o.WriteLine("  note: " + n);
        if (r.Identical) { o.WriteLine("identical: the rerun reproduces the stored analysis"); return 0; }
        o.WriteLine($"{r.Differences.Count} difference(s):");
        foreach (var d in r.Differences) o.WriteLine($"  {d.Quantity}: stored {d.Stored}, rerun {d.Rerun}");
        return 1;
    }
}
