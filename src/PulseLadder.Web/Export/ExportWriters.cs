using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Xml;
using PulseLadder.Web.Api;

namespace PulseLadder.Web.Export;

/// <summary>What an export file says about itself besides the rows (taken from the stored results).</summary>
/// <param name="Title">Field name, or "campaign" for the whole database.</param>
/// <param name="PipelineVersions">Distinct pipeline versions of the exported results.</param>
/// <param name="RelationIds">Period-luminosity relations used by the exported distances.</param>
/// <param name="AnchorIds">Zero-point anchors used by the exported distances.</param>
/// <param name="Methods">The plain-text methods paragraph (MethodsReport).</param>
/// <param name="Audit">Who uploaded and decided what, when (append-only audit log entries of the exported fields).</param>
internal sealed record ExportMetadata(string Title, string SoftwareVersion, IReadOnlyList<string> PipelineVersions,
    IReadOnlyList<string> RelationIds, IReadOnlyList<string> AnchorIds, bool AcceptedOnly, string Methods, IReadOnlyList<Storage.AuditRow> Audit);

/// <summary>CSV, JSON and VOTable 1.4 writers over one column selection; all three carry the same values.</summary>
internal static class ExportWriters
{
    /// <summary>RFC 4180 CSV with a header row; numbers in invariant culture, round-trip ("R") precision; null as empty.</summary>
    public static string Csv(IReadOnlyList<StarRowDto> rows, IReadOnlyList<ExportColumn> columns)
    {
        var sb = new StringBuilder();
        sb.AppendJoin(',', columns.Select(c => c.Name)).Append('\n');
        foreach (var r in rows)
            sb.AppendJoin(',', columns.Select(c => CsvCell(ExportColumns.Format(c.Value(r))))).Append('\n');
        return sb.ToString();
    }

