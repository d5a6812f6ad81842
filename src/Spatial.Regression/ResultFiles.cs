using System.Globalization;
using System.Text;
using System.Text.Json;
using Spatial.Core.IO;

namespace Spatial.Regression;

/// <summary>
/// Writes the <c>regression/</c> results of DEVELOPERS.md: <c>regression.json</c>, <c>fitted.csv</c> and (when a
/// model has a local regression) <c>local.csv</c>. Every file is written atomically; numbers in invariant
/// round-trip form; NaN and infinities become JSON null / empty CSV fields; output is byte-identical for the
/// same reports.
/// </summary>
public static class ResultFiles
{
    /// <summary>File name of the model summary.</summary>
    public const string RegressionJson = "regression.json";

    /// <summary>File name of the per-row fitted values.</summary>
    public const string FittedCsv = "fitted.csv";

    /// <summary>File name of the per-row local coefficients.</summary>
    public const string LocalCsv = "local.csv";

    /// <summary>Writes the files into <paramref name="folder"/> (created when missing). A <c>local.csv</c> left by an earlier run is removed when no model has a local regression.</summary>
    public static void Write(string folder, IReadOnlyList<ModelReport> models)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        ArgumentNullException.ThrowIfNull(models);
        Directory.CreateDirectory(folder);
        AtomicFile.WriteAllBytes(Path.Combine(folder, RegressionJson), Json(models));
        AtomicFile.WriteText(Path.Combine(folder, FittedCsv), w => WriteFitted(w, models));
        var localPath = Path.Combine(folder, LocalCsv);
        if (models.Any(m => m.Local is not null))
        {
            AtomicFile.WriteText(localPath, w => WriteLocal(w, models));
        }
        else if (File.Exists(localPath))
        {
            File.Delete(localPath);
        }
    }

    /// <summary>The <c>regression.json</c> document as UTF-8 bytes (indented, ending in a newline).</summary>
    public static byte[] Json(IReadOnlyList<ModelReport> models)
    {
        ArgumentNullException.ThrowIfNull(models);
        using var ms = new MemoryStream();
        using (var j = new Utf8JsonWriter(ms, new JsonWriterOptions { Indented = true }))
        {
            j.WriteStartObject();
            j.WriteNumber("format_version", 1);
            j.WriteStartArray("models");
            foreach (var m in models)
            {
                WriteModel(j, m);
            }

            j.WriteEndArray();
            j.WriteEndObject();
        }

        ms.WriteByte((byte)'\n');
        return ms.ToArray();
    }

    private static void Num(Utf8JsonWriter j, string name, double v)
    {
        if (double.IsFinite(v))
        {
            j.WriteNumber(name, v);
        }
        else
        {
            j.WriteNull(name);
        }
    }

    private static void WriteModel(Utf8JsonWriter j, ModelReport m)
    {
        var f = m.Fit;
        j.WriteStartObject();
        j.WriteString("response", m.Spec.Response);
        j.WriteStartArray("predictors");
        foreach (var p in m.Spec.Predictors)
        {
            j.WriteStringValue(p);
        }

        j.WriteEndArray();
        j.WriteBoolean("intercept", m.Spec.Intercept);
        if (m.Spec.Weights is null)
        {
            j.WriteNull("weights");
        }
        else
        {
            j.WriteString("weights", m.Spec.Weights);
        }

        j.WriteString("table", m.Source);
        j.WriteNumber("rows_read", m.RowsRead);
        j.WriteNumber("rows_dropped", m.RowsDropped);
        j.WriteNumber("n", f.N);
        j.WriteNumber("df_residual", f.DfResidual);
        j.WriteStartArray("coefficients");
        foreach (var c in f.Coefficients)
        {
            j.WriteStartObject();
            j.WriteString("name", c.Name);
            Num(j, "estimate", c.Estimate);
            Num(j, "se", c.StandardError);
            Num(j, "t", c.T);
            Num(j, "p", c.P);
            Num(j, "ci_low", c.CiLow);
            Num(j, "ci_high", c.CiHigh);
            Num(j, "se_hc3", c.StandardErrorHc3);
            Num(j, "standardised", c.Standardised);
            Num(j, "vif", c.Vif);
            j.WriteEndObject();
        }

        j.WriteEndArray();
        Num(j, "sigma", f.Sigma);
        Num(j, "r2", f.RSquared);
        Num(j, "adj_r2", f.AdjustedRSquared);
        Num(j, "f", f.F);
        Num(j, "f_p", f.FP);
        Num(j, "log_likelihood", f.LogLikelihood);
        Num(j, "aic", f.Aic);
        Num(j, "bic", f.Bic);
        Num(j, "condition_number", f.ConditionNumber);
        j.WriteStartObject("breusch_pagan");
        j.WriteString("form", "Koenker studentised n*R^2");
        Num(j, "statistic", f.BreuschPagan.Statistic);
        j.WriteNumber("df", f.BreuschPagan.Df);
        Num(j, "p", f.BreuschPagan.P);
        j.WriteEndObject();
        j.WriteStartArray("influential");
        foreach (var r in m.Influential)
        {
            j.WriteStartObject();
            j.WriteString("station", r.Station);
            j.WriteNumber("line", r.Line);
            Num(j, "leverage", r.Leverage);
            Num(j, "cooks_distance", r.CooksDistance);
            j.WriteEndObject();
        }

        j.WriteEndArray();
        if (m.Moran is { } mo)
        {
            j.WriteStartObject("moran");
            j.WriteString("weights", mo.Weights);
            Num(j, "i", mo.I);
            Num(j, "expected", mo.Expected);
            Num(j, "variance_normal", mo.VarianceNormal);
            Num(j, "z_normal", mo.ZNormal);
            Num(j, "p_normal", mo.PNormal);
            Num(j, "variance_randomisation", mo.VarianceRandomisation);
            Num(j, "z_randomisation", mo.ZRandomisation);
            Num(j, "p_randomisation", mo.PRandomisation);
            Num(j, "p_permutation", mo.PPermutation);
            j.WriteNumber("permutations", mo.Permutations);
            j.WriteEndObject();
        }
        else
        {
            j.WriteNull("moran");
        }

        if (m.BlockCv is { } b)
        {
            j.WriteStartObject("block_cv");
            Num(j, "block_km", b.BlockKm);
            j.WriteNumber("blocks", b.Blocks);
            j.WriteNumber("blocks_not_predicted", b.BlocksNotPredicted);
            Num(j, "rmse_in_sample", b.RmseInSample);
            Num(j, "r2_in_sample", b.R2InSample);
            Num(j, "rmse_out_of_block", b.RmseOutOfBlock);
            Num(j, "r2_out_of_block", b.R2OutOfBlock);
            j.WriteEndObject();
        }
        else
        {
            j.WriteNull("block_cv");
        }

        if (m.Local is { } l)
        {
            j.WriteStartObject("local");
            j.WriteString("kernel", l.Kernel == GwrKernel.Gaussian ? "gaussian" : "bisquare");
            j.WriteBoolean("adaptive", l.Adaptive);
            Num(j, "bandwidth", l.Bandwidth);
            j.WriteString("bandwidth_unit", l.Adaptive ? "neighbours" : "km");
            Num(j, "aicc", l.Aicc);
            Num(j, "trace_s", l.TraceS);
            Num(j, "sigma", l.Sigma);
            j.WriteNumber("bandwidths_tried", l.Search.Count);
            j.WriteEndObject();
        }
        else
        {
            j.WriteNull("local");
        }

        j.WriteStartArray("notes");
        foreach (var n in m.Notes)
        {
            j.WriteStringValue(n);
        }

        j.WriteEndArray();
        j.WriteEndObject();
    }

    private static string R(double v) => double.IsFinite(v) ? v.ToString("R", CultureInfo.InvariantCulture) : string.Empty;

    /// <summary>Quotes a CSV field when it holds a comma, quote or line break.</summary>
    private static string Field(string s) =>
        s.AsSpan().IndexOfAny(",\"\n\r") >= 0 ? "\"" + s.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"" : s;

    private static void WriteFitted(TextWriter w, IReadOnlyList<ModelReport> models)
    {
        w.WriteLine("station,response,observed,fitted,residual,leverage,cooks_distance,out_of_block_fitted");
        var sb = new StringBuilder();
        foreach (var m in models)
        {
            var f = m.Fit;
            for (var i = 0; i < f.N; i++)
            {
                sb.Clear();
                sb.Append(Field(m.RowIds[i])).Append(',').Append(Field(m.Spec.Response)).Append(',')
                  .Append(R(m.Observed[i])).Append(',').Append(R(f.Fitted[i])).Append(',').Append(R(f.Residuals[i])).Append(',')
                  .Append(R(f.Leverage[i])).Append(',').Append(R(f.CooksDistance[i])).Append(',')
                  .Append(m.BlockCv is { } b ? R(b.OutOfBlockPrediction[i]) : string.Empty);
                w.WriteLine(sb.ToString());
            }
        }
    }

    private static void WriteLocal(TextWriter w, IReadOnlyList<ModelReport> models)
    {
        var terms = new List<string>();
        foreach (var m in models.Where(m => m.Local is not null))
        {
            foreach (var t in m.Local!.Terms)
            {
                if (!terms.Contains(t))
                {
                    terms.Add(t);
                }
            }
        }

        w.WriteLine("station,response,local_r2," + string.Join(",", terms.Select(t => $"local_{Field(t)},local_se_{Field(t)}")));
        var sb = new StringBuilder();
        foreach (var m in models.Where(m => m.Local is not null))
        {
            var l = m.Local!;
            var index = terms.Select(t => l.Terms.ToList().IndexOf(t)).ToArray();
            for (var i = 0; i < m.Fit.N; i++)
            {
                sb.Clear();
                sb.Append(Field(m.RowIds[i])).Append(',').Append(Field(m.Spec.Response)).Append(',').Append(R(l.LocalR2[i]));
                foreach (var k in index)
                {
                    sb.Append(',').Append(k >= 0 ? R(l.Coefficients[i][k]) : string.Empty)
                      .Append(',').Append(k >= 0 ? R(l.StandardErrors[i][k]) : string.Empty);
                }

                w.WriteLine(sb.ToString());
            }
        }
    }
}
