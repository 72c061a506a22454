namespace PulseLadder.Core.Ingest;

/// <summary>
/// Hands out one string instance per distinct text (star names, bands, observers repeat on every row), so a large
/// file does not allocate a string per field. Bounded: past the cap, new texts are allocated but not kept.
/// </summary>
internal sealed class StringPool
{
    private readonly Dictionary<string, string> _map = new(StringComparer.Ordinal);
    private readonly Dictionary<string, string>.AlternateLookup<ReadOnlySpan<char>> _lookup;
    private readonly int _cap;

    public StringPool(int cap = 100_000)
    {
        _cap = cap;
        _lookup = _map.GetAlternateLookup<ReadOnlySpan<char>>();
    }

    public string Get(ReadOnlySpan<char> text)
    {
        if (text.IsEmpty) return string.Empty;
        if (_lookup.TryGetValue(text, out var s)) return s;
        s = text.ToString();
        if (_map.Count < _cap) _map[s] = s;
        return s;
    }
}
