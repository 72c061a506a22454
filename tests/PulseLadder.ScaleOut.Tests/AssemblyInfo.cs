global using Xunit;

// The tests start processes against one PostgreSQL server and restart it: run them one at a time.
[assembly: CollectionBehavior(DisableTestParallelization = true)]
