using PulseLadder.Web;

var app = PulseLadderWeb.Build(args);
app.Run();

/// <summary>Entry point, visible to WebApplicationFactory in tests.</summary>
public partial class Program;
