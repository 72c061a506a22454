namespace PulseLadder.Core.Ingest;

/// <summary>
/// Reads lines from a TextReader into one reused buffer, so memory stays bounded by the line limit whatever the
/// file size, and a file without line breaks costs one linear pass (never a hang or a giant string).
/// Line breaks: LF or CRLF. A leading BOM character is dropped.
/// </summary>
internal sealed class LineReader
{
    private readonly TextReader _reader;
    private readonly int _maxLineLength;
    private readonly char[] _buffer;
    private int _start;
    private int _end;
    private int _scanFrom;
    private bool _eof;
    private bool _first = true;

    public LineReader(TextReader reader, int maxLineLength)
    {
        _reader = reader;
        _maxLineLength = maxLineLength;
        // Room for a maximal line, its CRLF, and a read chunk, so a legal line never needs a second buffer.
        _buffer = new char[maxLineLength + 2 + 16 * 1024];
    }

    /// <summary>1-based number of the line last returned.</summary>
    public long LineNumber { get; private set; }

    /// <summary>
    /// Next line without its break. False at the end of input. <paramref name="tooLong"/> is set (and the line is
    /// empty) when the line exceeded the limit; the reader has then skipped to the next line break.
    /// </summary>
    public bool TryReadLine(out ReadOnlySpan<char> line, out bool tooLong)
    {
        tooLong = false;
        while (true)
        {
            int nl = _buffer.AsSpan(_scanFrom, _end - _scanFrom).IndexOf('\n');
            if (nl >= 0)
            {
                int at = _scanFrom + nl;
                var raw = _buffer.AsSpan(_start, at - _start);
                _start = _scanFrom = at + 1;
                return Deliver(raw, out line, out tooLong);
            }
            _scanFrom = _end;
            if (_end - _start > _maxLineLength + 1)
            {
                SkipToNextLineBreak();
                LineNumber++;
                _first = false;
                line = default;
                tooLong = true;
                return true;
            }
            if (_eof)
            {
                if (_start < _end)
                {
                    var raw = _buffer.AsSpan(_start, _end - _start);
                    _start = _scanFrom = _end;
                    return Deliver(raw, out line, out tooLong);
                }
                line = default;
                return false;
            }
            Fill();
        }
    }

    private bool Deliver(ReadOnlySpan<char> raw, out ReadOnlySpan<char> line, out bool tooLong)
    {
        LineNumber++;
        if (raw.Length > 0 && raw[^1] == '\r') raw = raw[..^1];
        if (_first)
        {
            _first = false;
            if (raw.Length > 0 && raw[0] == '\uFEFF') raw = raw[1..];
        }
        tooLong = raw.Length > _maxLineLength;
        line = tooLong ? default : raw;
        return true;
    }

    private void Fill()
    {
        if (_start > 0)
        {
            int n = _end - _start;
            Array.Copy(_buffer, _start, _buffer, 0, n);
            _scanFrom -= _start;
            _end = n;
            _start = 0;
        }
        int read = _reader.Read(_buffer, _end, _buffer.Length - _end);
        if (read <= 0) _eof = true;
        else _end += read;
    }

    private void SkipToNextLineBreak()
    {
        _start = _end = _scanFrom = 0;
        while (true)
        {
            int read = _reader.Read(_buffer, 0, _buffer.Length);
            if (read <= 0) { _eof = true; return; }
            int nl = _buffer.AsSpan(0, read).IndexOf('\n');
            if (nl >= 0)
            {
                _start = _scanFrom = nl + 1;
                _end = read;
                return;
            }
        }
    }
}
