using PulseLadder.Demo;

namespace PulseLadder.Core.Tests.Demo;

/// <summary>The default campaign, generated once for all generator tests (generation takes about a second).</summary>
public sealed class DemoCampaignFixture
{
    public DemoCampaignData Data { get; } = DemoCampaign.Generate(new DemoOptions());

    public IReadOnlyList<DemoFile> Files { get; }

    public DemoCampaignFixture() => Files = DemoCampaign.Render(Data);

    public DemoFile File(string name) => Files.Single(f => f.Name == name);
}

[CollectionDefinition(Name)]
public sealed class DemoCampaignCollection : ICollectionFixture<DemoCampaignFixture>
{
    public const string Name = "demo campaign";
}
