using System.Reflection;
using Spatial.Testing;
using Xunit;

namespace Spatial.Regression.Tests;

/// <summary>Locks the public surface of Spatial.Regression (data/public-api.txt); a change must update the file on purpose.</summary>
public sealed class PublicApiTests
{
    internal static string Describe()
    {
        var lines = new List<string>();
        foreach (var t in typeof(RegressionRun).Assembly.GetExportedTypes().OrderBy(t => t.FullName, StringComparer.Ordinal))
        {
            lines.Add($"type {t.FullName}");
            var members = t.GetMembers(BindingFlags.Public | BindingFlags.Instance | BindingFlags.Static | BindingFlags.DeclaredOnly)
                .Where(m => m is not MethodInfo { IsSpecialName: true })
                .Where(m => m.Name is not ("Equals" or "GetHashCode" or "ToString" or "Deconstruct" or "<Clone>$" or "PrintMembers" or "EqualityContract"))
                .Select(m => m switch
                {
                    MethodInfo mi => $"  {(mi.IsStatic ? "static " : string.Empty)}{mi.Name}({string.Join(", ", mi.GetParameters().Select(p => p.ParameterType.Name))})",
                    PropertyInfo pi => $"  property {pi.Name}: {pi.PropertyType.Name}",
                    FieldInfo fi => $"  field {fi.Name}",
                    ConstructorInfo ci => $"  ctor({string.Join(", ", ci.GetParameters().Select(p => p.ParameterType.Name))})",
                    _ => $"  {m.MemberType} {m.Name}",
                })
                .Order(StringComparer.Ordinal);
            lines.AddRange(members);
        }

        return string.Join("\n", lines) + "\n";
    }

    [Fact]
    public void The_public_surface_matches_the_recorded_snapshot()
    {
        var expected = File.ReadAllText(TestData.Path("public-api.txt")).ReplaceLineEndings("\n");
        var actual = Describe();
        if (expected != actual)
        {
            File.WriteAllText(Path.Combine(Path.GetTempPath(), "spatial-regression-public-api.txt"), actual);
        }

        Assert.Equal(expected, actual);
    }
}
