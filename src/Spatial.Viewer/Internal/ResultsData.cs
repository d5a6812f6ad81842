using System.Globalization;
using System.Text.Json;
using Spatial.Core;
using Spatial.Core.IO;

namespace Spatial.Viewer.Internal;

/// <summary>A station point of the map: identifier, name, WGS 84 position, listed elevation (m, NaN when not listed).</summary>
internal sealed record StationPoint(StationId Id, string Name, double Longitude, double Latitude, double ElevationListedM);

/// <summary>How a variable is coloured: sequential (low→high) or diverging around 0.</summary>
internal enum ScaleKind
{
    /// <summary>Ordered low to high (amounts, lengths, dates).</summary>
    Sequential,

    /// <summary>Signed, centred on 0 (trends, residuals, anomalies, local coefficients).</summary>
    Diverging,
}

/// <summary>
/// One variable the map can colour stations by. <paramref name="SeasonColumn"/> is the <c>seasons.csv</c>
/// column whose median over seasons gives the value, when the value is such a median (it is then recomputed
/// over the seasons that pass the filters); null otherwise.
/// </summary>
internal sealed record VariableInfo(string Key, string Label, string Unit, ScaleKind Scale, string Group, string? SeasonColumn);

/// <summary>A georeferenced image layer (equirectangular in WGS 84 degrees) with an optional value range and unit.</summary>
internal sealed record ImageLayer(string Key, string Label, string FilePath, double West, double South, double East, double North, double Min, double Max, string Unit);

/// <summary>The fitted basis as read from <c>basis.json</c>: mean [365] and components [K][365] in mm.</summary>
internal sealed record BasisData(string SeasonStart, string Units, double[] Mean, double[][] Components, string[] Labels, double[] VarianceFraction);

/// <summary>One station-season of <c>seasons.csv</c>: the season year, observed days and every numeric column (NaN = unknown).</summary>
internal sealed record SeasonRow(int Season, int ObservedDays, double[] Values);

/// <summary>
/// Everything the viewer shows, read once from a results folder at start. Only the station list (or, failing
/// it, the covariate table) is required; every other file is optional and, when absent, its variables and
/// layers are simply not offered. Files are only read, never written.
/// </summary>
internal sealed class ResultsData
{
    /// <summary>Days in a season curve.</summary>
    public const int SeasonDays = 365;

    private ResultsData()
    {
    }

    public required string Folder { get; init; }

    public required List<StationPoint> Stations { get; init; }

    public required Dictionary<string, int> StationIndex { get; init; }

    public required List<VariableInfo> Variables { get; init; }

    /// <summary>Value of each variable per station (in <see cref="Stations"/> order; NaN = unknown).</summary>
    public required Dictionary<string, double[]> Values { get; init; }

    /// <summary>Column names of <c>seasons.csv</c> other than station and season (empty when absent).</summary>
    public required string[] SeasonColumns { get; init; }

    /// <summary>Seasons of each station, ordered by season year (empty lists when <c>seasons.csv</c> is absent).</summary>
    public required List<SeasonRow>[] Seasons { get; init; }

    /// <summary>Column of <see cref="SeasonColumns"/> holding the residual with every component (residual_K), or −1.</summary>
    public required int FullResidualColumn { get; init; }

    public required BasisData? Basis { get; init; }

    /// <summary>Per-station tables shown in the panel: table name → (column → values per station).</summary>
    public required Dictionary<string, Dictionary<string, double[]>> StationTables { get; init; }

    /// <summary>Regression rows per station: response → (observed, fitted, residual) per station.</summary>
    public required Dictionary<string, (double[] Observed, double[] Fitted, double[] Residual)> Fitted { get; init; }

    public required string? CoastlinePath { get; init; }

    public required ImageLayer? Hillshade { get; init; }

    public required List<ImageLayer> Predicted { get; init; }

    /// <summary>First and last season year in <c>seasons.csv</c>, or null.</summary>
    public required (int First, int Last)? SeasonRange { get; init; }

    /// <summary>Reads the results folder. Throws <see cref="SpatialDataException"/> for a required file that is missing or for malformed data.</summary>
    public static ResultsData Load(string folder)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        var full = Path.GetFullPath(folder);
        if (!Directory.Exists(full))
        {
            throw new SpatialDataException(folder, 0, "the results folder does not exist", "give the folder that the other verbs wrote (for example the --out of 'spatial demo')");
        }

