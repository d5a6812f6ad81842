using NetTopologySuite.Geometries;
using Spatial.Core;

namespace Spatial.Scenario.Internal;

/// <summary>
/// The Marrowfell DEM: 250 m cells in UTM zone 25N over the island's envelope plus a 6 km margin, heights in metres
/// above sea level (float32), <see cref="NoData"/> over the sea. The terrain is a sum of invented shapes (a main ridge
/// rising to 2,300 m, a high plateau in the north, a coastal massif on the south-western headland, a rising base),
/// cut by valleys radiating from the summit and roughened with value noise, falling to the sea at every coast.
/// </summary>
internal static class DemBuilder
{
    /// <summary>Cell size, metres.</summary>
    public const double CellM = 250;

    /// <summary>No-data value written over the sea.</summary>
    public const float NoData = -9999f;

    /// <summary>Height of the highest cell, metres (the summit).</summary>
    public const double SummitM = 2300;

    /// <summary>The DEM and, for each cell, the approximate distance to the sea in km (distance transform; 0 at sea).</summary>
    public static (RasterGrid Dem, float[] CoastKm) Build(Island island)
    {
        var env = island.Land.EnvelopeInternal;
        var west = Math.Floor((env.MinX - 6000) / 1000) * 1000;
        var east = Math.Ceiling((env.MaxX + 6000) / 1000) * 1000;
        var south = Math.Floor((env.MinY - 6000) / 1000) * 1000;
        var north = Math.Ceiling((env.MaxY + 6000) / 1000) * 1000;
        var width = (int)Math.Round((east - west) / CellM);
        var height = (int)Math.Round((north - south) / CellM);
        var transform = GeoTransform.NorthUp(west, north, CellM, CellM);

        var main = island.MainLocator();
        var land = island.LandLocator();
        var isLand = new bool[width * height];
        var isMain = new bool[width * height];
        var isSea = new bool[width * height];
        for (var r = 0; r < height; r++)
        {
            for (var c = 0; c < width; c++)
            {
                var (x, y) = transform.ToMap(c + 0.5, r + 0.5);
                var p = new Coordinate(x, y);
                var i = (r * width) + c;
                isLand[i] = land.Locate(p) == Location.Interior;
                isMain[i] = isLand[i] && main.Locate(p) == Location.Interior;
                isSea[i] = !isLand[i];
            }
        }

        var seaDistCells = DistanceTransform.Compute(isSea, width, height);
        var coastKm = new float[width * height];
        for (var i = 0; i < coastKm.Length; i++)
        {
            // Centre-to-centre distance to the nearest sea cell, less half a cell: the distance to the coast, ±125 m.
            coastKm[i] = isLand[i] ? (float)Math.Max(0.05, (seaDistCells[i] * CellM / 1000) - 0.125) : 0f;
        }

        var noise = new ValueNoise(Rng.Derive(0x44454D, 7));
        var raw = new double[width * height];
        var maxMain = 0.0;
        for (var r = 0; r < height; r++)
        {
            for (var c = 0; c < width; c++)
            {
                var i = (r * width) + c;
                if (!isMain[i])
                {
                    continue;
                }

                var (x, y) = transform.ToMap(c + 0.5, r + 0.5);
                raw[i] = MainHeight(x, y, coastKm[i], noise);
                maxMain = Math.Max(maxMain, raw[i]);
            }
        }

        var values = new float[width * height];
        var centres = island.Islets.Select(p => p.Centroid.Coordinate).ToArray();
        for (var r = 0; r < height; r++)
        {
            for (var c = 0; c < width; c++)
            {
                var i = (r * width) + c;
                if (!isLand[i])
                {
                    values[i] = NoData;
                    continue;
                }

                double h;
                if (isMain[i])
                {
                    h = raw[i] * SummitM / maxMain;
                }
                else
                {
                    var (x, y) = transform.ToMap(c + 0.5, r + 0.5);
                    var nearest = 0;
                    for (var k = 1; k < centres.Length; k++)
                    {
                        if (Dist2(centres[k], x, y) < Dist2(centres[nearest], x, y))
                        {
                            nearest = k;
                        }
                    }

                    var d = coastKm[i];
                    h = island.IsletPeaksM[nearest] * (1 - Math.Exp(-d / 0.7)) * (0.85 + (0.15 * noise.Fbm(x / 1500, y / 1500, 3)));
                }

                values[i] = (float)Math.Round(Math.Max(1.0, h), 1);
            }
        }

        return (new RasterGrid(width, height, transform, CrsDefinition.FromEpsg(Utm25.Epsg), values, NoData), coastKm);
    }

