namespace Spatial.Scenario;

/// <summary>Options of <see cref="MarrowfellScenario.Generate"/>.</summary>
/// <param name="Seed">Seed of the stations' placement, the weather and the observation faults (the island itself is fixed).</param>
/// <param name="Stations">Number of stations (1…10,000; default 150).</param>
/// <param name="Seasons">Number of seasons (2…150; default 45), ending with <paramref name="LastSeason"/>.</param>
/// <param name="LastSeason">The last season, named by the calendar year in which it starts (default 2024: 2024/25).</param>
/// <param name="MaxThreads">Upper bound on threads (null = all cores). The output does not depend on it.</param>
/// <param name="Effects">Compute the region's partial effects by finite differences (six extra runs of every station's snowpack).</param>
public sealed record ScenarioOptions(int Seed = 1, int Stations = 150, int Seasons = 45, int LastSeason = 2024, int? MaxThreads = null, bool Effects = true)
{
    /// <summary>The defaults: seed 1, 150 stations, 45 seasons 1980–2024.</summary>
    public static ScenarioOptions Default { get; } = new();

    /// <summary>Largest station count accepted.</summary>
    public const int MaxStations = 10_000;

    /// <summary>Largest season count accepted.</summary>
    public const int MaxSeasons = 150;

    /// <summary>The first season.</summary>
    public int FirstSeason => LastSeason - Seasons + 1;

    /// <summary>Throws <see cref="ArgumentOutOfRangeException"/> naming the first option out of range.</summary>
    public void Validate()
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(Stations, 1, nameof(Stations));
        ArgumentOutOfRangeException.ThrowIfGreaterThan(Stations, MaxStations, nameof(Stations));
        ArgumentOutOfRangeException.ThrowIfLessThan(Seasons, 2, nameof(Seasons));
        ArgumentOutOfRangeException.ThrowIfGreaterThan(Seasons, MaxSeasons, nameof(Seasons));
        ArgumentOutOfRangeException.ThrowIfLessThan(LastSeason, 1900, nameof(LastSeason));
        ArgumentOutOfRangeException.ThrowIfGreaterThan(LastSeason, 2200, nameof(LastSeason));
        if (MaxThreads is { } t)
        {
            ArgumentOutOfRangeException.ThrowIfLessThan(t, 1, nameof(MaxThreads));
        }
    }
}
