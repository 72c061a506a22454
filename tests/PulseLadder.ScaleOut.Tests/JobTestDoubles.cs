using PulseLadder.Jobs;

namespace PulseLadder.ScaleOut.Tests;

/// <summary>A clock that steps one minute on every read: an unchanged timestamp shows that nothing was stored.</summary>
internal sealed class SteppingClock : TimeProvider
{
    private DateTimeOffset _now = new(2026, 1, 1, 0, 0, 0, TimeSpan.Zero);

    public override DateTimeOffset GetUtcNow() => _now = _now.AddMinutes(1);
}

/// <summary>A queue that drops everything (jobs under test are called directly).</summary>
internal sealed class NoQueue : IAnalysisQueue
{
    public void EnqueueStar(long starId, long revision) { }

    public void EnqueueFieldSummary(long fieldId) { }
}
