using Spatial.Core;
using Spatial.Terrain.Crs;
using Spatial.Testing;
using Xunit;

namespace Spatial.Terrain.Tests;

public sealed class ProjectionTests
{
    private const double SubMillimetreM = 0.5e-3;
    private const double RoundTripDeg = 1e-9;

    // EPSG:3034 as OGC WKT 1 (parameters from data/projection/crs_definitions.json: lcc lat_0=52 lon_0=10 lat_1=35 lat_2=65 x_0=4000000 y_0=2800000 GRS80).
    private const string LccEuropeWkt =
        "PROJCS[\"ETRS89 / LCC Europe\",GEOGCS[\"ETRS89\",DATUM[\"European_Terrestrial_Reference_System_1989\",SPHEROID[\"GRS 1980\",6378137,298.257222101]," +
        "TOWGS84[0,0,0,0,0,0,0]],PRIMEM[\"Greenwich\",0],UNIT[\"degree\",0.0174532925199433]],PROJECTION[\"Lambert_Conformal_Conic_2SP\"]," +
        "PARAMETER[\"standard_parallel_1\",35],PARAMETER[\"standard_parallel_2\",65],PARAMETER[\"latitude_of_origin\",52],PARAMETER[\"central_meridian\",10]," +
        "PARAMETER[\"false_easting\",4000000],PARAMETER[\"false_northing\",2800000],UNIT[\"metre\",1]]";

    // The source CRS of the reference values: +proj=longlat +ellps=GRS80.
    private const string Etrs89Wkt =
        "GEOGCS[\"ETRS89\",DATUM[\"European_Terrestrial_Reference_System_1989\",SPHEROID[\"GRS 1980\",6378137,298.257222101]," +
        "TOWGS84[0,0,0,0,0,0,0]],PRIMEM[\"Greenwich\",0],UNIT[\"degree\",0.0174532925199433]]";

    [Fact]
    public void Utm_zone_33N_matches_PROJ_cs2cs_to_well_under_a_millimetre()
    {
        // PROJ 9.1.1 cs2cs EPSG:4326 → EPSG:32633 (data/projection/SOURCES.md), 75 points up to 12° from the central meridian.
        var t = CoordinateTransform.Create(CrsDefinition.Wgs84, CrsDefinition.FromEpsg(32633));
        foreach (var r in ReferenceCsv.Read("projection", "utm33n_forward_cs2cs.csv"))
        {
            var (e, n) = t.Forward(r.D("lon_deg"), r.D("lat_deg"));
            Tolerance.Near(r.D("easting_m"), e, SubMillimetreM, $"easting of {r["id"]}");
            Tolerance.Near(r.D("northing_m"), n, SubMillimetreM, $"northing of {r["id"]}");
            var (lon, lat) = t.Inverse(e, n);
            Tolerance.Near(r.D("lon_deg"), lon, RoundTripDeg, $"round-trip longitude of {r["id"]}");
            Tolerance.Near(r.D("lat_deg"), lat, RoundTripDeg, $"round-trip latitude of {r["id"]}");
        }
    }

    [Fact]
    public void Lambert_conformal_conic_Europe_from_WKT_matches_PROJ_cs2cs()
    {
        // PROJ 9.1.1 cs2cs +proj=longlat +ellps=GRS80 → +proj=lcc … (data/projection/SOURCES.md).
        var lcc = CrsDefinitions.FromWkt(LccEuropeWkt, "test");
        var etrs89 = CrsDefinitions.FromWkt(Etrs89Wkt, "test");
        var t = CoordinateTransform.Create(etrs89, lcc);
        foreach (var r in ReferenceCsv.Read("projection", "lcc_europe_forward_cs2cs.csv"))
        {
            var (e, n) = t.Forward(r.D("lon_deg"), r.D("lat_deg"));
            Tolerance.Near(r.D("easting_m"), e, SubMillimetreM, $"easting of {r["id"]}");
            Tolerance.Near(r.D("northing_m"), n, SubMillimetreM, $"northing of {r["id"]}");
            var (lon, lat) = t.Inverse(e, n);
            Tolerance.Near(r.D("lon_deg"), lon, RoundTripDeg, $"round-trip longitude of {r["id"]}");
            Tolerance.Near(r.D("lat_deg"), lat, RoundTripDeg, $"round-trip latitude of {r["id"]}");
        }
    }

    [Fact]
    public void An_unknown_EPSG_code_is_refused_with_a_hint()
    {
        var e = Assert.Throws<SpatialDataException>(() => CrsDefinitions.Parse("EPSG:2154", "--crs"));
        Assert.Contains("WKT", e.Diagnostic.Hint, StringComparison.Ordinal);
    }

    [Fact]
    public void Every_UTM_zone_is_built_in()
    {
        // UTM definition (NGA.SIG.0012): zone z has central meridian 6z − 183°, false easting 500 000 m, false northing 10 000 000 m in the south.
        for (var zone = 1; zone <= 60; zone++)
        {
            var cm = (6 * zone) - 183;
            var north = CoordinateTransform.Create(CrsDefinition.Wgs84, CrsDefinition.FromEpsg(32600 + zone)).Forward(cm, 0);
            var south = CoordinateTransform.Create(CrsDefinition.Wgs84, CrsDefinition.FromEpsg(32700 + zone)).Forward(cm, -1e-12);
            Tolerance.Near(500000, north.X, 1e-6, $"zone {zone}N easting");
            Tolerance.Near(0, north.Y, 1e-6, $"zone {zone}N northing");
            Tolerance.Near(10000000, south.Y, 1e-3, $"zone {zone}S northing");
        }
    }
}
