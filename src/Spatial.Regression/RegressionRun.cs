using System.Globalization;
using Spatial.Core;

namespace Spatial.Regression;

/// <summary>The regression stage's entry point: a table and a model in, a full <see cref="ModelReport"/> out.</summary>
public static class RegressionRun
{
    /// <summary>
    /// Fits <paramref name="spec"/> on <paramref name="table"/>: least squares with inference and diagnostics,
    /// then (when the table has coordinates) Moran's I of the residuals, and block cross-validation and local
    /// regression when <paramref name="options"/> ask for them. A row with an empty cell in any used column
    /// (response, predictors, weights, coordinates) is dropped and counted.
    /// </summary>
    /// <exception cref="SpatialDataException">A column is missing, a cell is not a number, a weight is not positive,
    /// or the design is rank deficient; the message says where.</exception>
    public static ModelReport Fit(Table table, ModelSpec spec, RegressionOptions options)
    {
        ArgumentNullException.ThrowIfNull(table);
        ArgumentNullException.ThrowIfNull(spec);
        ArgumentNullException.ThrowIfNull(options);
        var notes = new List<string>();
        if (spec.Predictors.Count == 0 && !spec.Intercept)
        {
            throw new SpatialDataException(table.Source, 0, "the model has no terms", "give at least one predictor or keep the intercept");
        }

        var coords = options.Coordinates ?? (table.HasColumn("longitude") && table.HasColumn("latitude") ? ("longitude", "latitude") : null);
        var used = new List<string> { spec.Response };
        used.AddRange(spec.Predictors);
        if (spec.Weights is not null)
        {
            used.Add(spec.Weights);
        }

        if (coords is { } cc)
        {
            used.Add(cc.Longitude);
            used.Add(cc.Latitude);
        }

        foreach (var name in used.Distinct(StringComparer.Ordinal))
        {
            if (!table.HasColumn(name))
            {
                throw new SpatialDataException(table.Source, 1, $"no column named '{name}' (columns: {string.Join(", ", table.Columns)})", "check the column names given to the model");
            }
        }

        if (spec.Predictors.Contains(spec.Response, StringComparer.Ordinal))
        {
            throw new SpatialDataException(table.Source, 1, $"'{spec.Response}' is both the response and a predictor", "remove it from the predictors");
        }

        var duplicate = spec.Predictors.GroupBy(p => p, StringComparer.Ordinal).FirstOrDefault(g => g.Count() > 1);
        if (duplicate is not null)
        {
            throw new SpatialDataException(table.Source, 1, $"predictor '{duplicate.Key}' is listed twice", "list each predictor once");
        }

        var distinct = used.Distinct(StringComparer.Ordinal).ToList();
        var values = distinct.ToDictionary(c => c, _ => new List<double>(table.RowCount), StringComparer.Ordinal);
        var exactValues = distinct.ToDictionary(c => c, _ => new List<Internal.DoubleDouble>(table.RowCount), StringComparer.Ordinal);
        var exactCell = new Internal.DoubleDouble[distinct.Count];
        var ids = new List<string>();
        var lines = new List<long>();
        var hasStation = table.HasColumn(options.StationColumn);
        var dropped = 0;
        var cell = new double[distinct.Count];
        for (var r = 0; r < table.RowCount; r++)
        {
            var complete = true;
            for (var c = 0; c < distinct.Count; c++)
            {
                var text = table.Cell(r, distinct[c]);
                if (text.Length == 0)
                {
                    complete = false;
                    continue;
                }

                if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) || !double.IsFinite(v))
                {
                    var col = table.Columns.ToList().IndexOf(distinct[c]) + 1;
                    throw new SpatialDataException(table.Source, table.LineOf(r), $"column '{distinct[c]}': expected a number, found '{text}'", "correct the value, or leave the cell empty when it is unknown", col);
                }

                if (distinct[c] == spec.Weights && !(v > 0))
                {
                    var col = table.Columns.ToList().IndexOf(distinct[c]) + 1;
                    throw new SpatialDataException(table.Source, table.LineOf(r), $"weight column '{distinct[c]}': expected a positive number, found '{text}'", "weights must be > 0; leave the cell empty to drop the row", col);
                }

                cell[c] = v;
                exactCell[c] = Internal.DoubleDouble.TryParse(text, out var dd) ? dd : v;
            }

