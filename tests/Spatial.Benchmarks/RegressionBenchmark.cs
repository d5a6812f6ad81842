using Spatial.Regression;

namespace Spatial.Benchmarks;

/// <summary>
/// Least squares with full diagnostics (100,000 × 10, double-double QR) against a plain normal-equations solve
/// of the same data; GWR with AICc bandwidth search on 5,000 stations against one pass of all great-circle
/// distances between them.
/// </summary>
public sealed class RegressionBenchmark : IBenchmark
{
    public string Name => "regression";

    public string Description => "[ols|gwr] OLS+diagnostics 100k×10 vs normal equations; GWR search on 5,000 stations vs one all-pairs distance pass";

    public void Run(BenchReport report, string[] args)
    {
        ArgumentNullException.ThrowIfNull(report);
        ArgumentNullException.ThrowIfNull(args);
        var part = args.Length > 0 ? args[0] : "all"; // ols, gwr or all
        var rng = new Random(1);
        if (part is "ols" or "all")
        {
            RunOls(report, rng);
        }

        if (part is "gwr" or "all")
        {
            RunGwr(report, rng);
        }
    }

    private static void RunOls(BenchReport report, Random rng)
    {
        const int n = 100_000;
        const int k = 10;
        var cols = new double[k][];
        for (var j = 0; j < k; j++)
        {
            cols[j] = new double[n];
            for (var i = 0; i < n; i++)
            {
                cols[j][i] = (rng.NextDouble() * 100) + j;
            }
        }

        var y = new double[n];
        for (var i = 0; i < n; i++)
        {
            y[i] = 3 + cols.Select((c, j) => c[i] * (j + 1) * 0.1).Sum() + rng.NextDouble();
        }

        var names = Enumerable.Range(1, k).Select(j => $"x{j}").ToArray();
        var warm = LeastSquares.Fit(names, cols, y, true, null, "bench");
        report.Figure("  column-scaled condition number of the design", warm.ConditionNumber, "");
        var full = BenchReport.BestSeconds(3, () => LeastSquares.Fit(names, cols, y, true, null, "bench"));
        var normal = BenchReport.BestSeconds(3, () => NormalEquations(cols, y));
        report.Figure("OLS + full diagnostics, 100,000 × 10 (s)", full, "s");
        report.Figure("baseline: normal equations + Cholesky, same data (s)", normal, "s");
        report.Figure("ratio OLS+diagnostics / normal equations", full / normal, "x");
    }

    private static void RunGwr(BenchReport report, Random rng)
    {

        const int m = 5000;
        var lon = new double[m];
        var lat = new double[m];
        var elev = new double[m];
        var coast = new double[m];
        var yy = new double[m];
        for (var i = 0; i < m; i++)
        {
            lon[i] = 5 + (3 * rng.NextDouble());
            lat[i] = 60 + (2 * rng.NextDouble());
            elev[i] = 1500 * rng.NextDouble();
            coast[i] = 100 * rng.NextDouble();
            yy[i] = 20 + ((0.005 + (0.005 * (lon[i] - 5))) * elev[i]) - (0.05 * coast[i]) + (rng.NextDouble() - 0.5);
        }

        var distances = BenchReport.BestSeconds(1, () => AllDistances(lon, lat));
        GwrResult? result = null;
        var gwrFixed = BenchReport.BestSeconds(1, () => result = Gwr.Fit(["elev", "coast"], [elev, coast], yy, true, lon, lat, new GwrSpec(GwrKernel.Gaussian, false)));
        report.Figure("GWR gaussian fixed, AICc search, 5,000 stations (s)", gwrFixed, "s");
        report.Figure("  bandwidths tried", result!.Search.Count, "");
        report.Figure("  chosen bandwidth (km)", result.Bandwidth, "km");
        var gwrAdaptive = BenchReport.BestSeconds(1, () => result = Gwr.Fit(["elev", "coast"], [elev, coast], yy, true, lon, lat, new GwrSpec(GwrKernel.Bisquare, true)));
        report.Figure("GWR bisquare adaptive, AICc search, 5,000 stations (s)", gwrAdaptive, "s");
        report.Figure("  bandwidths tried", result!.Search.Count, "");
        report.Figure("  chosen bandwidth (neighbours)", result.Bandwidth, "");
        report.Figure("baseline: all 25e6 great-circle distances once (s)", distances, "s");
        report.Figure("ratio GWR fixed search / distance pass", gwrFixed / distances, "x");
        report.Figure("ratio GWR adaptive search / distance pass", gwrAdaptive / distances, "x");
    }

    private static double[] NormalEquations(double[][] cols, double[] y)
    {
        var p = cols.Length + 1;
        var n = y.Length;
        var a = new double[p, p];
        var b = new double[p];
        var row = new double[p];
        for (var i = 0; i < n; i++)
        {
            row[0] = 1;
            for (var j = 1; j < p; j++)
            {
                row[j] = cols[j - 1][i];
            }

            for (var r = 0; r < p; r++)
            {
                b[r] += row[r] * y[i];
                for (var s = r; s < p; s++)
                {
                    a[r, s] += row[r] * row[s];
                }
            }
        }

        for (var r = 0; r < p; r++)
        {
            for (var s = 0; s < r; s++)
            {
                a[r, s] = a[s, r];
            }
        }

        return MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.DenseOfArray(a).Cholesky().Solve(MathNet.Numerics.LinearAlgebra.Vector<double>.Build.DenseOfArray(b)).ToArray();
    }

    private static double AllDistances(double[] lon, double[] lat)
    {
        double s = 0;
        for (var i = 0; i < lon.Length; i++)
        {
            for (var j = 0; j < lon.Length; j++)
            {
                s += GreatCircle.DistanceKm(lon[i], lat[i], lon[j], lat[j]);
            }
        }

        return s;
    }
}