    /// <summary>
    /// <c>{ "title", "software_version", "pipeline_versions", "relation_ids", "anchor_ids", "accepted_only", "methods",
    /// "columns": [{name, unit, ucd, description}], "rows": [{column: value}], "audit": [{id, at, actor, action, subject,
    /// detail}] }</c>; numbers as JSON numbers, null as null.
    /// </summary>
    public static byte[] Json(IReadOnlyList<StarRowDto> rows, IReadOnlyList<ExportColumn> columns, ExportMetadata meta)
    {
        using var ms = new MemoryStream();
        using (var w = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = false }))
        {
            w.WriteStartObject();
            w.WriteString("title", meta.Title);
            w.WriteString("software_version", meta.SoftwareVersion);
            WriteArray(w, "pipeline_versions", meta.PipelineVersions);
            WriteArray(w, "relation_ids", meta.RelationIds);
            WriteArray(w, "anchor_ids", meta.AnchorIds);
            w.WriteBoolean("accepted_only", meta.AcceptedOnly);
            w.WriteString("methods", meta.Methods);
            w.WriteStartArray("columns");
            foreach (var c in columns)
            {
                w.WriteStartObject();
                w.WriteString("name", c.Name);
                if (c.Unit.Length > 0) w.WriteString("unit", c.Unit); else w.WriteNull("unit");
                w.WriteString("ucd", c.Ucd);
                w.WriteString("description", c.Description);
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteStartArray("rows");
            foreach (var r in rows)
            {
                w.WriteStartObject();
                foreach (var c in columns)
                {
                    switch (c.Value(r))
                    {
                        case null: w.WriteNull(c.Name); break;
                        case double d when double.IsFinite(d): w.WriteNumber(c.Name, d); break;
                        case double: w.WriteNull(c.Name); break;
                        case var v: w.WriteString(c.Name, ExportColumns.Format(v)); break;
                    }
                }
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteStartArray("audit");
            foreach (var a in meta.Audit)
            {
                w.WriteStartObject();
                w.WriteNumber("id", a.Id);
                w.WriteString("at", a.At);
                w.WriteString("actor", a.Actor);
                w.WriteString("action", a.Action);
                w.WriteString("subject", a.Subject);
                w.WriteString("detail", a.Detail);
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteEndObject();
        }
        return ms.ToArray();
    }

    /// <summary>The audit entries as RFC 4180 CSV: <c>id,at,actor,action,subject,detail</c> (the CSV companion of a table export).</summary>
    public static string AuditCsv(IReadOnlyList<Storage.AuditRow> audit)
    {
        var sb = new StringBuilder("id,at,actor,action,subject,detail\n");
        foreach (var a in audit)
            sb.AppendJoin(',', [a.Id.ToString(CultureInfo.InvariantCulture), CsvCell(a.At), CsvCell(a.Actor), CsvCell(a.Action), CsvCell(a.Subject), CsvCell(a.Detail)]).Append('\n');
        return sb.ToString();
    }

    /// <summary>
    /// IVOA VOTable 1.4 (namespace v1.3, which 1.4 keeps) with one RESOURCE/TABLE and TABLEDATA. Doubles are
    /// "double" FIELDs; a missing value is an empty TD (read as NaN/masked by VOTable 1.3+ readers). Text columns
    /// are char arraysize="*", where a missing value is the empty string. Pipeline version, relation and anchor ids
    /// are PARAMs; the methods paragraph is the TABLE's DESCRIPTION and an INFO name="methods".
    /// </summary>
    public static byte[] VoTable(IReadOnlyList<StarRowDto> rows, IReadOnlyList<ExportColumn> columns, ExportMetadata meta)
    {
        using var ms = new MemoryStream();
        var settings = new XmlWriterSettings { Encoding = new UTF8Encoding(false), Indent = true, NewLineChars = "\n" };
        const string ns = "http://www.ivoa.net/xml/VOTable/v1.3";
        using (var w = XmlWriter.Create(ms, settings))
        {
            w.WriteStartDocument();
            w.WriteStartElement("VOTABLE", ns);
            w.WriteAttributeString("version", "1.4");
            w.WriteStartElement("RESOURCE", ns);
            w.WriteAttributeString("name", Xml(meta.Title));
            w.WriteAttributeString("type", "results");
            Info(w, ns, "software", "PulseLadder " + meta.SoftwareVersion);
            Info(w, ns, "methods", meta.Methods);
            w.WriteStartElement("TABLE", ns);
            w.WriteAttributeString("name", Xml(meta.Title) + "-distances");
            w.WriteAttributeString("nrows", rows.Count.ToString(CultureInfo.InvariantCulture));
            w.WriteElementString("DESCRIPTION", ns, Xml(meta.Methods));
            Param(w, ns, "pipeline_version", "meta.version", string.Join(",", meta.PipelineVersions), "Pipeline version(s) of the exported results");
            Param(w, ns, "software_version", "meta.version", meta.SoftwareVersion, "Version of the software that wrote this file");
            Param(w, ns, "relation_ids", "meta.ref", string.Join(",", meta.RelationIds), "Period-luminosity relations used by the distances");
            Param(w, ns, "anchor_ids", "meta.ref", string.Join(",", meta.AnchorIds), "Zero-point anchors used by the distances");
            Param(w, ns, "accepted_only", "meta.code", meta.AcceptedOnly ? "true" : "false", "Only stars a reviewer accepted");
            foreach (var c in columns)
            {
                w.WriteStartElement("FIELD", ns);
                w.WriteAttributeString("name", Xml(c.Name));
                // No ID: band names come from uploads and need not be XML NCNames; readers then key columns by name.
                if (c.Kind == ExportKind.Number) w.WriteAttributeString("datatype", "double");
                else { w.WriteAttributeString("datatype", "char"); w.WriteAttributeString("arraysize", "*"); }
                if (c.Unit.Length > 0) w.WriteAttributeString("unit", c.Unit);
                w.WriteAttributeString("ucd", c.Ucd);
                w.WriteElementString("DESCRIPTION", ns, c.Description);
                w.WriteEndElement();
            }
            w.WriteStartElement("DATA", ns);
            w.WriteStartElement("TABLEDATA", ns);
            foreach (var r in rows)
            {
                w.WriteStartElement("TR", ns);
                foreach (var c in columns)
                {
                    var v = c.Value(r);
                    w.WriteElementString("TD", ns, v is double d && !double.IsFinite(d) ? "" : Xml(ExportColumns.Format(v)));
                }
                w.WriteEndElement();
            }
            w.WriteEndElement();
            w.WriteEndElement();
            w.WriteEndElement(); // TABLE
            AuditTable(w, ns, meta);
            w.WriteEndElement(); // RESOURCE
            w.WriteEndElement(); // VOTABLE
            w.WriteEndDocument();
        }
        return ms.ToArray();
    }

    /// <summary>Second TABLE "audit": who uploaded and decided what, when.</summary>
    private static void AuditTable(XmlWriter w, string ns, ExportMetadata meta)
    {
        w.WriteStartElement("TABLE", ns);
        w.WriteAttributeString("name", "audit");
        w.WriteAttributeString("nrows", meta.Audit.Count.ToString(CultureInfo.InvariantCulture));
        w.WriteElementString("DESCRIPTION", ns, "Append-only audit log entries of the exported fields: uploads that touched their stars, review decisions, settings changes");
        void Field(string name, string datatype, string ucd, string description)
        {
            w.WriteStartElement("FIELD", ns);
            w.WriteAttributeString("name", name);
            w.WriteAttributeString("datatype", datatype);
            if (datatype == "char") w.WriteAttributeString("arraysize", "*");
            w.WriteAttributeString("ucd", ucd);
            w.WriteElementString("DESCRIPTION", ns, description);
            w.WriteEndElement();
        }
        Field("id", "long", "meta.id;meta.main", "Audit entry id (increasing)");
        Field("at", "char", "time.creation", "When (ISO 8601, UTC)");
        Field("actor", "char", "meta.id", "Who");
        Field("action", "char", "meta.code", "What: upload, review:ACTION, field:settings");
        Field("subject", "char", "meta.id", "On what: batch N, star NAME, field NAME");
        Field("detail", "char", "meta.note", "Details and the reviewer's note");
        w.WriteStartElement("DATA", ns);
        w.WriteStartElement("TABLEDATA", ns);
        foreach (var a in meta.Audit)
        {
            w.WriteStartElement("TR", ns);
            foreach (var v in new[] { a.Id.ToString(CultureInfo.InvariantCulture), a.At, a.Actor, a.Action, a.Subject, a.Detail })
                w.WriteElementString("TD", ns, Xml(v));
            w.WriteEndElement();
        }
        w.WriteEndElement();
        w.WriteEndElement();
        w.WriteEndElement();
    }

    private static void Info(XmlWriter w, string ns, string name, string value)
    {
        w.WriteStartElement("INFO", ns);
        w.WriteAttributeString("name", name);
        w.WriteAttributeString("value", Xml(value));
        w.WriteEndElement();
    }

    private static void Param(XmlWriter w, string ns, string name, string ucd, string value, string description)
    {
        w.WriteStartElement("PARAM", ns);
        w.WriteAttributeString("name", name);
        w.WriteAttributeString("datatype", "char");
        w.WriteAttributeString("arraysize", "*");
        w.WriteAttributeString("ucd", ucd);
        w.WriteAttributeString("value", Xml(value));
        w.WriteElementString("DESCRIPTION", ns, description);
        w.WriteEndElement();
    }

    /// <summary>
    /// Text as XML 1.0 can carry it: characters XML forbids (most C0 controls, lone surrogates), which older
    /// databases may hold in names, become U+FFFD instead of failing the whole export.
    /// </summary>
    internal static string Xml(string s)
    {
        int bad = -1;
        for (int i = 0; i < s.Length && bad < 0; i++)
        {
            if (char.IsHighSurrogate(s[i]) && i + 1 < s.Length && char.IsLowSurrogate(s[i + 1])) { i++; continue; }
            if (!XmlConvert.IsXmlChar(s[i])) bad = i;
        }
        if (bad < 0) return s;
        var sb = new StringBuilder(s.Length);
        for (int i = 0; i < s.Length; i++)
        {
            if (char.IsHighSurrogate(s[i]) && i + 1 < s.Length && char.IsLowSurrogate(s[i + 1])) { sb.Append(s[i]).Append(s[i + 1]); i++; }
            else sb.Append(XmlConvert.IsXmlChar(s[i]) ? s[i] : '\uFFFD');
        }
        return sb.ToString();
    }

    private static void WriteArray(Utf8JsonWriter w, string name, IReadOnlyList<string> values)
    {
        w.WriteStartArray(name);
        foreach (var v in values) w.WriteStringValue(v);
        w.WriteEndArray();
    }

    private static string CsvCell(string s) => PulseLadder.Core.Reporting.CsvText.Cell(s);
}
