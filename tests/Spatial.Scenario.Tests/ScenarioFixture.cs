using Spatial.Testing;
using Xunit;

namespace Spatial.Scenario.Tests;

/// <summary>The default region, generated and written once for the output tests.</summary>
public sealed class ScenarioFixture : IDisposable
{
    public ScenarioFixture()
    {
        Folder = TestData.NewScratchFolder("scenario");
        Scenario = MarrowfellScenario.Generate(ScenarioOptions.Default);
        Paths = ScenarioFiles.Write(Folder, Scenario);
    }

    public string Folder { get; }

    public Scenario Scenario { get; }

    public IReadOnlyList<string> Paths { get; }

    public string File(string name) => Path.Combine(Folder, name);

    public void Dispose() => Directory.Delete(Folder, recursive: true);
}

[CollectionDefinition(Name)]
public sealed class DefaultScenarioGroup : ICollectionFixture<ScenarioFixture>
{
    public const string Name = "default scenario";
}