        var stations = ReadStations(full);
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < stations.Count; i++)
        {
            if (!index.TryAdd(stations[i].Id.Value, i))
            {
                throw new SpatialDataException(ResultLayout.StationList, 0, $"station '{stations[i].Id}' is listed twice", "list each station once");
            }
        }

        var variables = new List<VariableInfo>();
        var values = new Dictionary<string, double[]>(StringComparer.Ordinal);
        var tables = new Dictionary<string, Dictionary<string, double[]>>(StringComparer.Ordinal);
        var basis = ReadBasis(Path.Combine(full, ResultLayout.Basis));

        // stations.csv: medians and trends per station.
        var stationsCsv = Path.Combine(full, ResultLayout.Stations);
        if (File.Exists(stationsCsv))
        {
            var t = CsvTable.Read(stationsCsv);
            var columns = PerStation(t, index, stations.Count, c => c != "station");
            tables["summary"] = columns;
            foreach (var (name, v) in columns)
            {
                if (name.StartsWith("median_", StringComparison.Ordinal))
                {
                    var what = name["median_".Length..];
                    var scale = IsComponent(what) ? ScaleKind.Diverging : ScaleKind.Sequential;
                    Add(new VariableInfo("stations." + name, $"{Describe(what, basis)}: median of seasons", UnitOf(what), scale, "Season (median)", what), v);
                }
            }

            foreach (var (name, v) in columns)
            {
                if (name.StartsWith("sen_per_decade_", StringComparison.Ordinal))
                {
                    var what = name["sen_per_decade_".Length..];
                    Add(new VariableInfo("stations." + name, $"{Describe(what, basis)}: trend per decade (Sen slope)", UnitOf(what) + " per decade", ScaleKind.Diverging, "Trend", null), v);
                }
            }

            if (columns.TryGetValue("seasons", out var n))
            {
                Add(new VariableInfo("stations.seasons", "Seasons on record", "seasons", ScaleKind.Sequential, "Season (median)", null), n);
            }
        }

        // seasons.csv: per station-season rows.
        var seasonsCsv = Path.Combine(full, ResultLayout.Seasons);
        var seasons = new List<SeasonRow>[stations.Count];
        for (var i = 0; i < seasons.Length; i++)
        {
            seasons[i] = [];
        }

        string[] seasonColumns = [];
        var fullResidual = -1;
        (int, int)? range = null;
        if (File.Exists(seasonsCsv))
        {
            var t = CsvTable.Read(seasonsCsv);
            var sCol = t.RequireColumn("station");
            var yCol = t.RequireColumn("season");
            var dCol = t.RequireColumn("observed_days");
            var keep = Enumerable.Range(0, t.Header.Length).Where(c => c != sCol && c != yCol).ToArray();
            seasonColumns = [.. keep.Select(c => t.Header[c])];
            var maxK = -1;
            for (var j = 0; j < seasonColumns.Length; j++)
            {
                if (seasonColumns[j].StartsWith("residual_", StringComparison.Ordinal)
                    && int.TryParse(seasonColumns[j].AsSpan("residual_".Length), NumberStyles.None, CultureInfo.InvariantCulture, out var k) && k > maxK)
                {
                    maxK = k;
                    fullResidual = j;
                }
            }

            int first = int.MaxValue, last = int.MinValue;
            for (var r = 0; r < t.Rows.Count; r++)
            {
                if (!index.TryGetValue(t.Rows[r][sCol], out var si))
                {
                    continue;
                }

                var year = WholeNumber(t, r, yCol, "a season year");
                var observed = WholeNumber(t, r, dCol, "a count of observed days");
                var v = new double[keep.Length];
                for (var j = 0; j < keep.Length; j++)
                {
                    v[j] = t.Number(r, keep[j]);
                }

                seasons[si].Add(new SeasonRow(year, observed, v));
                first = Math.Min(first, year);
                last = Math.Max(last, year);
            }

            foreach (var list in seasons)
            {
                list.Sort((a, b) => a.Season.CompareTo(b.Season));
            }

            if (first <= last)
            {
                range = (first, last);
            }

            // Medians recomputable from seasons.csv that stations.csv did not carry (e.g. observed_days).
            if (fullResidual >= 0 && !values.ContainsKey("stations.median_" + seasonColumns[fullResidual]))
            {
                var what = seasonColumns[fullResidual];
                var med = new double[stations.Count];
                for (var i = 0; i < med.Length; i++)
                {
                    med[i] = Median(seasons[i].Select(s => s.Values[fullResidual]));
                }

                Add(new VariableInfo("seasons.median_" + what, $"Misfit ({what}, all components): median of seasons", "ratio", ScaleKind.Sequential, "Season (median)", what), med);
            }
        }

        // covariates.csv.
        var covCsv = Path.Combine(full, ResultLayout.Covariates);
        if (File.Exists(covCsv))
        {
            var t = CsvTable.Read(covCsv);
            var columns = PerStation(t, index, stations.Count, c => c is not ("station" or "elevation_flag"));
            tables["covariates"] = columns;
            foreach (var (name, v) in columns)
            {
                if (name is "longitude" or "latitude" or "aspect_deg" or "coast_azimuth_deg")
                {
                    continue; // positions are the map itself; directions are circular and not for a linear scale.
                }

                var scale = name is "elevation_diff_m" or "northness" or "eastness" ? ScaleKind.Diverging : ScaleKind.Sequential;
                Add(new VariableInfo("covariates." + name, CovariateLabel(name), UnitOf(name), scale, "Terrain and geography", null), v);
            }
        }

        // regression/fitted.csv and regression/local.csv.
        var fitted = new Dictionary<string, (double[], double[], double[])>(StringComparer.Ordinal);
        var fittedCsv = Path.Combine(full, ResultLayout.RegressionFolder, "fitted.csv");
        if (File.Exists(fittedCsv))
        {
            var t = CsvTable.Read(fittedCsv);
            var sCol = t.RequireColumn("station");
            var rCol = t.RequireColumn("response");
            var oCol = t.Column("observed");
            var fCol = t.Column("fitted");
            var eCol = t.RequireColumn("residual");
            for (var r = 0; r < t.Rows.Count; r++)
            {
                if (!index.TryGetValue(t.Rows[r][sCol], out var si))
                {
                    continue;
                }

                var response = t.Rows[r][rCol];
                if (!fitted.TryGetValue(response, out var arrays))
                {
                    arrays = (Nan(stations.Count), Nan(stations.Count), Nan(stations.Count));
                    fitted[response] = arrays;
                }

                arrays.Item1[si] = t.Number(r, oCol);
                arrays.Item2[si] = t.Number(r, fCol);
                arrays.Item3[si] = t.Number(r, eCol);
            }

            foreach (var (response, arrays) in fitted.OrderBy(kv => kv.Key, StringComparer.Ordinal))
            {
                Add(new VariableInfo("fitted." + response, $"Regression residual of {Describe(response, basis)}", UnitOf(response), ScaleKind.Diverging, "Regression", null), arrays.Item3);
            }
        }

        var localCsv = Path.Combine(full, ResultLayout.RegressionFolder, "local.csv");
        if (File.Exists(localCsv))
        {
            var t = CsvTable.Read(localCsv);
            var sCol = t.RequireColumn("station");
            var rCol = t.RequireColumn("response");
            var perResponse = new SortedDictionary<string, Dictionary<string, double[]>>(StringComparer.Ordinal);
            var cols = Enumerable.Range(0, t.Header.Length).Where(c => c != sCol && c != rCol && !t.Header[c].StartsWith("local_se_", StringComparison.Ordinal)).ToArray();
            for (var r = 0; r < t.Rows.Count; r++)
            {
                if (!index.TryGetValue(t.Rows[r][sCol], out var si))
                {
                    continue;
                }

                var response = t.Rows[r][rCol];
                if (!perResponse.TryGetValue(response, out var map))
                {
                    map = cols.ToDictionary(c => t.Header[c], _ => Nan(stations.Count), StringComparer.Ordinal);
                    perResponse[response] = map;
                }

                foreach (var c in cols)
                {
                    map[t.Header[c]][si] = t.Number(r, c);
                }
            }

            foreach (var (response, map) in perResponse)
            {
                foreach (var c in cols)
                {
                    var name = t.Header[c];
                    if (name == "local_r2")
                    {
                        Add(new VariableInfo($"local.{response}.{name}", $"Local R² for {Describe(response, basis)}", "fraction", ScaleKind.Sequential, "Local regression", null), map[name]);
                    }
                    else if (name.StartsWith("local_", StringComparison.Ordinal))
                    {
                        var predictor = name["local_".Length..];
                        var unit = predictor == "intercept" ? UnitOf(response) : $"{UnitOf(response)} per {UnitOf(predictor)}";
                        Add(new VariableInfo($"local.{response}.{name}", $"Local coefficient of {predictor} for {Describe(response, basis)}", unit, ScaleKind.Diverging, "Local regression", null), map[name]);
                    }
                }
            }
        }

        // layers/.
        var layers = Path.Combine(full, ResultLayout.LayersFolder);
        var coast = Path.Combine(layers, "coastline.geojson");
        var hill = ReadImageLayer(layers, "hillshade", "Hillshade", requireRange: false);
        var predicted = new List<ImageLayer>();
        if (Directory.Exists(layers))
        {
            foreach (var png in Directory.EnumerateFiles(layers, "predicted_*.png").Order(StringComparer.Ordinal))
            {
                var stem = Path.GetFileNameWithoutExtension(png);
                var response = stem["predicted_".Length..];
                if (response.Length == 0 || !response.All(ch => char.IsAsciiLetterOrDigit(ch) || ch is '_' or '-'))
                {
                    continue;
                }

                var layer = ReadImageLayer(layers, stem, $"Predicted {Describe(response, basis)}", requireRange: true);
                if (layer is not null)
                {
                    predicted.Add(layer);
                }
            }
        }

        return new ResultsData
        {
            Folder = full,
            Stations = stations,
            StationIndex = index,
            Variables = variables,
            Values = values,
            SeasonColumns = seasonColumns,
            Seasons = seasons,
            FullResidualColumn = fullResidual,
            Basis = basis,
            StationTables = tables,
            Fitted = fitted,
            CoastlinePath = File.Exists(coast) ? coast : null,
            Hillshade = hill,
            Predicted = predicted,
            SeasonRange = range,
        };

        void Add(VariableInfo info, double[] v)
        {
            if (values.TryAdd(info.Key, v))
            {
                variables.Add(info);
            }
        }
    }

    /// <summary>Median of the finite values; NaN when there are none.</summary>
    public static double Median(IEnumerable<double> source)
    {
        var v = source.Where(double.IsFinite).ToArray();
        if (v.Length == 0)
        {
            return double.NaN;
        }

        Array.Sort(v);
        var mid = v.Length / 2;
        return v.Length % 2 == 1 ? v[mid] : 0.5 * (v[mid - 1] + v[mid]);
    }

    private static double[] Nan(int n)
    {
        var a = new double[n];
        Array.Fill(a, double.NaN);
        return a;
    }

    private static int WholeNumber(CsvTable t, int row, int column, string what)
    {
        var text = t.Rows[row][column];
        if (!int.TryParse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var v))
        {
            throw new SpatialDataException(t.File, t.Lines[row], $"column '{t.Header[column]}' holds '{text}', expected {what} (a whole number)", "write whole numbers in this column", column + 1);
        }

        return v;
    }

    private static Dictionary<string, double[]> PerStation(CsvTable t, Dictionary<string, int> index, int count, Func<string, bool> keepColumn)
    {
        var sCol = t.RequireColumn("station");
        var result = new Dictionary<string, double[]>(StringComparer.Ordinal);
        var cols = Enumerable.Range(0, t.Header.Length).Where(c => c != sCol && keepColumn(t.Header[c])).ToArray();
        foreach (var c in cols)
        {
            result.TryAdd(t.Header[c], Nan(count));
        }

        for (var r = 0; r < t.Rows.Count; r++)
        {
            if (!index.TryGetValue(t.Rows[r][sCol], out var si))
            {
                continue;
            }

            foreach (var c in cols)
            {
                result[t.Header[c]][si] = t.Number(r, c);
            }
        }

        return result;
    }

    private static List<StationPoint> ReadStations(string folder)
    {
        var listPath = Path.Combine(folder, ResultLayout.StationList);
        var covPath = Path.Combine(folder, ResultLayout.Covariates);
        var path = File.Exists(listPath) ? listPath : File.Exists(covPath) ? covPath : null;
        if (path is null)
        {
            throw new SpatialDataException(Path.Combine(folder, ResultLayout.StationList), 0, "no station list in the results folder", "run 'spatial import' into this folder first (it writes station_list.csv)");
        }

        var t = CsvTable.Read(path);
        var sCol = t.RequireColumn("station");
        var nCol = t.Column("name");
        var xCol = t.RequireColumn("longitude");
        var yCol = t.RequireColumn("latitude");
        var eCol = t.Column("elevation_m") is >= 0 and var e ? e : t.Column("elevation_listed_m");
        var list = new List<StationPoint>(t.Rows.Count);
        for (var r = 0; r < t.Rows.Count; r++)
        {
            var id = t.Rows[r][sCol];
            if (!StationId.IsValid(id, out var why))
            {
                throw new SpatialDataException(t.File, t.Lines[r], $"'{id}' is not a station id: {why}", "fix the station column", sCol + 1);
            }

            var lon = t.Number(r, xCol);
            var lat = t.Number(r, yCol);
            if (!(lon >= -180 && lon <= 180 && lat >= -90 && lat <= 90))
            {
                throw new SpatialDataException(t.File, t.Lines[r], $"station '{id}' is at longitude {lon.ToString(CultureInfo.InvariantCulture)}, latitude {lat.ToString(CultureInfo.InvariantCulture)}, expected WGS 84 degrees", "write positions as WGS 84 longitude −180…180 and latitude −90…90");
            }

            list.Add(new StationPoint(new StationId(id), nCol >= 0 ? t.Rows[r][nCol] : string.Empty, lon, lat, t.Number(r, eCol)));
        }

        return list;
    }

    private static BasisData? ReadBasis(string path)
    {
        if (!File.Exists(path))
        {
            return null;
        }

        try
        {
            using var doc = JsonDocument.Parse(File.ReadAllBytes(path));
            var root = doc.RootElement;
            var mean = Vector(root.GetProperty("mean"), "mean");
            var comps = root.GetProperty("components");
            var components = new double[comps.GetArrayLength()][];
            var k = 0;
            foreach (var c in comps.EnumerateArray())
            {
                components[k] = Vector(c, $"components[{k}]");
                k++;
            }

            var labels = new string[components.Length];
            if (root.TryGetProperty("labels", out var l) && l.ValueKind == JsonValueKind.Array)
            {
                var i = 0;
                foreach (var e in l.EnumerateArray())
                {
                    if (i < labels.Length)
                    {
                        labels[i++] = e.GetString() ?? "other";
                    }
                }
            }

            for (var i = 0; i < labels.Length; i++)
            {
                labels[i] ??= "other";
            }

            var vf = new double[components.Length];
            Array.Fill(vf, double.NaN);
            if (root.TryGetProperty("variance_fraction", out var f) && f.ValueKind == JsonValueKind.Array)
            {
                var i = 0;
                foreach (var e in f.EnumerateArray())
                {
                    if (i < vf.Length && e.ValueKind == JsonValueKind.Number)
                    {
                        vf[i] = e.GetDouble();
                    }

                    i++;
                }
            }

            var start = root.TryGetProperty("season_start", out var s) && s.ValueKind == JsonValueKind.String ? s.GetString()! : "09-01";
            var units = root.TryGetProperty("units", out var u) && u.ValueKind == JsonValueKind.String ? u.GetString()! : "mm";
            return new BasisData(start, units, mean, components, labels, vf);
        }
        catch (Exception e) when (e is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
        {
            throw new SpatialDataException(ResultLayout.Basis, 0, $"the basis cannot be read: {e.Message}", "write basis.json as 'spatial fit' does (mean [365], components [K][365])");
        }

        static double[] Vector(JsonElement e, string what)
        {
            if (e.ValueKind != JsonValueKind.Array || e.GetArrayLength() != SeasonDays)
            {
                throw new FormatException($"{what} must be an array of {SeasonDays} numbers");
            }

            var v = new double[SeasonDays];
            var i = 0;
            foreach (var x in e.EnumerateArray())
            {
                v[i++] = x.ValueKind == JsonValueKind.Number ? x.GetDouble() : double.NaN;
            }

            return v;
        }
    }

    private static ImageLayer? ReadImageLayer(string folder, string stem, string label, bool requireRange)
    {
        var png = Path.Combine(folder, stem + ".png");
        var json = Path.Combine(folder, stem + ".json");
        if (!File.Exists(png) || !File.Exists(json))
        {
            return null;
        }

        var file = $"{ResultLayout.LayersFolder}/{stem}.json";
        try
        {
            using var doc = JsonDocument.Parse(File.ReadAllBytes(json));
            var root = doc.RootElement;
            var b = root.TryGetProperty("bounds", out var nested) && nested.ValueKind == JsonValueKind.Object ? nested : root;
            double west = b.GetProperty("west").GetDouble(), south = b.GetProperty("south").GetDouble();
            double east = b.GetProperty("east").GetDouble(), north = b.GetProperty("north").GetDouble();
            if (!(west < east && south < north && west >= -180 && east <= 180 && south >= -90 && north <= 90))
            {
                throw new FormatException("the bounds are not a WGS 84 box with west < east and south < north");
            }

            var min = root.TryGetProperty("min", out var mn) && mn.ValueKind == JsonValueKind.Number ? mn.GetDouble() : double.NaN;
            var max = root.TryGetProperty("max", out var mx) && mx.ValueKind == JsonValueKind.Number ? mx.GetDouble() : double.NaN;
            var unit = root.TryGetProperty("unit", out var un) && un.ValueKind == JsonValueKind.String ? un.GetString()! : string.Empty;
            if (requireRange && !(min <= max))
            {
                throw new FormatException("min and max are missing or min > max");
            }

            return new ImageLayer(stem, label, png, west, south, east, north, min, max, unit);
        }
        catch (Exception e) when (e is JsonException or KeyNotFoundException or InvalidOperationException or FormatException)
        {
            throw new SpatialDataException(file, 0, $"the layer description cannot be read: {e.Message}", "write {\"west\",\"south\",\"east\",\"north\"} in WGS 84 degrees (and min, max, unit for a predicted surface)");
        }
    }

    private static bool IsComponent(string name) =>
        name.Length >= 2 && name[0] == 'c' && name.AsSpan(1).IndexOfAnyExceptInRange('0', '9') < 0;

    /// <summary>A label for a seasons.csv column (c1…cK with the basis label, metrics in words).</summary>
    internal static string Describe(string name, BasisData? basis)
    {
        if (IsComponent(name))
        {
            var k = int.Parse(name.AsSpan(1), NumberStyles.None, CultureInfo.InvariantCulture);
            var label = basis is not null && k >= 1 && k <= basis.Labels.Length ? basis.Labels[k - 1] : null;
            return label is null ? $"Component {k}" : $"Component {k} ({label})";
        }

        if (name.StartsWith("median_", StringComparison.Ordinal) && name.Length > "median_".Length)
        {
            return Describe(name["median_".Length..], basis) + " (median)";
        }

        return name switch
        {
            "onset_day" => "Season onset",
            "meltout_day" => "Melt-out",
            "longest_cover_days" => "Longest snow cover",
            "snow_days" => "Snow days",
            "peak_depth_mm" => "Peak depth",
            "peak_day" => "Day of peak depth",
            "centroid_day" => "Centre of the season",
            "observed_days" => "Observed days",
            _ when name.StartsWith("residual_", StringComparison.Ordinal) => $"Misfit with {name["residual_".Length..]} components",
            _ => name.Replace('_', ' '),
        };
    }

    private static string CovariateLabel(string name) => name switch
    {
        "elevation_listed_m" => "Elevation (listed)",
        "elevation_dem_m" => "Elevation (terrain model)",
        "elevation_diff_m" => "Elevation: listed minus terrain model",
        "slope_deg" => "Slope",
        "northness" => "Northness",
        "eastness" => "Eastness",
        "relief_1km_m" => "Relief within 1 km",
        "relief_5km_m" => "Relief within 5 km",
        "coast_km" => "Distance to the coast",
        _ => name.Replace('_', ' '),
    };

    /// <summary>The unit of a column, from its name (the contract puts units in names).</summary>
    internal static string UnitOf(string name)
    {
        if (name.StartsWith("median_", StringComparison.Ordinal) || name.StartsWith("iqr_", StringComparison.Ordinal))
        {
            return UnitOf(name[(name.IndexOf('_', StringComparison.Ordinal) + 1)..]);
        }

        if (IsComponent(name))
        {
            return "mm (coefficient)";
        }

        if (name.StartsWith("residual_", StringComparison.Ordinal))
        {
            return "ratio";
        }

        return name switch
        {
            _ when name.EndsWith("_day", StringComparison.Ordinal) => "day of season",
            _ when name.EndsWith("_days", StringComparison.Ordinal) => "days",
            _ when name.EndsWith("_mm", StringComparison.Ordinal) => "mm",
            _ when name.EndsWith("_km", StringComparison.Ordinal) => "km",
            _ when name.EndsWith("_m", StringComparison.Ordinal) => "m",
            _ when name.EndsWith("_deg", StringComparison.Ordinal) => "degrees",
            "northness" or "eastness" => "cosine",
            _ => "value",
        };
    }
}
