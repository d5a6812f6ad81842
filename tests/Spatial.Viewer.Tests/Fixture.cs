using System.Globalization;
using System.Text.Json;
using Spatial.Testing;

namespace Spatial.Viewer.Tests;

/// <summary>Reads the committed invented results folder directly (not through the viewer), to check the viewer against it.</summary>
internal static class Fixture
{
    public sealed record BasisCurves(double[] Mean, double[][] Components);

    public static readonly Lazy<BasisCurves> Basis = new(() =>
    {
        using var doc = JsonDocument.Parse(File.ReadAllText(TestData.Path("results", "basis.json")));
        var mean = doc.RootElement.GetProperty("mean").EnumerateArray().Select(e => e.GetDouble()).ToArray();
        var comps = doc.RootElement.GetProperty("components").EnumerateArray().Select(c => c.EnumerateArray().Select(e => e.GetDouble()).ToArray()).ToArray();
        return new BasisCurves(mean, comps);
    });

    /// <summary>Lines of a fixture CSV (without quoting: the fixture's seasons.csv has no quoted fields).</summary>
    public static string[][] Rows(string file) =>
        [.. File.ReadAllLines(TestData.Path("results", file)).Skip(1).Select(l => l.Split(','))];

    public static string[] Header(string file) => File.ReadLines(TestData.Path("results", file)).First().Split(',');

    /// <summary>c1…cK of a station-season from seasons.csv, or null.</summary>
    public static double[]? SeasonRow(string station, int season)
    {
        var header = Header("seasons.csv");
        var c1 = Array.IndexOf(header, "c1");
        foreach (var r in Rows("seasons.csv"))
        {
            if (r[0] == station && int.Parse(r[1], CultureInfo.InvariantCulture) == season)
            {
                return [.. Enumerable.Range(0, SyntheticResults.K).Select(k => double.Parse(r[c1 + k], CultureInfo.InvariantCulture))];
            }
        }

        return null;
    }

    public static int StationCount => File.ReadAllLines(TestData.Path("results", "station_list.csv")).Length - 1;
}
