using PulseLadder.Cli;
using Spectre.Console.Cli;

try
{
    return CliApp.Create().Run(args);
}
catch (Exception e) when (e is CommandAppException or InvalidOperationException or FileNotFoundException or HttpRequestException or PulseLadder.Storage.SchemaMismatchException)
{
    Console.Error.WriteLine("pulseladder: " + e.Message);
    return 2;
}
