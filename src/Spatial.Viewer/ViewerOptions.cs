using Spatial.Core;

namespace Spatial.Viewer;

/// <summary>
/// What the map page serves and where.
/// </summary>
/// <param name="ResultsFolder">The results folder written by the other verbs; only read, never written.</param>
/// <param name="Port">TCP port on 127.0.0.1; 0 picks a free port.</param>
/// <param name="ObservedCurve">
/// Gives a station-season's observed daily curve (365 values in mm, NaN = missing day), or null when that
/// season is not on record. The command line passes the season-matrix reader here; when this is null the
/// station panel shows the mean and the reconstruction only, and says so.
/// </param>
public sealed record ViewerOptions(string ResultsFolder, int Port = 0, Func<StationId, int, float[]?>? ObservedCurve = null);
