using System.Reflection;
using Xunit;

namespace Spatial.Fitting.Tests;

/// <summary>Locks the public surface of Spatial.Fitting (STYLE.md habit 3): a change to it must update Expected/PublicApi.txt on purpose.</summary>
public sealed class PublicApiTests
{
    internal static string Describe(Assembly assembly)
    {
        var lines = new List<string>();
        foreach (var type in assembly.GetExportedTypes().OrderBy(t => t.FullName, StringComparer.Ordinal))
        {
            lines.Add($"type {type.FullName}");
            var members = type.GetMembers(BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly)
                .Where(m => m is not MethodInfo { IsSpecialName: true })
                .Select(m => $"  {m.MemberType} {m}")
                .Where(s => !s.Contains("<Clone>$", StringComparison.Ordinal))
                .OrderBy(s => s, StringComparer.Ordinal);
            lines.AddRange(members);
        }

        return string.Join('\n', lines) + "\n";
    }

    [Fact]
    public void The_public_surface_matches_the_recorded_snapshot()
    {
        var actual = Describe(typeof(SeasonalFit).Assembly);
        var expectedPath = Path.Combine(AppContext.BaseDirectory, "Expected", "PublicApi.txt");
        var expected = File.Exists(expectedPath) ? File.ReadAllText(expectedPath) : string.Empty;
        if (expected != actual)
        {
            File.WriteAllText(Path.Combine(AppContext.BaseDirectory, "PublicApi.received.txt"), actual);
        }

        Assert.Equal(expected, actual);
    }
}
