namespace PulseLadder.Core.Ingest;

/// <summary>
/// Interns the texts that identify a row (star, band, observer): one string instance and a small integer id per
/// distinct text, so rows allocate no strings and the duplicate index compares integers instead of hashing strings.
/// Unbounded on purpose (ids must stay unique); the row limit bounds its size.
/// </summary>
internal sealed class SymbolTable
{
    private readonly Dictionary<string, int> _ids = new(StringComparer.Ordinal);
    private readonly Dictionary<string, int>.AlternateLookup<ReadOnlySpan<char>> _lookup;
    private readonly List<string> _texts = [];

    public SymbolTable() => _lookup = _ids.GetAlternateLookup<ReadOnlySpan<char>>();

    public string Intern(ReadOnlySpan<char> text, out int id)
    {
        if (_lookup.TryGetValue(text, out id)) return _texts[id];
        string s = text.ToString();
        return Add(s, out id);
    }

    public string Intern(string text, out int id)
    {
        if (_ids.TryGetValue(text, out id)) return _texts[id];
        return Add(text, out id);
    }

    /// <summary>The text of an id handed out before.</summary>
    public string Text(int id) => _texts[id];

    private string Add(string s, out int id)
    {
        id = _texts.Count;
        _texts.Add(s);
        _ids.Add(s, id);
        return s;
    }
}
