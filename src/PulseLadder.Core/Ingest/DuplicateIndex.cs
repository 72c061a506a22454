namespace PulseLadder.Core.Ingest;

/// <summary>
/// Finds rows repeating an earlier (star, band, observer, time). Rows are grouped by (star, band, observer); while a
/// group's times arrive in increasing order (the usual case: files sorted by time) the group is an append-only sorted
/// list, so a row costs one small-dictionary lookup and an append; the first out-of-order time turns that group into a
/// hash index. Keeps 12 bytes per row in the common case (the line as 32 bits: a file would need more than 4 GB of
/// line ends to overflow it, and a group that meets such a line becomes a hash index).
/// </summary>
internal sealed class DuplicateIndex
{
    private readonly Dictionary<(int Star, int Band, int Observer), Group> _groups = [];
    private (int, int, int) _lastKey = (-1, -1, -1);
    private Group? _lastGroup;

    /// <summary>True when the row is new (and records it); otherwise the line of the earlier row.</summary>
    public bool TryAdd(int star, int band, int observer, double time, long line, out long firstLine)
    {
        var key = (star, band, observer);
        Group group;
        if (_lastGroup is not null && _lastKey == key) group = _lastGroup;
        else
        {
            if (!_groups.TryGetValue(key, out group!))
            {
                group = new Group();
                _groups.Add(key, group);
            }
            _lastKey = key;
            _lastGroup = group;
        }
        return group.TryAdd(time, line, out firstLine);
    }

    private sealed class Group
    {
        private List<double>? _times = [];
        private List<uint>? _lines = [];
        private Dictionary<double, long>? _index;

        public bool TryAdd(double time, long line, out long firstLine)
        {
            firstLine = 0;
            if (_index is not null)
            {
                if (_index.TryGetValue(time, out firstLine)) return false;
                _index.Add(time, line);
                return true;
            }
            var times = _times!;
            if ((times.Count == 0 || time > times[^1]) && line <= uint.MaxValue)
            {
                times.Add(time);
                _lines!.Add((uint)line);
                return true;
            }
            int at = times.BinarySearch(time);
            if (at >= 0)
            {
                firstLine = _lines![at];
                return false;
            }
            _index = new Dictionary<double, long>(times.Count * 2);
            for (int i = 0; i < times.Count; i++) _index.Add(times[i], _lines![i]);
            _index.Add(time, line);
            _times = null;
            _lines = null;
            return true;
        }
    }
}
