using NetTopologySuite.Algorithm.Locate;
using NetTopologySuite.Geometries;

namespace Spatial.Scenario.Internal;

/// <summary>
/// The shape of Marrowfell in UTM zone 25N metres: a star-shaped main island (an ellipse about 140 km × 90 km with
/// its long axis turned 12° east of north, fractal coastal roughness, bays and two headlands) and a few offshore
/// islets, each a simple polygon. Fixed: the island does not depend on the scenario seed.
/// </summary>
internal sealed class Island
{
    /// <summary>Centre of the island, UTM 25N easting (m): the zone's central meridian, 33° W.</summary>
    public const double CentreX = 500_000;

    /// <summary>Centre of the island, UTM 25N northing (m), near 47° N.</summary>
    public const double CentreY = 5_205_000;

    /// <summary>Long axis direction, degrees clockwise from grid north.</summary>
    public const double AxisDeg = 12;

    private const double SemiAxisAlongKm = 70;
    private const double SemiAxisAcrossKm = 45;
    private const int MainVertices = 1440;
    private const ulong TerrainSeed = 0x4D4152524F57UL; // fixed: "MARROW"

    private static readonly GeometryFactory Factory = new(new PrecisionModel(), 0);

    // Bays and headlands: centre angle (degrees, counter-clockwise from grid east), relative depth (+ = bay cut into the
    // island, − = headland), angular half-width (degrees). Invented.
    private static readonly (double AngleDeg, double Depth, double WidthDeg)[] Indentations =
    [
        (172, 0.30, 1.6),   // a narrow fjord-like inlet on the windward west coast
        (201, 0.22, 3.0),   // a broad south-western bay
        (148, 0.18, 2.2),   // a north-western bay
        (-8, 0.26, 4.5),    // a wide bay on the lee east coast
        (28, 0.15, 2.0),    // a north-eastern cove
        (262, 0.12, 3.5),   // a southern bay
        (224, -0.12, 5.0),  // the south-western headland (coastal massif)
        (95, -0.06, 6.0),   // the northern cape
    ];

    // Islets: centre angle (degrees), gap from the main coast (km), radius (km), peak height (m). Invented.
    private static readonly (double AngleDeg, double GapKm, double RadiusKm, double PeakM)[] IsletSpecs =
    [
        (180, 9, 2.6, 240),
        (160, 14, 1.4, 110),
        (250, 7, 1.9, 160),
        (10, 11, 3.2, 310),
        (118, 8, 1.2, 80),
    ];

    private Island(Polygon main, IReadOnlyList<Polygon> islets, IReadOnlyList<double> isletPeaksM)
    {
        Main = main;
        Islets = islets;
        IsletPeaksM = isletPeaksM;
        Land = Factory.CreateMultiPolygon([main, .. islets]);
    }

    /// <summary>The main island's polygon (exterior counter-clockwise), UTM metres.</summary>
    public Polygon Main { get; }

    /// <summary>The islets (exterior counter-clockwise), UTM metres.</summary>
    public IReadOnlyList<Polygon> Islets { get; }

    /// <summary>Peak height of each islet, metres.</summary>
    public IReadOnlyList<double> IsletPeaksM { get; }

    /// <summary>All land: the main island and the islets.</summary>
    public MultiPolygon Land { get; }

