using System.Globalization;
using System.Text.RegularExpressions;

namespace Spatial.Regression.Tests;

/// <summary>
/// A NIST StRD linear-least-squares file (<c>*.dat</c>) parsed from its published layout: the certified
/// block (parameters with standard deviations, residual SD, R²), the model line, and the data lines named
/// in the header ("Data (lines A to B)").
/// </summary>
internal sealed partial record NistDataset(
    string Name,
    string[] DataColumns,
    double[][] Data,
    string[][] DataText,
    Spatial.Regression.Internal.DoubleDouble[][] DataExact,
    bool Intercept,
    int PolynomialDegree,
    string[] CertifiedNames,
    double[] CertifiedEstimates,
    double[] CertifiedSd,
    double CertifiedResidualSd,
    double CertifiedR2)
{
    public static NistDataset Parse(string path)
    {
        var lines = File.ReadAllLines(path);
        var name = Path.GetFileNameWithoutExtension(path);
        var range = DataRange().Match(string.Join("\n", lines));
        var first = int.Parse(range.Groups[1].Value, CultureInfo.InvariantCulture);
        var last = int.Parse(range.Groups[2].Value, CultureInfo.InvariantCulture);
        var header = lines[first - 2].Replace("Data:", string.Empty, StringComparison.Ordinal).Split(' ', StringSplitOptions.RemoveEmptyEntries);
        var data = new List<double[]>();
        var exact = new List<Spatial.Regression.Internal.DoubleDouble[]>();
        var text = new List<string[]>();
        for (var i = first - 1; i < last; i++)
        {
            var tokens = lines[i].Split(' ', StringSplitOptions.RemoveEmptyEntries);
            text.Add(tokens);
            data.Add(tokens.Select(t => double.Parse(t, CultureInfo.InvariantCulture)).ToArray());
            exact.Add(tokens.Select(t => Spatial.Regression.Internal.DoubleDouble.TryParse(t, out var v) ? v : throw new FormatException(t)).ToArray());
        }

        var names = new List<string>();
        var est = new List<double>();
        var sd = new List<double>();
        double resSd = double.NaN, r2 = double.NaN;
        for (var i = 0; i < lines.Length; i++)
        {
            var m = ParameterLine().Match(lines[i]);
            if (m.Success && i < first - 2)
            {
                names.Add(m.Groups[1].Value);
                est.Add(double.Parse(m.Groups[2].Value, CultureInfo.InvariantCulture));
                sd.Add(double.Parse(m.Groups[3].Value, CultureInfo.InvariantCulture));
            }

            if (lines[i].TrimStart().StartsWith("Standard Deviation", StringComparison.Ordinal) && lines[i - 1].Trim() == "Residual")
            {
                resSd = double.Parse(lines[i].Trim()["Standard Deviation".Length..].Trim(), CultureInfo.InvariantCulture);
            }

            if (lines[i].TrimStart().StartsWith("R-Squared", StringComparison.Ordinal))
            {
                r2 = double.Parse(lines[i].Trim()["R-Squared".Length..].Trim(), CultureInfo.InvariantCulture);
            }
        }

        var model = lines.First(l => l.TrimStart().StartsWith("y = ", StringComparison.Ordinal) || l.TrimStart().StartsWith("y=", StringComparison.Ordinal));
        var intercept = names.Contains("B0");
        var powers = Power().Matches(model).Select(m => int.Parse(m.Groups[1].Value, CultureInfo.InvariantCulture)).DefaultIfEmpty(1).Max();
        var multiple = header.Length > 2;
        return new NistDataset(name, header, [.. data], [.. text], [.. exact], intercept, multiple ? 0 : powers, [.. names], [.. est], [.. sd], resSd, r2);
    }

    /// <summary>Response column.</summary>
    public double[] Y => Data.Select(r => r[0]).ToArray();

    /// <summary>Predictor columns: x1…xk for a multiple regression, x, x², … for a polynomial.</summary>
    public (string[] Names, double[][] Columns) Predictors()
    {
        if (PolynomialDegree == 0)
        {
            var k = DataColumns.Length - 1;
            return (DataColumns[1..], Enumerable.Range(1, k).Select(j => Data.Select(r => r[j]).ToArray()).ToArray());
        }

        var x = Data.Select(r => r[1]).ToArray();
        var names = Enumerable.Range(1, PolynomialDegree).Select(d => d == 1 ? "x" : $"x^{d}").ToArray();
        var cols = Enumerable.Range(1, PolynomialDegree).Select(d => x.Select(v => IntPow(v, d)).ToArray()).ToArray();
        return (names, cols);
    }

    /// <summary>Response at double-double precision (decimal text read exactly to 31 digits).</summary>
    public Spatial.Regression.Internal.DoubleDouble[] YExact => DataExact.Select(r => r[0]).ToArray();

    /// <summary>Predictor columns at double-double precision; polynomial powers formed in double-double.</summary>
    public Spatial.Regression.Internal.DoubleDouble[][] PredictorsExact()
    {
        if (PolynomialDegree == 0)
        {
            return Enumerable.Range(1, DataColumns.Length - 1).Select(j => DataExact.Select(r => r[j]).ToArray()).ToArray();
        }

        return Enumerable.Range(1, PolynomialDegree).Select(d => DataExact.Select(r =>
        {
            var p = new Spatial.Regression.Internal.DoubleDouble(1.0, 0);
            for (var k = 0; k < d; k++)
            {
                p *= r[1];
            }

            return p;
        }).ToArray()).ToArray();
    }

    private static double IntPow(double v, int d)
    {
        var r = 1.0;
        for (var i = 0; i < d; i++)
        {
            r *= v;
        }

        return r;
    }

    [GeneratedRegex(@"Data\s+\(lines (\d+) to (\d+)\)")]
    private static partial Regex DataRange();

    [GeneratedRegex(@"^\s+(B\d+)\s+(\S+)\s+(\S+)\s*$")]
    private static partial Regex ParameterLine();

    [GeneratedRegex(@"\*\*(\d+)")]
    private static partial Regex Power();
}
