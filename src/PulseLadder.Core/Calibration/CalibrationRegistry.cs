using System.Globalization;
using System.Reflection;
using System.Security.Cryptography;
using System.Text;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Core.Calibration;

/// <summary>Outcome of loading a calibration file: the registry (embedded plus accepted rows) and every problem found.</summary>
public sealed record CalibrationLoadResult(CalibrationRegistry Registry, IReadOnlyList<CalibrationFileError> Errors)
{
    public bool Ok => Errors.Count == 0;
}

/// <summary>
/// The period-luminosity relations, their anchors and the intrinsic period-colour relations. <see cref="Embedded"/>
/// holds the defaults shipped in Data/calibration (each row with its published source); administrators add
/// relations with <see cref="WithUserRelations"/> (same CSV columns as relations.csv) without code changes.
/// Immutable and thread-safe.
/// </summary>
public sealed class CalibrationRegistry
{
    private readonly Dictionary<string, PlRelation> _relations;
    private readonly Dictionary<string, CalibrationAnchor> _anchors;

    private CalibrationRegistry(IEnumerable<PlRelation> relations, IEnumerable<CalibrationAnchor> anchors, IEnumerable<PeriodColourRelation> colours, IEnumerable<BandTransform> transforms,
        string hash, IReadOnlyList<string> userFiles)
    {
        Hash = hash;
        UserFiles = userFiles;
        BandTransforms = transforms.ToList();
        _relations = relations.ToDictionary(r => r.Id, StringComparer.Ordinal);
        _anchors = anchors.ToDictionary(a => a.Id, StringComparer.Ordinal);
        PeriodColourRelations = colours.ToList();
        Relations = _relations.Values.ToList();
    }

    private static readonly Lazy<CalibrationRegistry> EmbeddedLazy = new(Load, LazyThreadSafetyMode.ExecutionAndPublication);

    /// <summary>The embedded defaults, loaded once.</summary>
    public static CalibrationRegistry Embedded => EmbeddedLazy.Value;

    public IReadOnlyList<PlRelation> Relations { get; }

    /// <summary>
    /// SHA-256 (lower-case hex) over the embedded tables' text and, in order, each administrator file's name and
    /// text: two processes with the same hash use the same coefficients. Stored with every analysis.
    /// </summary>
    public string Hash { get; }

    /// <summary>Names of the administrator files whose relations this registry holds, in load order.</summary>
    public IReadOnlyList<string> UserFiles { get; }
    public IReadOnlyCollection<CalibrationAnchor> Anchors => _anchors.Values;
    public IReadOnlyList<PeriodColourRelation> PeriodColourRelations { get; }
    public IReadOnlyList<BandTransform> BandTransforms { get; }

    /// <summary>LMC distance modulus anchor (Pietrzynski et al. 2019), recorded separately from the relations.</summary>
    public CalibrationAnchor Lmc => _anchors["lmc_p19"];

    internal const string ResourcePrefix = "PulseLadder.Core.Data.calibration.";

    /// <summary>Loads the embedded tables. A malformed embedded table is a build defect, so it throws.</summary>
    public static CalibrationRegistry Load()
    {
        var errors = new List<CalibrationFileError>();
        string anchorText = ReadResource("anchors.csv"), colourText = ReadResource("period_colour.csv");
        string transformText = ReadResource("band_transforms.csv"), relationText = ReadResource("relations.csv");
        var anchors = ParseAnchors(anchorText, errors);
        var colours = ParsePeriodColour(colourText, errors);
        var transforms = ParseTransforms(transformText, errors);
        var relations = ParseRelations(relationText, anchors.ToDictionary(a => a.Id), [], errors, null);
        if (errors.Count > 0)
            throw new InvalidOperationException("embedded calibration tables are invalid: " + string.Join("; ", errors));
        string hash = Sha256Hex("embedded", anchorText, colourText, transformText, relationText);
        return new CalibrationRegistry(relations, anchors, colours, transforms, hash, []);
    }

