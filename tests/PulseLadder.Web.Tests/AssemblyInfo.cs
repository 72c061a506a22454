global using Xunit;

// Hangfire keeps its configuration (and so JobStorage.Current) process-wide; test hosts in one process must not
// start side by side, or one host's jobs can land in another's in-memory queue. One host per process in production.
[assembly: CollectionBehavior(DisableTestParallelization = true)]