            if (!complete)
            {
                dropped++;
                continue;
            }

            for (var c = 0; c < distinct.Count; c++)
            {
                values[distinct[c]].Add(cell[c]);
                exactValues[distinct[c]].Add(exactCell[c]);
            }

            ids.Add(hasStation && table.Cell(r, options.StationColumn).Length > 0 ? table.Cell(r, options.StationColumn) : $"row{r + 1}");
            lines.Add(table.LineOf(r));
        }

        if (dropped > 0)
        {
            notes.Add($"{dropped} of {table.RowCount} rows dropped: an empty cell in a used column");
        }

        var y = values[spec.Response].ToArray();
        var xs = spec.Predictors.Select(p => values[p].ToArray()).ToArray();
        var w = spec.Weights is null ? null : values[spec.Weights].ToArray();
        // The decimal text at double-double precision, used when the design needs the double-double path.
        var fit = LeastSquares.Fit(spec.Predictors, xs, y, spec.Intercept, w, table.Source, forceDoubleDouble: false, spec.Predictors.Select(p => exactValues[p].ToArray()).ToArray(), exactValues[spec.Response].ToArray());

        var influential = Enumerable.Range(0, fit.N)
            .Where(i => !double.IsNaN(fit.CooksDistance[i]))
            .OrderByDescending(i => fit.CooksDistance[i]).ThenBy(i => i)
            .Take(Math.Max(options.InfluentialCount, 0))
            .Select(i => new InfluentialRow(ids[i], lines[i], fit.Leverage[i], fit.CooksDistance[i]))
            .ToList();

        MoranResult? moran = null;
        BlockCvResult? block = null;
        GwrResult? local = null;
        if (coords is { } cxy)
        {
            var lon = values[cxy.Longitude].ToArray();
            var lat = values[cxy.Latitude].ToArray();
            var badRow = Enumerable.Range(0, lon.Length).FirstOrDefault(i => Math.Abs(lat[i]) > 90 || Math.Abs(lon[i]) > 360, -1);
            if (badRow >= 0)
            {
                throw new SpatialDataException(table.Source, lines[badRow], FormattableString.Invariant($"coordinates ({lon[badRow]}, {lat[badRow]}) are not longitude/latitude in degrees"), "give WGS 84 longitude and latitude in degrees");
            }

            if (fit.N < 4)
            {
                notes.Add("fewer than 4 rows: Moran's I skipped");
            }
            else
            {
                var k = Math.Min(options.MoranK, fit.N - 1);
                var weights = options.MoranNeighbours == MoranNeighbours.KNearest
                    ? SpatialWeights.KNearest(lon, lat, k, options.MoranStyle)
                    : SpatialWeights.InverseDistance(lon, lat, double.PositiveInfinity, options.MoranStyle);
                moran = MoransI.Compute(fit.Residuals, weights, options.Permutations, options.Seed);
            }

            if (options.BlockKm is { } km)
            {
                block = BlockCrossValidation.Run(spec.Predictors, xs, y, spec.Intercept, w, lon, lat, km, fit);
            }

            if (options.Local is { } gwr)
            {
                if (w is not null)
                {
                    notes.Add("local regression uses the kernel weights only; the weights column applies to the global fit");
                }

                local = Gwr.Fit(spec.Predictors, xs, y, spec.Intercept, lon, lat, gwr);
            }
        }
        else
        {
            notes.Add("no coordinate columns (longitude, latitude): Moran's I" + (options.BlockKm is not null || options.Local is not null ? ", block cross-validation and local regression" : string.Empty) + " skipped");
        }

        return new ModelReport(spec, table.Source, table.RowCount, dropped, ids, y, fit, influential, moran, block, local, notes);
    }
}
