using System.Globalization;
using System.Text;
using Spatial.Cli;
using Spatial.Testing;
using Xunit;

namespace Spatial.Cli.Tests;

/// <summary><c>spatial apply BASIS RECORDS</c> on daily records (plumbing data, invented).</summary>
public sealed class ApplyRecordsVerbTests : IDisposable
{
    private readonly string dir = TestData.NewScratchFolder("apply-records");

    public void Dispose() => Directory.Delete(dir, true);

    private static (int Code, string Out, string Err) Run(params string[] args) => CliHarness.Run(args);

    /// <summary>Three stations, eight seasons of one bump of snow whose size and date vary; every day reported.</summary>
    private (string Records, string Stations) WriteRecords()
    {
        var rng = new Random(11);
        var records = new StringBuilder("station,date,depth\n");
        for (var s = 0; s < 3; s++)
        {
            for (var y = 2000; y < 2008; y++)
            {
                var amount = 400 + (300 * rng.NextDouble());
                var centre = 160 + (40 * (rng.NextDouble() - 0.5));
                var start = new DateOnly(y, 9, 1);
                for (var d = 0; d < 366; d++)
                {
                    var date = start.AddDays(d);
                    if (date.Month == 2 && date.Day == 29)
                    {
                        continue;
                    }

                    if (date >= new DateOnly(y + 1, 9, 1))
                    {
                        break;
                    }

                    var x = amount * Math.Exp(-0.5 * Math.Pow((d - centre) / 35.0, 2));
                    records.Append(CultureInfo.InvariantCulture, $"S{s},{date:yyyy-MM-dd},{Math.Round(x)}\n");
                }
            }
        }

        var recordsPath = Path.Combine(dir, "records.csv");
        var stationsPath = Path.Combine(dir, "stations.csv");
        File.WriteAllText(recordsPath, records.ToString());
        File.WriteAllText(stationsPath, "station,name,longitude,latitude,elevation_m\nS0,One,-33,47,100\nS1,Two,-33.1,47.1,500\nS2,Three,-33.2,47.2,900\n");
        return (recordsPath, stationsPath);
    }

    [Fact]
    public void Applying_daily_records_gives_the_same_anomalies_as_applying_their_imported_matrix()
    {
        var (records, stations) = WriteRecords();
        var results = Path.Combine(dir, "results");
        Assert.Equal(ExitCodes.Done, Run("import", "--records", records, "--stations", stations, "--out", results).Code);
        Assert.Equal(ExitCodes.Done, Run("fit", Path.Combine(results, "matrix.parquet"), "--out", results, "--components", "2").Code);
        var basis = Path.Combine(results, "basis.json");

        var fromRecords = Run("apply", basis, records, "--stations", stations, "--out", Path.Combine(dir, "a"));
        var fromMatrix = Run("apply", basis, Path.Combine(results, "matrix.parquet"), "--out", Path.Combine(dir, "b"));

        Assert.True(fromRecords.Code == ExitCodes.Done, fromRecords.Err);
        Assert.True(fromMatrix.Code == ExitCodes.Done, fromMatrix.Err);
        Assert.Equal(File.ReadAllText(Path.Combine(dir, "b", "anomalies.csv")), File.ReadAllText(Path.Combine(dir, "a", "anomalies.csv")));
    }

    [Fact]
    public void Daily_records_without_a_station_list_are_a_usage_error()
    {
        var (records, _) = WriteRecords();

        var (code, _, error) = Run("apply", Path.Combine(dir, "missing-basis.json"), records, "--out", Path.Combine(dir, "c"));

        Assert.True(code is ExitCodes.BadUsage or ExitCodes.BadInput, error);
        Assert.DoesNotContain("   at ", error, StringComparison.Ordinal);
    }
}