    private static double Dist2(Coordinate a, double x, double y) => ((a.X - x) * (a.X - x)) + ((a.Y - y) * (a.Y - y));

    /// <summary>Un-normalised height of the main island at (x, y) with coast distance <paramref name="dKm"/>; metres before scaling to the summit.</summary>
    private static double MainHeight(double x, double y, double dKm, ValueNoise noise)
    {
        var (u, v) = Island.AxisCoordinates(x, y);

        // Main ridge along the long axis, east of centre: broad windward (west) flank, steep lee (east) flank.
        var dv = v - Island.RidgeAxisV(u);
        var halfWidth = dv < 0 ? 15.0 : 9.0;
        var ridge = 2300 * Math.Exp(-Math.Pow(u / 50, 4)) * Math.Exp(-(dv / halfWidth) * (dv / halfWidth)) * (0.80 + (0.20 * Math.Cos((u / 7) + 0.5)));

        // Summit knot.
        var summit = 500 * Math.Exp(-(((u - 4) * (u - 4)) + (dv * dv)) / (2 * 4.0 * 4.0));

        // High plateau in the north: flat within 6 km of its centre, falling off to 12 km.
        var pu = u - 40;
        var pv = v + 8;
        var p = Math.Sqrt((pu * pu) + (pv * pv)) * (1 + (0.25 * noise.Fbm((x / 6000) + 17, (y / 6000) + 5, 3)));
        var plateau = 1500 * SmoothStep(0, 1, (12 - p) / 6);

        // Coastal massif on the south-western headland.
        var mu = u + 36;
        var mv = v + 22;
        var massif = 1350 * Math.Exp(-((mu * mu) + (mv * mv)) / (2 * 6.0 * 6.0));

        var h = SmoothMax(ridge + summit, plateau, massif, 80) + (300 * (1 - Math.Exp(-dKm / 7)));

        // Valleys radiating from the summit: eight troughs that wind slightly with distance, deepening away from it.
        var su = u - 4;
        var sv = v - Island.RidgeAxisV(4);
        var rho = Math.Sqrt((su * su) + (sv * sv));
        var phi = Math.Atan2(sv, su);
        var wind = (0.18 * Math.Sin(rho / 6)) + (0.10 * noise.Fbm((x / 8000) + 40, (y / 8000) - 3, 2));
        var trough = Math.Pow(Math.Max(0, Math.Cos(8 * (phi + wind))), 3);
        h *= 1 - (0.5 * trough * SmoothStep(3, 20, rho));

        // Mountain texture: ridged noise (1 − |n|), stronger high up.
        var ridged = 1 - Math.Abs(noise.Fbm((x / 5000) - 11, (y / 5000) + 23, 4));
        h += 260 * (ridged - 0.6) * SmoothStep(100, 1500, h);

        // Roughness: multiplicative broad noise and additive fine noise.
        h *= 1 + (0.12 * noise.Fbm(x / 10_000, y / 10_000, 4));
        h += 60 * noise.Fbm(x / 3000, y / 3000, 4);

        // Fall to the sea at the coast.
        h *= 1 - Math.Exp(-dKm / 2.0);
        return Math.Max(0, h);
    }

    private static double SmoothStep(double lo, double hi, double x)
    {
        var t = Math.Clamp((x - lo) / (hi - lo), 0, 1);
        return t * t * (3 - (2 * t));
    }

    private static double SmoothMax(double a, double b, double c, double k)
    {
        var m = Math.Max(a, Math.Max(b, c));
        return m + (k * Math.Log(Math.Exp((a - m) / k) + Math.Exp((b - m) / k) + Math.Exp((c - m) / k)));
    }
}
