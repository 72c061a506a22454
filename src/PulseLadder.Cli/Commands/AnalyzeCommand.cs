using System.ComponentModel;
using System.Globalization;
using System.Text.Json;
using PulseLadder.Core.Ingest;
using PulseLadder.Core.Pipeline;
using PulseLadder.Core.Reporting;
using Spectre.Console;
using Spectre.Console.Cli;

namespace PulseLadder.Cli.Commands;

public sealed class AnalyzeCommand : Command<AnalyzeCommand.Settings>
{
    public sealed class Settings : CommandSettings
    {
        [CommandArgument(0, "<PHOTOMETRY>"), Description("Photometry files (CSV with header, or three columns: time mag error).")]
        public string[] Files { get; init; } = [];

        [CommandOption("--stars <FILE>"), Description("Star list CSV (star, field, ra_deg, dec_deg, ...).")]
        public string Stars { get; init; } = "";

        [CommandOption("--time-scale <SCALE>"), Description("Time scale of the time column: jd_utc, mjd_utc, jd_tt, mjd_tt, hjd_utc, hjd_tt, bjd_tdb, bmjd_tdb.")]
        public string TimeScale { get; init; } = "";

        [CommandOption("--time-offset <DAYS>"), Description("Added to every time (e.g. 2450000 for 'JD - 2450000' columns).")]
        public string? TimeOffset { get; init; }

        [CommandOption("--star <NAME>"), Description("Star of three-column files (default: the file name without extension).")]
        public string? Star { get; init; }

        [CommandOption("--band <BAND>"), Description("Band of three-column files (default: the name of the folder holding the file).")]
        public string? Band { get; init; }

        [CommandOption("--json <OUT>"), Description("Write one JSON object per star to this file.")]
        public string? Json { get; init; }

        [CommandOption("--csv <OUT>"), Description("Write one CSV row per star to this file.")]
        public string? Csv { get; init; }

        public override ValidationResult Validate()
        {
            if (Files.Length == 0) return ValidationResult.Error("Give at least one photometry file.");
            if (string.IsNullOrEmpty(Stars)) return ValidationResult.Error("--stars is required (positions are needed for BJD_TDB).");
            if (string.IsNullOrEmpty(TimeScale)) return ValidationResult.Error("--time-scale is required: times are never guessed.");
            return ValidationResult.Success();
        }
    }

    public override int Execute(CommandContext context, Settings s, CancellationToken cancellationToken)
    {
        if (!UploadMetadata.TryParse(s.TimeScale, s.TimeOffset, out var scale, out var offset, out var error))
        {
            Console.Error.WriteLine("pulseladder analyze: " + error);
            return 2;
        }
        IReadOnlyList<StarAnalysis> results;
        try
        {
            results = AnsiConsole.Progress().AutoClear(true).Start(ctx =>
            {
                var task = ctx.AddTask("analysing stars", maxValue: 1);
                return OfflineAnalysis.Run(s.Stars, s.Files, scale, offset, s.Star, s.Band, PipelineSettings.Default,
                    (done, total) => { task.MaxValue = total; task.Value = done; });
            });
        }
        catch (InputRefusedException e)
        {
            foreach (var p in e.Problems.Take(200)) Console.Error.WriteLine(p);
            Console.Error.WriteLine($"pulseladder analyze: {e.Problems.Count} input problem(s); nothing analysed.");
            return 1;
        }
        var records = results.Select(AnalyzeRecord.From).ToList();
        if (s.Json is not null)
            File.WriteAllText(s.Json, JsonSerializer.Serialize(records, new JsonSerializerOptions { WriteIndented = true }));
        if (s.Csv is not null) File.WriteAllText(s.Csv, ToCsv(records));
        var table = new Table().AddColumns("star", "class", "period (d)", "mean mags", "mu", "flags");
        foreach (var r in records)
            table.AddRow(Markup.Escape(r.Star), r.Class ?? "-", F(r.PeriodDays, "F6"),
                Markup.Escape(string.Join(" ", r.MeanMag.Select(kv => $"{kv.Key}={kv.Value.ToString("F3", CultureInfo.InvariantCulture)}"))),
                r.DistanceModulus is { } mu ? $"{F(mu, "F3")} ± {F(r.DistanceModulusErr, "F3")}" : "-", Markup.Escape(string.Join(",", r.Flags)));
        AnsiConsole.Write(table);
        return 0;
    }

    private static string F(double? v, string fmt) => v is { } x ? x.ToString(fmt, CultureInfo.InvariantCulture) : "-";

    internal static string ToCsv(IReadOnlyList<AnalyzeRecord> rows)
    {
        var bands = rows.SelectMany(r => r.MeanMag.Keys).Distinct().Order(StringComparer.Ordinal).ToList();
        var sb = new System.Text.StringBuilder();
        sb.Append("star,field,class,period_days,period_err_days,fap");
        foreach (var b in bands) sb.Append(",mean_mag_").Append(b);
        foreach (var b in bands) sb.Append(",amplitude_").Append(b);
        sb.Append(",ebv,distance_modulus,distance_modulus_err,distance_pc,distance_pc_err,flags\n");
        static string N(double? v) => CsvText.Number(v);
        static string Q(string t) => CsvText.Cell(t);
        foreach (var r in rows)
        {
            sb.Append(Q(r.Star)).Append(',').Append(Q(r.Field)).Append(',').Append(r.Class).Append(',')
              .Append(N(r.PeriodDays)).Append(',').Append(N(r.PeriodErrDays)).Append(',').Append(N(r.Fap));
            foreach (var b in bands) sb.Append(',').Append(N(r.MeanMag.TryGetValue(b, out var v) ? v : null));
            foreach (var b in bands) sb.Append(',').Append(N(r.Amplitude.TryGetValue(b, out var v) ? v : null));
            sb.Append(',').Append(N(r.Ebv)).Append(',').Append(N(r.DistanceModulus)).Append(',').Append(N(r.DistanceModulusErr))
              .Append(',').Append(N(r.DistancePc)).Append(',').Append(N(r.DistancePcErr)).Append(',').Append(Q(string.Join(';', r.Flags))).Append('\n');
        }
        return sb.ToString();
    }
}