    internal static string ReadResource(string name)
    {
        var asm = typeof(CalibrationRegistry).Assembly;
        // The csproj's LogicalName keeps %(RecursiveDir), whose separator is the build OS's ('/' or '\').
        var wanted = ResourcePrefix + name;
        var actual = asm.GetManifestResourceNames().FirstOrDefault(n => n.Replace('/', '.').Replace('\\', '.') == wanted)
            ?? throw new InvalidOperationException($"embedded resource {wanted} missing");
        using var s = asm.GetManifestResourceStream(actual)!;
        using var r = new StreamReader(s);
        return r.ReadToEnd();
    }

    public bool TryGet(string id, out PlRelation relation) => _relations.TryGetValue(id, out relation!);

    public bool TryGetAnchor(string id, out CalibrationAnchor anchor) => _anchors.TryGetValue(id, out anchor!);

    /// <summary>Relations for <paramref name="cls"/> whose bands are all in <paramref name="bands"/> (band aliases K/Ks accepted).</summary>
    public IEnumerable<PlRelation> Usable(PulsatorClass cls, IReadOnlyCollection<string> bands)
        => Relations.Where(r => r.Classes.Contains(cls) && r.RequiredBands().All(b => BandMatch.Find(b, bands) is not null));

    /// <summary>
    /// Default relation id for a class given the bands a star (or field) has, or null when none fits. Order: a
    /// Galactic parallax-calibrated Wesenheit (W_VI), then near-infrared K, then I, then V; RR Lyrae: K-band PLZ, then
    /// M_V-[Fe/H]; Type II Cepheids: Ks. The choice is a policy, documented in docs/calibrations.md.
    /// </summary>
    public string? Default(PulsatorClass cls, IReadOnlyCollection<string> bands)
    {
        string[] order = cls switch
        {
            PulsatorClass.ClassicalCepheidFundamental or PulsatorClass.ClassicalCepheidFirstOvertone =>
                ["benedict2007_wvi", "benedict2007_k", "benedict2007_i", "benedict2007_v", "persson2004_k", "udalski1999_wi"],
            PulsatorClass.TypeIICepheid => ["matsunaga2006_ks"],
            PulsatorClass.RRLyraeAB or PulsatorClass.RRLyraeC => ["catelan2004_k", "cc2003_mv"],
            _ => [],
        };
        foreach (var id in order)
        {
            if (_relations.TryGetValue(id, out var r) && r.Classes.Contains(cls)
                && r.RequiredBands().All(b => BandMatch.Find(b, bands) is not null))
                return id;
        }
        return Usable(cls, bands).Select(r => r.Id).FirstOrDefault();
    }

    /// <summary>
    /// A new registry with the relations of an administrator's CSV added (header as relations.csv). Rows with errors
    /// are left out and reported with line and column; an id already present is an error (ids are stable references
    /// stored with results). Anchors referenced must exist in this registry.
    /// </summary>
    public CalibrationLoadResult WithUserRelations(string csvText) => WithUserRelations(csvText, "");

    /// <summary>
    /// As <see cref="WithUserRelations(string)"/> for the text of the administrator file <paramref name="fileName"/>
    /// (a name without folder): every error carries the file name, every added relation is marked user-supplied with
    /// that file as its origin, and the file name and text enter <see cref="Hash"/>.
    /// </summary>
    public CalibrationLoadResult WithUserRelations(string csvText, string fileName)
    {
        ArgumentNullException.ThrowIfNull(csvText);
        ArgumentNullException.ThrowIfNull(fileName);
        var errors = new List<CalibrationFileError>();
        var added = ParseRelations(csvText, _anchors, _relations.Keys.ToHashSet(StringComparer.Ordinal), errors, fileName);
        var tagged = errors.Select(e => e with { File = fileName }).ToList();
        var files = fileName.Length == 0 ? UserFiles : UserFiles.Append(fileName).ToList();
        var registry = new CalibrationRegistry(Relations.Concat(added), _anchors.Values, PeriodColourRelations, BandTransforms,
            Sha256Hex(Hash, fileName, csvText), files);
        return new CalibrationLoadResult(registry, tagged);
    }

