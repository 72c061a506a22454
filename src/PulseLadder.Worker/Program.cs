using Microsoft.Extensions.Hosting;
using PulseLadder.Jobs;

try
{
    WorkerHost.Build(args).Run();
}
catch (Exception e) when (e is InvalidOperationException or PulseLadder.Storage.SchemaMismatchException)
{
    Console.Error.WriteLine("pulseladder worker: " + e.Message);
    return 2;
}
return 0;
