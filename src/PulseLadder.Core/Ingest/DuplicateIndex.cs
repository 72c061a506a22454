namespace PulseLadder.Core.Ingest;

/// <summary>
/// Finds rows repeating an earlier (star, band, observer, time). Rows are grouped by (star, band, observer).
/// <para>
/// A fully indexed group (every group when no selector is given) finds every duplicate: while its times arrive in
/// increasing order (the usual case: files sorted by time) it is an append-only sorted list, so a row costs one
/// small-dictionary lookup and an append; the first out-of-order time turns it into a hash index. 12 bytes per row in
/// the common case (the line as 32 bits: a file would need more than 4 GB of line ends to overflow it, and a group
/// that meets such a line becomes a hash index).
/// </para>
/// <para>
/// A group the selector leaves out keeps only its latest time and line: while its times strictly increase no row can
/// repeat an earlier one, and a repeat of the latest time is found. The first time that goes back is not checked;
/// the group is listed in <see cref="OutOfOrder"/> and its later rows are not checked either, so the caller must read
/// the file again with that group fully indexed. Memory then grows with the rows of out-of-order groups only.
/// </para>
/// </summary>
internal sealed class DuplicateIndex(Func<int, int, int, bool>? fullyIndexed = null)
{
    private readonly Dictionary<(int Star, int Band, int Observer), Group> _groups = [];
    private readonly List<(int Star, int Band, int Observer)> _outOfOrder = [];
    private (int, int, int) _lastKey = (-1, -1, -1);
    private Group? _lastGroup;

    /// <summary>Groups (symbol ids) that went back in time without a full index, in the order found.</summary>
    public IReadOnlyList<(int Star, int Band, int Observer)> OutOfOrder => _outOfOrder;

    /// <summary>True when the row is new (and records it) or cannot be checked; otherwise the line of the earlier row.</summary>
    public bool TryAdd(int star, int band, int observer, double time, long line, out long firstLine)
    {
        var key = (star, band, observer);
        Group group;
        if (_lastGroup is not null && _lastKey == key) group = _lastGroup;
        else
        {
            if (!_groups.TryGetValue(key, out group!))
            {
                group = fullyIndexed is null || fullyIndexed(star, band, observer) ? new FullGroup() : new LatestGroup();
                _groups.Add(key, group);
            }
            _lastKey = key;
            _lastGroup = group;
        }
        var outcome = group.TryAdd(time, line, out firstLine);
        if (outcome == Outcome.WentBack) _outOfOrder.Add(key);
        return outcome != Outcome.Duplicate;
    }

    private enum Outcome { New, Duplicate, WentBack, Unchecked }

    private abstract class Group
    {
        public abstract Outcome TryAdd(double time, long line, out long firstLine);
    }

    /// <summary>Latest time and line only (see the class summary).</summary>
    private sealed class LatestGroup : Group
    {
        private double _time = double.NegativeInfinity;
        private long _line;
        private bool _unchecked;

        public override Outcome TryAdd(double time, long line, out long firstLine)
        {
            firstLine = 0;
            if (_unchecked) return Outcome.Unchecked;
            if (time > _time)
            {
                _time = time;
                _line = line;
                return Outcome.New;
            }
            if (time == _time)
            {
                // Times so far strictly increase, so the only earlier row at this time is the latest one.
                firstLine = _line;
                return Outcome.Duplicate;
            }
            _unchecked = true;
            return Outcome.WentBack;
        }
    }

    private sealed class FullGroup : Group
    {
        private List<double>? _times = [];
        private List<uint>? _lines = [];
        private Dictionary<double, long>? _index;

        public override Outcome TryAdd(double time, long line, out long firstLine)
        {
            firstLine = 0;
            if (_index is not null)
            {
                if (_index.TryGetValue(time, out firstLine)) return Outcome.Duplicate;
                _index.Add(time, line);
                return Outcome.New;
            }
            var times = _times!;
            if ((times.Count == 0 || time > times[^1]) && line <= uint.MaxValue)
            {
                times.Add(time);
                _lines!.Add((uint)line);
                return Outcome.New;
            }
            int at = times.BinarySearch(time);
            if (at >= 0)
            {
                firstLine = _lines![at];
                return Outcome.Duplicate;
            }
            _index = new Dictionary<double, long>(times.Count * 2);
            for (int i = 0; i < times.Count; i++) _index.Add(times[i], _lines![i]);
            _index.Add(time, line);
            _times = null;
            _lines = null;
            return Outcome.New;
        }
    }
}