    private static string Sha256Hex(params string[] parts)
    {
        using var h = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        foreach (var p in parts)
        {
            // Length-prefixed so that moving text between parts changes the hash.
            h.AppendData(Encoding.UTF8.GetBytes(p.Length.ToString(CultureInfo.InvariantCulture) + ":"));
            h.AppendData(Encoding.UTF8.GetBytes(p));
        }
        return Convert.ToHexString(h.GetHashAndReset()).ToLowerInvariant();
    }

    private static List<CalibrationAnchor> ParseAnchors(string text, List<CalibrationFileError> errors)
    {
        var table = CsvTable.Parse(text, errors);
        var list = new List<CalibrationAnchor>();
        foreach (var row in table.Rows)
        {
            int before = errors.Count;
            var a = new CalibrationAnchor
            {
                Id = row.Text("id", errors),
                Kind = row.Text("kind", errors),
                Mu = row.NumberOrNull("mu", errors, 0, 40),
                MuErrStat = row.NumberOrNull("mu_err_stat", errors, 0, 5) ?? 0,
                MuErrSys = row.NumberOrNull("mu_err_sys", errors, 0, 5) ?? 0,
                Source = row.Text("source", errors),
                Tag = row.Text("tag", errors, required: false),
                Notes = row.Text("notes", errors, required: false),
            };
            if (errors.Count == before) list.Add(a);
        }
        return list;
    }

    private static List<BandTransform> ParseTransforms(string text, List<CalibrationFileError> errors)
    {
        var table = CsvTable.Parse(text, errors);
        var list = new List<BandTransform>();
        foreach (var row in table.Rows)
        {
            int before = errors.Count;
            var t = new BandTransform
            {
                Id = row.Text("id", errors),
                Target = ParseBand(row, "target", errors, required: true) ?? "",
                Mag = ParseBand(row, "mag", errors, required: true) ?? "",
                Color1 = ParseBand(row, "color1", errors, required: true) ?? "",
                Color2 = ParseBand(row, "color2", errors, required: true) ?? "",
                C0 = row.Number("c0", errors, -5, 5),
                C1 = row.Number("c1", errors, -5, 5),
                Scatter = row.Number("scatter", errors, 0, 1),
                Source = row.Text("source", errors),
                Tag = row.Text("tag", errors, required: false),
                Notes = row.Text("notes", errors, required: false),
            };
            if (errors.Count == before) list.Add(t);
        }
        return list;
    }

    private static List<PeriodColourRelation> ParsePeriodColour(string text, List<CalibrationFileError> errors)
    {
        var table = CsvTable.Parse(text, errors);
        var list = new List<PeriodColourRelation>();
        foreach (var row in table.Rows)
        {
            int before = errors.Count;
            var r = new PeriodColourRelation
            {
                Id = row.Text("id", errors),
                Classes = ParseClasses(row, errors),
                Color1 = ParseBand(row, "color1", errors, required: true) ?? "",
                Color2 = ParseBand(row, "color2", errors, required: true) ?? "",
                A = row.Number("a", errors, -5, 5),
                B = row.Number("b", errors, -5, 5),
                Scatter = row.Number("scatter", errors, 0, 2),
                LogPMin = row.Number("logp_min", errors, -2, 3),
                LogPMax = row.Number("logp_max", errors, -2, 3),
                Source = row.Text("source", errors),
                Tag = row.Text("tag", errors, required: false),
                Notes = row.Text("notes", errors, required: false),
            };
            if (errors.Count == before) list.Add(r);
        }
        return list;
    }

