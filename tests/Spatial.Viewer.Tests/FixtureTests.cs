using Spatial.Testing;
using Xunit;

namespace Spatial.Viewer.Tests;

public sealed class FixtureTests
{
    /// <summary>Size of the committed invented results folder.</summary>
    public const int Stations = 40, Seasons = 12, Seed = 8;

    [Fact]
    public void The_committed_invented_results_folder_is_what_the_seeded_generator_writes()
    {
        var scratch = TestData.NewScratchFolder("viewer-fixture");
        SyntheticResults.Write(scratch, Stations, Seasons, Seed);
        var committed = TestData.Path("results");
        var expected = Directory.EnumerateFiles(scratch, "*", SearchOption.AllDirectories).Select(f => Path.GetRelativePath(scratch, f)).Order(StringComparer.Ordinal).ToArray();
        var actual = Directory.EnumerateFiles(committed, "*", SearchOption.AllDirectories).Select(f => Path.GetRelativePath(committed, f)).Where(f => f != "SOURCES.md").Order(StringComparer.Ordinal).ToArray();
        Assert.Equal(expected, actual);
        foreach (var file in expected.Where(f => !f.EndsWith(".png", StringComparison.Ordinal)))
        {
            Assert.True(File.ReadAllText(Path.Combine(scratch, file)) == File.ReadAllText(Path.Combine(committed, file)), $"{file} differs from the generator's output in {scratch}");
        }

        Directory.Delete(scratch, recursive: true);
    }
}
