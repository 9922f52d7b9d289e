using StandFit.Edges.Processing;

namespace StandFit.Tests.Worker;

/// <summary>The worker's heap guard: a full collection between batches once the heap passes its limit.</summary>
public sealed class HeapGuardTests
{
    [Fact]
    public void The_guard_collects_between_batches_once_the_heap_holds_more_than_its_limit_and_not_before()
    {
        var roomy = new HeapGuard(long.MaxValue);
        var tight = new HeapGuard(limitBytes: 0); // any heap at all is over it
        var fullCollections = GC.CollectionCount(GC.MaxGeneration);

        Assert.False(roomy.AfterBatch());
        Assert.True(tight.AfterBatch());

        Assert.Equal(0, roomy.Collections);
        Assert.Equal(1, tight.Collections);
        Assert.True(GC.CollectionCount(GC.MaxGeneration) > fullCollections);
    }
}
