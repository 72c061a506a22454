namespace PulseLadder.Demo;

/// <summary>Generator of the invented demo campaign.</summary>
public static class DemoCampaign
{
}
