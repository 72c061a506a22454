using System.Collections.Concurrent;

namespace PulseLadder.Jobs;

/// <summary>
/// Coalesces field passes requested in this process. Several requests for one field often arrive together (the last
/// two star jobs of a field both see it finished; a reviewer accepts stars one after another), and each pass reads
/// every analysis of the field. Each request gets a ticket, numbered per database and field and issued after the
/// commit that caused it. A pass notes the highest ticket issued before it starts reading; once it has completed,
/// every request with a ticket up to that number is covered (its commit was visible to the pass's reads) and its job
/// ends at once. Passes of one field run one at a time in a process; a request issued while a pass runs is not
/// covered by it (the pass may have read before its commit) and runs after it. Requests from other processes
/// (scale-out workers) carry another process id and always run: nothing is skipped on another process's memory.
/// </summary>
internal static class FieldPassRequests
{
    /// <summary>This process's id in the requests it issues.</summary>
    public static readonly string ProcessId = Guid.NewGuid().ToString("N");

    private static readonly ConcurrentDictionary<(string Db, long Field), long> Issued = new();
    private static readonly ConcurrentDictionary<(string Db, long Field), long> Covered = new();
    private static readonly ConcurrentDictionary<(string Db, long Field), object> Locks = new();

    /// <summary>Ticket for a new request; call after the commit that makes the pass necessary.</summary>
    public static long Issue(string db, long field) => Issued.AddOrUpdate((db, field), 1, (_, v) => v + 1);

    /// <summary>Highest ticket issued so far (read by a pass before its first read of the field).</summary>
    public static long LastIssued(string db, long field) => Issued.TryGetValue((db, field), out long v) ? v : 0;

    /// <summary>True when a completed pass of this process started after the request was issued.</summary>
    public static bool IsCovered(string db, long field, string requester, long ticket)
        => requester == ProcessId && Covered.TryGetValue((db, field), out long upTo) && ticket <= upTo;

    /// <summary>Records a completed pass that started after ticket <paramref name="upTo"/> was issued.</summary>
    public static void MarkCovered(string db, long field, long upTo) => Covered.AddOrUpdate((db, field), upTo, (_, v) => Math.Max(v, upTo));

    /// <summary>Lock held by a pass of the field in this process.</summary>
    public static object LockFor(string db, long field) => Locks.GetOrAdd((db, field), _ => new object());
}
