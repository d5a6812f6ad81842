using System.Reflection;
using Spatial.Testing;
using Xunit;

namespace Spatial.Records.Tests;

public sealed class PublicApiTests
{
    private static IEnumerable<string> Describe(Type t)
    {
        yield return $"{(t.IsEnum ? "enum" : t.IsValueType ? "struct" : t.IsAbstract && t.IsSealed ? "static class" : "class")} {t.FullName}";
        const BindingFlags flags = BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly;
        foreach (var m in t.GetMembers(flags).Where(m => m is not MethodInfo { IsSpecialName: true }).Select(m => "  " + m).Order(StringComparer.Ordinal))
        {
            yield return m;
        }
    }

    [Fact]
    public void The_public_surface_of_the_records_stage_is_the_documented_one()
    {
        // Snapshot of the public API (STYLE.md habit 3): a change here is a change of the stage's contract.
        var actual = typeof(RecordsImport).Assembly.GetExportedTypes()
            .OrderBy(t => t.FullName, StringComparer.Ordinal)
            .SelectMany(Describe)
            .ToList();
        var expected = File.ReadAllLines(TestData.Path("public-api.txt"));

        if (!expected.SequenceEqual(actual))
        {
            File.WriteAllLines(Path.Combine(Path.GetTempPath(), "spatial-records-public-api.txt"), actual);
        }

        Assert.Equal(expected, actual);
    }
}
