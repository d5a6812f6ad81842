using System.Reflection;
using System.Runtime.CompilerServices;
using Xunit;

namespace Spatial.Scenario.Tests;

public sealed class PublicApiTests
{
    /// <summary>One line per public type and per public member it declares (compiler-generated record members left out), sorted.</summary>
    private static string Describe(Assembly assembly)
    {
        var lines = new List<string>();
        foreach (var type in assembly.GetExportedTypes())
        {
            lines.Add($"type {type.FullName}");
            const BindingFlags flags = BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly;
            foreach (var m in type.GetMembers(flags))
            {
                if (m.GetCustomAttribute<CompilerGeneratedAttribute>() is not null || m is MethodInfo { IsSpecialName: true }
                    || m.Name is "Equals" or "GetHashCode" or "ToString" or "Deconstruct" or "<Clone>$" or "PrintMembers" or "EqualityContract")
                {
                    continue;
                }

                lines.Add($"  {type.Name}.{m}");
            }
        }

        return string.Join("\n", lines.Order(StringComparer.Ordinal)) + "\n";
    }

    [Fact]
    public void The_public_surface_is_the_one_recorded()
    {
        // A change of the public surface must be deliberate: update Expected/PublicApi.txt with the actual text.
        var actual = Describe(typeof(MarrowfellScenario).Assembly);
        var expected = File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "Expected", "PublicApi.txt"));
        if (expected != actual)
        {
            var dump = Path.Combine(Path.GetTempPath(), "Spatial.Scenario.PublicApi.actual.txt");
            File.WriteAllText(dump, actual);
            Assert.Fail($"the public API changed; the actual surface is in {dump}");
        }
    }
}
