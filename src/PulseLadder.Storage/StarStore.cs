using System.Data.Common;
using Dapper;
using PulseLadder.Core.Photometry;

namespace PulseLadder.Storage;

/// <summary>Stars of the campaign, with their revision (what "current analysis" means) and review state.</summary>
public static class StarStore
{
    private const string Columns = """
        s.id, s.name, s.field_id, f.name AS field_name, s.ra_deg, s.dec_deg, s.declared_class, s.ebv, s.ebv_err, s.feh,
        s.revision, s.review_state, s.chosen_period_days, s.chosen_class, s.created_at
        """;

    /// <summary>
    /// Inserts a star from the star list, or updates it when its listed values changed (then its revision is bumped
    /// so it is analysed again). Returns (id, changed).
    /// </summary>
    public static (long Id, bool Changed) Upsert(DbConnection c, DbTransaction tx, StarInfo star, long fieldId, string now)
    {
        string? cls = star.DeclaredClass?.ToCode();
        var existing = c.QuerySingleOrDefault<StarRow>($"SELECT {Columns} FROM stars s JOIN fields f ON f.id = s.field_id WHERE s.name = @Name", new { star.Name }, tx);
        if (existing is null) return (Insert(c, tx, star, fieldId, now), true);
        bool changed = existing.FieldId != fieldId || existing.RaDeg != star.Position.RaDeg || existing.DecDeg != star.Position.DecDeg
            || existing.DeclaredClass != cls || existing.Ebv != star.Ebv || existing.EbvErr != star.EbvErr || existing.Feh != star.FeH;
        if (changed)
        {
            c.Execute("""
                UPDATE stars SET field_id = @fieldId, ra_deg = @ra, dec_deg = @dec, declared_class = @cls, ebv = @ebv,
                       ebv_err = @ebvErr, feh = @feh, revision = revision + 1
                WHERE id = @id
                """, new { id = existing.Id, fieldId, ra = star.Position.RaDeg, dec = star.Position.DecDeg, cls, ebv = star.Ebv, ebvErr = star.EbvErr, feh = star.FeH }, tx);
        }
        return (existing.Id, changed);
    }

    /// <summary>Adds a star the caller knows is not stored yet (its name is unique); returns its id.</summary>
    public static long Insert(DbConnection c, DbTransaction tx, StarInfo star, long fieldId, string now) =>
        c.ExecuteScalar<long>("""
            INSERT INTO stars (name, field_id, ra_deg, dec_deg, declared_class, ebv, ebv_err, feh, created_at)
            VALUES (@name, @fieldId, @ra, @dec, @cls, @ebv, @ebvErr, @feh, @now) RETURNING id
            """, new { name = star.Name, fieldId, ra = star.Position.RaDeg, dec = star.Position.DecDeg, cls = star.DeclaredClass?.ToCode(), ebv = star.Ebv, ebvErr = star.EbvErr, feh = star.FeH, now }, tx);

    public static Dictionary<string, long> IdsByName(DbConnection c, DbTransaction? tx = null) =>
        c.Query<(long Id, string Name)>("SELECT id, name FROM stars", transaction: tx).ToDictionary(r => r.Name, r => r.Id, StringComparer.Ordinal);

    public static StarRow? Get(DbConnection c, long id, DbTransaction? tx = null) =>
        c.QuerySingleOrDefault<StarRow>($"SELECT {Columns} FROM stars s JOIN fields f ON f.id = s.field_id WHERE s.id = @id", new { id }, tx);

    public static StarRow? GetByName(DbConnection c, string name) =>
        c.QuerySingleOrDefault<StarRow>($"SELECT {Columns} FROM stars s JOIN fields f ON f.id = s.field_id WHERE s.name = @name", new { name });

    public static IReadOnlyList<StarRow> ListByField(DbConnection c, long fieldId, DbTransaction? tx = null) =>
        c.Query<StarRow>($"SELECT {Columns} FROM stars s JOIN fields f ON f.id = s.field_id WHERE s.field_id = @fieldId ORDER BY s.name", new { fieldId }, tx).AsList();

    /// <summary>Marks stars as needing a new analysis (new photometry, a reviewer's choice).</summary>
    public static void BumpRevision(DbConnection c, DbTransaction tx, IEnumerable<long> starIds)
    {
        foreach (var id in starIds)
            c.Execute("UPDATE stars SET revision = revision + 1 WHERE id = @id", new { id }, tx);
    }

    /// <summary>Stars with no analysis for their current revision and this pipeline version: the work that remains.</summary>
    public static IReadOnlyList<(long StarId, long Revision)> Pending(DbConnection c, string pipelineVersion) =>
        c.Query<(long, long)>("""
            SELECT s.id, s.revision FROM stars s
            WHERE EXISTS (SELECT 1 FROM observations o WHERE o.star_id = s.id)
              AND NOT EXISTS (SELECT 1 FROM analyses a WHERE a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @pipelineVersion)
            ORDER BY s.id
            """, new { pipelineVersion }).AsList();

    /// <summary>
    /// Whether any star of the field has observations but no analysis for its current revision and this pipeline
    /// version. Newest stars are probed first: jobs run roughly in id order, so while a field is being analysed the
    /// first probe usually hits, and a full scan of the field happens only near its end.
    /// </summary>
    public static bool HasPendingInField(DbConnection c, long fieldId, string pipelineVersion) =>
        c.QueryFirstOrDefault<long?>("""
            SELECT s.id FROM stars s
            WHERE s.field_id = @fieldId
              AND EXISTS (SELECT 1 FROM observations o WHERE o.star_id = s.id)
              AND NOT EXISTS (SELECT 1 FROM analyses a WHERE a.star_id = s.id AND a.revision = s.revision AND a.pipeline_version = @pipelineVersion)
            ORDER BY s.id DESC
            LIMIT 1
            """, new { fieldId, pipelineVersion }) is not null;

    public static long CountWithObservations(DbConnection c) =>
        c.ExecuteScalar<long>("SELECT COUNT(*) FROM stars s WHERE EXISTS (SELECT 1 FROM observations o WHERE o.star_id = s.id)");

    public static void SetReview(DbConnection c, DbTransaction tx, long starId, string state, double? chosenPeriodDays, string? chosenClass, bool bumpRevision)
    {
        c.Execute("""
            UPDATE stars SET review_state = @state, chosen_period_days = @chosenPeriodDays, chosen_class = @chosenClass,
                   revision = revision + @bump
            WHERE id = @starId
            """, new { starId, state, chosenPeriodDays, chosenClass, bump = bumpRevision ? 1 : 0 }, tx);
    }

    public static StarInfo ToStarInfo(StarRow s) => new(
        s.Name, s.FieldName, Core.Quantities.SkyPosition.FromDegrees(s.RaDeg, s.DecDeg),
        s.DeclaredClass is { } dc && PulsatorClasses.TryParse(dc, out var c) ? c : null,
        s.Ebv, s.EbvErr, s.Feh);
}