    /// <summary>Builds the fixed island.</summary>
    public static Island Build()
    {
        var rng = new Rng(Rng.Derive(TerrainSeed, 1));

        // Coastal roughness: harmonics k = 3…180 with amplitude 0.09·k^−1.1 (a rough fractal coast) and random phases.
        const int harmonics = 180;
        var amp = new double[harmonics + 1];
        var phase = new double[harmonics + 1];
        for (var k = 3; k <= harmonics; k++)
        {
            amp[k] = 0.09 * Math.Pow(k, -1.1);
            phase[k] = rng.Uniform(0, 2 * Math.PI);
        }

        double Radius(double theta)
        {
            var t = theta - ((90 - AxisDeg) * Math.PI / 180);
            var a = SemiAxisAlongKm;
            var b = SemiAxisAcrossKm;
            var re = a * b / Math.Sqrt(Math.Pow(b * Math.Cos(t), 2) + Math.Pow(a * Math.Sin(t), 2));
            var rough = 0.0;
            for (var k = 3; k <= harmonics; k++)
            {
                rough += amp[k] * Math.Cos((k * theta) + phase[k]);
            }

            var cut = 1.0;
            foreach (var (angleDeg, depth, widthDeg) in Indentations)
            {
                var d = AngleDiff(theta, angleDeg * Math.PI / 180) / (widthDeg * Math.PI / 180);
                cut -= depth * Math.Exp(-d * d);
            }

            return re * Math.Exp(rough) * cut;
        }

        var ring = new Coordinate[MainVertices + 1];
        for (var i = 0; i < MainVertices; i++)
        {
            var theta = 2 * Math.PI * i / MainVertices;
            var r = Radius(theta) * 1000;
            ring[i] = new Coordinate(CentreX + (r * Math.Cos(theta)), CentreY + (r * Math.Sin(theta)));
        }

        ring[MainVertices] = ring[0].Copy();
        var main = Factory.CreatePolygon(ring);

        var islets = new List<Polygon>();
        var peaks = new List<double>();
        foreach (var (angleDeg, gapKm, radiusKm, peakM) in IsletSpecs)
        {
            var theta = angleDeg * Math.PI / 180;
            var dist = Radius(theta) + gapKm + radiusKm;
            var cx = CentreX + (dist * 1000 * Math.Cos(theta));
            var cy = CentreY + (dist * 1000 * Math.Sin(theta));
            const int n = 120;
            var ph1 = rng.Uniform(0, 2 * Math.PI);
            var ph2 = rng.Uniform(0, 2 * Math.PI);
            var ph3 = rng.Uniform(0, 2 * Math.PI);
            var pts = new Coordinate[n + 1];
            for (var i = 0; i < n; i++)
            {
                var t = 2 * Math.PI * i / n;
                var r = radiusKm * 1000 * (1 + (0.18 * Math.Cos((2 * t) + ph1)) + (0.08 * Math.Cos((5 * t) + ph2)) + (0.04 * Math.Cos((11 * t) + ph3)));
                pts[i] = new Coordinate(cx + (r * Math.Cos(t)), cy + (r * Math.Sin(t)));
            }

            pts[n] = pts[0].Copy();
            islets.Add(Factory.CreatePolygon(pts));
            peaks.Add(peakM);
        }

        return new Island(main, islets, peaks);
    }

    /// <summary>Along-axis (u, towards NNE) and across-axis (v, towards ESE) coordinates in km relative to the centre.</summary>
    public static (double U, double V) AxisCoordinates(double x, double y)
    {
        var a = AxisDeg * Math.PI / 180;
        var dx = (x - CentreX) / 1000;
        var dy = (y - CentreY) / 1000;
        return ((dx * Math.Sin(a)) + (dy * Math.Cos(a)), (dx * Math.Cos(a)) - (dy * Math.Sin(a)));
    }

    /// <summary>Across-axis position of the main ridge crest (km) at along-axis position <paramref name="uKm"/>.</summary>
    public static double RidgeAxisV(double uKm) => 5 + (3 * Math.Sin(uKm / 18));

    /// <summary>
    /// Windward index at a map point: tanh of the across-axis distance west of the ridge crest over 12 km; +1 deep on
    /// the windward (west) side, −1 deep in the lee (east), 0 on the crest.
    /// </summary>
    public static double WindwardIndex(double x, double y)
    {
        var (u, v) = AxisCoordinates(x, y);
        return Math.Tanh(-(v - RidgeAxisV(u)) / 12);
    }

    /// <summary>A point-in-land locator (main island and islets).</summary>
    public IPointOnGeometryLocator LandLocator() => new IndexedPointInAreaLocator(Land);

    /// <summary>A locator for the main island only.</summary>
    public IPointOnGeometryLocator MainLocator() => new IndexedPointInAreaLocator(Main);

    private static double AngleDiff(double a, double b)
    {
        var d = a - b;
        while (d > Math.PI)
        {
            d -= 2 * Math.PI;
        }

        while (d < -Math.PI)
        {
            d += 2 * Math.PI;
        }

        return d;
    }
}
