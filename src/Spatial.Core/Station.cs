namespace Spatial.Core;

/// <summary>
/// One station of the network as listed by its operator.
/// </summary>
/// <param name="Id">Station identifier.</param>
/// <param name="Name">Human-readable name (may be empty).</param>
/// <param name="Longitude">Longitude in degrees east, WGS 84 (EPSG:4326), −180…180.</param>
/// <param name="Latitude">Latitude in degrees north, WGS 84, −90…90.</param>
/// <param name="ElevationListedM">Elevation given in the list, metres above sea level; null when not listed.</param>
public sealed record Station(StationId Id, string Name, double Longitude, double Latitude, double? ElevationListedM);