    private static List<PlRelation> ParseRelations(string text, IReadOnlyDictionary<string, CalibrationAnchor> anchors, HashSet<string> existingIds, List<CalibrationFileError> errors, string? userFile)
    {
        var table = CsvTable.Parse(text, errors);
        var list = new List<PlRelation>();
        var seen = new HashSet<string>(existingIds, StringComparer.Ordinal);
        foreach (var row in table.Rows)
        {
            int before = errors.Count;
            var id = row.Text("id", errors);
            if (id.Length > 0 && !IsValidId(id))
                errors.Add(new CalibrationFileError(row.Line, "id", $"'{id}' must be lower-case letters, digits and '_' (at most 64)"));
            else if (id.Length > 0 && !seen.Add(id))
                errors.Add(new CalibrationFileError(row.Line, "id", $"'{id}' is already defined"));

            var kindText = row.Text("kind", errors);
            RelationKind kind = RelationKind.Absolute;
            if (kindText.Length > 0)
            {
                if (kindText.Equals("absolute", StringComparison.OrdinalIgnoreCase)) kind = RelationKind.Absolute;
                else if (kindText.Equals("apparent", StringComparison.OrdinalIgnoreCase)) kind = RelationKind.Apparent;
                else errors.Add(new CalibrationFileError(row.Line, "kind", $"'{kindText}' is not 'absolute' or 'apparent'"));
            }

            var mag = ParseBand(row, "mag", errors, required: true);
            var c1 = ParseBand(row, "color1", errors, required: false);
            var c2 = ParseBand(row, "color2", errors, required: false);
            double? r = row.NumberOrNull("wesenheit_r", errors, 0, 10);
            if ((c1 is null) != (c2 is null))
                errors.Add(new CalibrationFileError(row.Line, c1 is null ? "color1" : "color2", "a Wesenheit index needs both color1 and color2"));
            if (c1 is not null && c2 is not null)
            {
                if (c1 == c2) errors.Add(new CalibrationFileError(row.Line, "color2", "color2 must differ from color1"));
                if (r is null or 0) errors.Add(new CalibrationFileError(row.Line, "wesenheit_r", "a Wesenheit index needs R > 0"));
            }

            var scaleText = row.Text("metallicity_scale", errors, required: false);
            var scale = MetallicityScale.FeH;
            if (scaleText.Length > 0)
            {
                if (scaleText.Equals("feh", StringComparison.OrdinalIgnoreCase)) scale = MetallicityScale.FeH;
                else if (scaleText.Equals("logz_salaris", StringComparison.OrdinalIgnoreCase)) scale = MetallicityScale.LogZSalaris;
                else errors.Add(new CalibrationFileError(row.Line, "metallicity_scale", $"'{scaleText}' is not 'feh' or 'logz_salaris'"));
            }

            var modeText = row.Text("period_mode", errors, required: false);
            bool needsF = true;
            if (modeText.Length > 0)
            {
                if (modeText.Equals("F", StringComparison.OrdinalIgnoreCase)) needsF = true;
                else if (modeText.Equals("1O", StringComparison.OrdinalIgnoreCase) || modeText.Equals("as_observed", StringComparison.OrdinalIgnoreCase)) needsF = false;
                else errors.Add(new CalibrationFileError(row.Line, "period_mode", $"'{modeText}' is not 'F', '1O' or 'as_observed'"));
            }

            var anchorId = row.Text("anchor", errors);
            if (anchorId.Length > 0)
            {
                if (!anchors.TryGetValue(anchorId, out var anchor))
                    errors.Add(new CalibrationFileError(row.Line, "anchor", $"unknown anchor '{anchorId}' (known: {string.Join(", ", anchors.Keys.Order(StringComparer.Ordinal))})"));
                else if (kind == RelationKind.Apparent && anchor.Mu is null)
                    errors.Add(new CalibrationFileError(row.Line, "anchor", $"apparent relations need an anchor with a distance modulus; '{anchorId}' has none"));
            }

            double logPMin = row.Number("logp_min", errors, -2, 3);
            double logPMax = row.Number("logp_max", errors, -2, 3);
            if (logPMax <= logPMin) errors.Add(new CalibrationFileError(row.Line, "logp_max", "must exceed logp_min"));

            var rel = new PlRelation
            {
                Id = id,
                Family = row.Text("family", errors),
                Classes = ParseClasses(row, errors),
                Kind = kind,
                Mag = mag ?? "",
                Color1 = c1,
                Color2 = c2,
                WesenheitR = r ?? 0,
                A = row.Number("a", errors, -20, 30),
                AErr = row.Number("a_err", errors, 0, 2),
                B = row.Number("b", errors, -10, 10),
                BErr = row.Number("b_err", errors, 0, 5),
                P0 = row.Number("p0", errors, -2, 3),
                Gamma = row.NumberOrNull("gamma", errors, -5, 5) ?? 0,
                GammaErr = row.NumberOrNull("gamma_err", errors, 0, 5) ?? 0,
                MetallicityScale = scale,
                ZRef = row.NumberOrNull("z_ref", errors, -10, 2) ?? 0,
                FeHDefault = row.NumberOrNull("feh_default", errors, -5, 2) ?? 0,
                FeHDefaultErr = row.NumberOrNull("feh_default_err", errors, 0, 5) ?? 0,
                AlphaFe = row.NumberOrNull("alpha_fe", errors, -1, 2) ?? 0,
                Scatter = row.Number("scatter", errors, 0, 2),
                LogPMin = logPMin,
                LogPMax = logPMax,
                NeedsFundamentalPeriod = needsF,
                AnchorId = anchorId,
                Source = row.Text("source", errors),
                Table = row.Text("table", errors, required: false),
                Tag = row.Text("tag", errors, required: false),
                Notes = row.Text("notes", errors, required: false),
                UserSupplied = userFile is not null,
                UserFile = userFile is { Length: > 0 } ? userFile : null,
            };
            if (errors.Count == before) list.Add(rel);
        }
        return list;
    }

