using System.Globalization;
using Microsoft.AspNetCore.Http;

namespace Spatial.Viewer.Internal;

/// <summary>
/// The map's question: which variable, and which seasons count. A season counts when its year is within
/// [<see cref="FromSeason"/>, <see cref="ToSeason"/>], it has at least <see cref="MinObservedDays"/> observed
/// days, and its residual with every component is at most <see cref="MaxResidual"/>. With any of these set,
/// only stations with at least one counting season are shown, and medians over seasons are recomputed over
/// the counting seasons; other variables (trends, regression, terrain) are shown as their stage computed them.
/// </summary>
internal sealed record StationQuery(string? Variable, int? FromSeason, int? ToSeason, int? MinObservedDays, double? MaxResidual)
{
    /// <summary>Query parameter names accepted by the station endpoints.</summary>
    public static readonly string[] Names = ["variable", "from", "to", "min_days", "max_residual"];

    /// <summary>True when any season filter is set.</summary>
    public bool Filters => FromSeason is not null || ToSeason is not null || MinObservedDays is not null || MaxResidual is not null;

    /// <summary>Parses the query string; returns null and a short message for unknown or malformed parameters.</summary>
    public static StationQuery? Parse(IQueryCollection query, ResultsData data, out string error)
    {
        if (!QueryRules.OnlyKnown(query, Names, out error))
        {
            return null;
        }

        string? variable = null;
        if (query.TryGetValue("variable", out var v) && v.ToString().Length > 0)
        {
            variable = v.ToString();
            if (!data.Values.ContainsKey(variable))
            {
                error = $"unknown variable '{QueryRules.Shorten(variable)}'; GET /api/meta lists the variables";
                return null;
            }
        }

        if (!Int(query, "from", -9999, 9999, out var from, out error) || !Int(query, "to", -9999, 9999, out var to, out error)
            || !Int(query, "min_days", 0, ResultsData.SeasonDays, out var minDays, out error))
        {
            return null;
        }

        if (from is not null && to is not null && from > to)
        {
            error = "'from' is after 'to'";
            return null;
        }

        double? maxResidual = null;
        if (query.TryGetValue("max_residual", out var r) && r.ToString().Length > 0)
        {
            if (!double.TryParse(r.ToString(), NumberStyles.Float, CultureInfo.InvariantCulture, out var x) || !(x >= 0 && x <= 100))
            {
                error = "'max_residual' must be a number from 0 to 100";
                return null;
            }

            maxResidual = x;
        }

        error = string.Empty;
        return new StationQuery(variable, from, to, minDays, maxResidual);
    }

    /// <summary>True when <paramref name="season"/> counts under the filters.</summary>
    public bool Counts(SeasonRow season, int fullResidualColumn)
    {
        if (FromSeason is { } f && season.Season < f)
        {
            return false;
        }

        if (ToSeason is { } t && season.Season > t)
        {
            return false;
        }

        if (MinObservedDays is { } m && season.ObservedDays < m)
        {
            return false;
        }

        if (MaxResidual is { } r && fullResidualColumn >= 0 && !(season.Values[fullResidualColumn] <= r))
        {
            return false;
        }

        return true;
    }

    /// <summary>
    /// The stations shown and their values (NaN = unknown), in station-list order.
    /// </summary>
    public List<(int Station, double Value)> Evaluate(ResultsData data)
    {
        var info = Variable is null ? null : data.Variables.First(x => x.Key == Variable);
        var values = Variable is null ? null : data.Values[Variable];
        var seasonColumn = info?.SeasonColumn is { } sc ? Array.IndexOf(data.SeasonColumns, sc) : -1;
        var result = new List<(int, double)>(data.Stations.Count);
        for (var i = 0; i < data.Stations.Count; i++)
        {
            if (!Filters)
            {
                result.Add((i, values is null ? double.NaN : values[i]));
                continue;
            }

            var counting = data.Seasons[i].Where(s => Counts(s, data.FullResidualColumn)).ToList();
            if (counting.Count == 0)
            {
                continue;
            }

            var value = values is null ? double.NaN
                : seasonColumn >= 0 ? ResultsData.Median(counting.Select(s => s.Values[seasonColumn]))
                : values[i];
            result.Add((i, value));
        }

        return result;
    }

    private static bool Int(IQueryCollection query, string name, int min, int max, out int? value, out string error)
    {
        value = null;
        error = string.Empty;
        if (!query.TryGetValue(name, out var text) || text.ToString().Length == 0)
        {
            return true;
        }

        if (!int.TryParse(text.ToString(), NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var v) || v < min || v > max)
        {
            error = $"'{name}' must be a whole number from {min} to {max}";
            return false;
        }

        value = v;
        return true;
    }
}

/// <summary>Checks shared by every endpoint's query string.</summary>
internal static class QueryRules
{
    /// <summary>True when every parameter is one of <paramref name="allowed"/> and none is repeated.</summary>
    public static bool OnlyKnown(IQueryCollection query, IReadOnlyCollection<string> allowed, out string error)
    {
        foreach (var (key, value) in query)
        {
            if (!allowed.Contains(key, StringComparer.Ordinal))
            {
                error = allowed.Count == 0 ? "this address takes no parameters" : $"unknown parameter '{Shorten(key)}' (expected {string.Join(", ", allowed)})";
                return false;
            }

            if (value.Count > 1)
            {
                error = $"parameter '{key}' is given more than once";
                return false;
            }
        }

        error = string.Empty;
        return true;
    }

    /// <summary>At most 40 characters of user text, for echoing in a message, with control characters dropped.</summary>
    public static string Shorten(string text)
    {
        var clean = new string([.. text.Where(c => !char.IsControl(c))]);
        return clean.Length <= 40 ? clean : clean[..40] + "…";
    }
}