    private static bool IsValidId(string id) => id.Length <= 64 && id.All(c => c is (>= 'a' and <= 'z') or (>= '0' and <= '9') or '_');

    private static IReadOnlyList<PulsatorClass> ParseClasses(CsvRow row, List<CalibrationFileError> errors)
    {
        var text = row.Text("class", errors);
        var list = new List<PulsatorClass>();
        foreach (var part in text.Split(';', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries))
        {
            if (PulsatorClasses.TryParse(part, out var c) && c is not (PulsatorClass.Unknown or PulsatorClass.NotVariable or PulsatorClass.OtherVariable))
                list.Add(c);
            else
                errors.Add(new CalibrationFileError(row.Line, "class", $"'{part}' is not a pulsator class code ({string.Join(", ", PulsatorClasses.AllCodes)})"));
        }
        if (text.Length > 0 && list.Count == 0 && !errors.Any(e => e.Line == row.Line && e.Field == "class"))
            errors.Add(new CalibrationFileError(row.Line, "class", "no class given"));
        return list;
    }

    private static string? ParseBand(CsvRow row, string column, List<CalibrationFileError> errors, bool required)
    {
        var text = row.Text(column, errors, required);
        if (text.Length == 0) return null;
        if (Bands.TryNormalize(text, out var band)) return band;
        errors.Add(new CalibrationFileError(row.Line, column, $"'{text}' is not a known band ({string.Join(" ", Bands.Known.Keys)})"));
        return null;
    }

}

/// <summary>Matching of a relation's band to the bands a star has; K and Ks stand in for each other (flagged).</summary>
internal static class BandMatch
{
    /// <summary>The star band to use for relation band <paramref name="wanted"/>, or null.</summary>
    public static string? Find(string wanted, IReadOnlyCollection<string> available)
    {
        if (available.Contains(wanted)) return wanted;
        string? alt = wanted switch { "K" => "Ks", "Ks" => "K", _ => null };
        return alt is not null && available.Contains(alt) ? alt : null;
    }
}
