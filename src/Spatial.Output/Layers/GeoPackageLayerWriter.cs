using Microsoft.Data.Sqlite;
using NetTopologySuite.Geometries;
using NetTopologySuite.IO;

namespace Spatial.Output.Layers;

/// <summary>
/// Writes layers into one OGC GeoPackage 1.3 file (OGC 12-128r17): application_id 'GPKG', user_version 10300,
/// gpkg_spatial_ref_sys with the required −1 and 0 rows and EPSG:4326, gpkg_contents, gpkg_geometry_columns,
/// feature tables with INTEGER/REAL/TEXT fields and GeoPackage geometry blobs, and an R-tree spatial index per
/// layer (the gpkg_rtree_index extension, Annex F.3: virtual table and triggers), registered in gpkg_extensions.
/// The file is built under a temporary name in the destination folder and renamed over it when complete.
/// </summary>
internal static class GeoPackageLayerWriter
{
    /// <summary>WKT of EPSG:4326 as GDAL and the GeoPackage specification's examples write it (OGC WKT 1).</summary>
    private const string Wgs84Wkt =
        "GEOGCS[\"WGS 84\",DATUM[\"WGS_1984\",SPHEROID[\"WGS 84\",6378137,298.257223563,AUTHORITY[\"EPSG\",\"7030\"]],AUTHORITY[\"EPSG\",\"6326\"]],"
        + "PRIMEM[\"Greenwich\",0,AUTHORITY[\"EPSG\",\"8901\"]],UNIT[\"degree\",0.0174532925199433,AUTHORITY[\"EPSG\",\"9122\"]],"
        + "AXIS[\"Latitude\",NORTH],AXIS[\"Longitude\",EAST],AUTHORITY[\"EPSG\",\"4326\"]]";

    public static void Write(IReadOnlyList<Layer> layers, string path, string lastChangeUtc)
    {
        var full = Path.GetFullPath(path);
        var folder = Path.GetDirectoryName(full) ?? ".";
        Directory.CreateDirectory(folder);
        var temp = Path.Combine(folder, $".{Path.GetFileName(full)}.{Environment.ProcessId}.{Guid.NewGuid():N}.tmp");
        try
        {
            var cs = new SqliteConnectionStringBuilder { DataSource = temp, Mode = SqliteOpenMode.ReadWriteCreate, Pooling = false }.ToString();
            using (var db = new SqliteConnection(cs))
            {
                db.Open();
                Exec(db, "PRAGMA journal_mode = OFF; PRAGMA synchronous = OFF; PRAGMA page_size = 4096;");
                Exec(db, "PRAGMA application_id = 1196444487; PRAGMA user_version = 10300;");
                using (var tx = db.BeginTransaction())
                {
                    CreateCoreTables(db, tx);
                    foreach (var layer in layers)
                    {
                        WriteLayer(db, tx, layer, lastChangeUtc);
                    }

                    tx.Commit();
                }
            }

            using (var check = File.Open(temp, FileMode.Open, FileAccess.ReadWrite))
            {
                check.Flush(flushToDisk: true);
            }

            File.Move(temp, full, overwrite: true);
        }
        catch
        {
            try
            {
                File.Delete(temp);
            }
            catch (IOException)
            {
                // Best effort: the temporary file is hidden and uniquely named.
            }

            throw;
        }
    }

    private static void CreateCoreTables(SqliteConnection db, SqliteTransaction tx)
    {
        // Table definitions: GeoPackage 1.3, clauses 1.1.2.1.1 (gpkg_spatial_ref_sys), 1.1.3.1.1 (gpkg_contents),
        // 2.1.5.1.1 (gpkg_geometry_columns), 2.3.2.1.1 (gpkg_extensions).
        Exec(db, tx, """
            CREATE TABLE gpkg_spatial_ref_sys (
              srs_name TEXT NOT NULL,
              srs_id INTEGER NOT NULL PRIMARY KEY,
              organization TEXT NOT NULL,
              organization_coordsys_id INTEGER NOT NULL,
              definition TEXT NOT NULL,
              description TEXT);
            CREATE TABLE gpkg_contents (
              table_name TEXT NOT NULL PRIMARY KEY,
              data_type TEXT NOT NULL,
              identifier TEXT UNIQUE,
              description TEXT DEFAULT '',
              last_change DATETIME NOT NULL DEFAULT (strftime('%Y-%m-%dT%H:%M:%fZ','now')),
              min_x DOUBLE, min_y DOUBLE, max_x DOUBLE, max_y DOUBLE,
              srs_id INTEGER,
              CONSTRAINT fk_gc_r_srs_id FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys(srs_id));
            CREATE TABLE gpkg_geometry_columns (
              table_name TEXT NOT NULL,
              column_name TEXT NOT NULL,
              geometry_type_name TEXT NOT NULL,
              srs_id INTEGER NOT NULL,
              z TINYINT NOT NULL,
              m TINYINT NOT NULL,
              CONSTRAINT pk_geom_cols PRIMARY KEY (table_name, column_name),
              CONSTRAINT uk_gc_table_name UNIQUE (table_name),
              CONSTRAINT fk_gc_tn FOREIGN KEY (table_name) REFERENCES gpkg_contents(table_name),
              CONSTRAINT fk_gc_srs FOREIGN KEY (srs_id) REFERENCES gpkg_spatial_ref_sys (srs_id));
            CREATE TABLE gpkg_extensions (
              table_name TEXT,
              column_name TEXT,
              extension_name TEXT NOT NULL,
              definition TEXT NOT NULL,
              scope TEXT NOT NULL,
              CONSTRAINT ge_tce UNIQUE (table_name, column_name, extension_name));
            """);
        using var cmd = db.CreateCommand();
        cmd.Transaction = tx;
        cmd.CommandText = "INSERT INTO gpkg_spatial_ref_sys VALUES ($name, $id, $org, $orgId, $def, $desc)";
        void Add(string name, long id, string org, long orgId, string def, string desc)
        {
            cmd.Parameters.Clear();
            cmd.Parameters.AddWithValue("$name", name);
            cmd.Parameters.AddWithValue("$id", id);
            cmd.Parameters.AddWithValue("$org", org);
            cmd.Parameters.AddWithValue("$orgId", orgId);
            cmd.Parameters.AddWithValue("$def", def);
            cmd.Parameters.AddWithValue("$desc", desc);
            cmd.ExecuteNonQuery();
        }

        // Required rows: GeoPackage 1.3, requirements 11 (EPSG:4326), 12 (−1 undefined Cartesian), 13 (0 undefined geographic).
        Add("Undefined cartesian SRS", -1, "NONE", -1, "undefined", "undefined cartesian coordinate reference system");
        Add("Undefined geographic SRS", 0, "NONE", 0, "undefined", "undefined geographic coordinate reference system");
        Add("WGS 84 geodetic", 4326, "EPSG", 4326, Wgs84Wkt, "longitude/latitude coordinates in decimal degrees on the WGS 84 spheroid");
    }

    private static void WriteLayer(SqliteConnection db, SqliteTransaction tx, Layer layer, string lastChangeUtc)
    {
        var t = layer.Name;
        var columns = string.Join(string.Empty, layer.Fields.Select(f => $", {Quote(f.Name)} {SqlType(f.Type)}"));
        Exec(db, tx, $"CREATE TABLE {Quote(t)} (fid INTEGER PRIMARY KEY AUTOINCREMENT NOT NULL, geom {layer.GeometryType}{columns})");
        var extent = layer.Extent;
        using (var c = db.CreateCommand())
        {
            c.Transaction = tx;
            c.CommandText = "INSERT INTO gpkg_contents (table_name, data_type, identifier, description, last_change, min_x, min_y, max_x, max_y, srs_id) VALUES ($t, 'features', $t, $d, $lc, $x0, $y0, $x1, $y1, 4326)";
            c.Parameters.AddWithValue("$t", t);
            c.Parameters.AddWithValue("$d", layer.Description);
            c.Parameters.AddWithValue("$lc", lastChangeUtc);
            c.Parameters.AddWithValue("$x0", extent.IsNull ? DBNull.Value : extent.MinX);
            c.Parameters.AddWithValue("$y0", extent.IsNull ? DBNull.Value : extent.MinY);
            c.Parameters.AddWithValue("$x1", extent.IsNull ? DBNull.Value : extent.MaxX);
            c.Parameters.AddWithValue("$y1", extent.IsNull ? DBNull.Value : extent.MaxY);
            c.ExecuteNonQuery();
            c.Parameters.Clear();
            c.CommandText = "INSERT INTO gpkg_geometry_columns VALUES ($t, 'geom', $g, 4326, 0, 0)";
            c.Parameters.AddWithValue("$t", t);
            c.Parameters.AddWithValue("$g", layer.GeometryType);
            c.ExecuteNonQuery();
        }

        var writer = new GeoPackageGeoWriter { HandleOrdinates = Ordinates.XY };
        using (var insert = db.CreateCommand())
        {
            insert.Transaction = tx;
            var names = string.Join(string.Empty, layer.Fields.Select(f => ", " + Quote(f.Name)));
            var values = string.Join(string.Empty, layer.Fields.Select((_, i) => $", $p{i}"));
            insert.CommandText = $"INSERT INTO {Quote(t)} (geom{names}) VALUES ($geom{values})";
            foreach (var f in layer.Features)
            {
                insert.Parameters.Clear();
                var g = f.Geometry.Copy();
                g.SRID = 4326;
                insert.Parameters.AddWithValue("$geom", writer.Write(g));
                for (var i = 0; i < layer.Fields.Count; i++)
                {
                    insert.Parameters.AddWithValue($"$p{i}", f.Values[i] switch
                    {
                        null => DBNull.Value,
                        double d when !double.IsFinite(d) => DBNull.Value,
                        var v => v,
                    });
                }

                insert.ExecuteNonQuery();
            }
        }

        // R-tree spatial index: GeoPackage 1.3 Annex F.3 (extension gpkg_rtree_index).
        var rt = Quote($"rtree_{t}_geom");
        var qt = Quote(t);
        Exec(db, tx, $"CREATE VIRTUAL TABLE {rt} USING rtree(id, minx, maxx, miny, maxy)");
        using (var idx = db.CreateCommand())
        {
            idx.Transaction = tx;
            idx.CommandText = $"INSERT INTO {rt} VALUES ($id, $x0, $x1, $y0, $y1)";
            long fid = 0;
            foreach (var f in layer.Features)
            {
                fid++;
                var e = f.Geometry.EnvelopeInternal;
                if (e.IsNull)
                {
                    continue;
                }

                idx.Parameters.Clear();
                idx.Parameters.AddWithValue("$id", fid);
                idx.Parameters.AddWithValue("$x0", e.MinX);
                idx.Parameters.AddWithValue("$x1", e.MaxX);
                idx.Parameters.AddWithValue("$y0", e.MinY);
                idx.Parameters.AddWithValue("$y1", e.MaxY);
                idx.ExecuteNonQuery();
            }
        }

        foreach (var trigger in RtreeTriggers(t))
        {
            Exec(db, tx, trigger);
        }

        using (var ext = db.CreateCommand())
        {
            ext.Transaction = tx;
            ext.CommandText = "INSERT INTO gpkg_extensions VALUES ($t, 'geom', 'gpkg_rtree_index', 'http://www.geopackage.org/spec120/#extension_rtree', 'write-only')";
            ext.Parameters.AddWithValue("$t", t);
            ext.ExecuteNonQuery();
        }
    }

    /// <summary>The triggers that keep the R-tree in step with the feature table (GeoPackage 1.3, Annex F.3).</summary>
    private static IEnumerable<string> RtreeTriggers(string t)
    {
        var rt = Quote($"rtree_{t}_geom");
        var qt = Quote(t);
        string Name(string suffix) => Quote($"rtree_{t}_geom_{suffix}");
        yield return $"CREATE TRIGGER {Name("insert")} AFTER INSERT ON {qt} WHEN (new.geom NOT NULL AND NOT ST_IsEmpty(NEW.geom)) BEGIN INSERT OR REPLACE INTO {rt} VALUES (NEW.fid, ST_MinX(NEW.geom), ST_MaxX(NEW.geom), ST_MinY(NEW.geom), ST_MaxY(NEW.geom)); END";
        yield return $"CREATE TRIGGER {Name("update1")} AFTER UPDATE OF geom ON {qt} WHEN OLD.fid = NEW.fid AND (NEW.geom NOTNULL AND NOT ST_IsEmpty(NEW.geom)) BEGIN INSERT OR REPLACE INTO {rt} VALUES (NEW.fid, ST_MinX(NEW.geom), ST_MaxX(NEW.geom), ST_MinY(NEW.geom), ST_MaxY(NEW.geom)); END";
        yield return $"CREATE TRIGGER {Name("update2")} AFTER UPDATE OF geom ON {qt} WHEN OLD.fid = NEW.fid AND (NEW.geom ISNULL OR ST_IsEmpty(NEW.geom)) BEGIN DELETE FROM {rt} WHERE id = OLD.fid; END";
        yield return $"CREATE TRIGGER {Name("update3")} AFTER UPDATE ON {qt} WHEN OLD.fid != NEW.fid AND (NEW.geom NOTNULL AND NOT ST_IsEmpty(NEW.geom)) BEGIN DELETE FROM {rt} WHERE id = OLD.fid; INSERT OR REPLACE INTO {rt} VALUES (NEW.fid, ST_MinX(NEW.geom), ST_MaxX(NEW.geom), ST_MinY(NEW.geom), ST_MaxY(NEW.geom)); END";
        yield return $"CREATE TRIGGER {Name("update4")} AFTER UPDATE ON {qt} WHEN OLD.fid != NEW.fid AND (NEW.geom ISNULL OR ST_IsEmpty(NEW.geom)) BEGIN DELETE FROM {rt} WHERE id IN (OLD.fid, NEW.fid); END";
        yield return $"CREATE TRIGGER {Name("delete")} AFTER DELETE ON {qt} WHEN old.geom NOT NULL BEGIN DELETE FROM {rt} WHERE id = OLD.fid; END";
    }

    private static string SqlType(FieldType t) => t switch
    {
        FieldType.Integer => "INTEGER",
        FieldType.Real => "REAL",
        _ => "TEXT",
    };

    private static string Quote(string name) => "\"" + name.Replace("\"", "\"\"", StringComparison.Ordinal) + "\"";

    private static void Exec(SqliteConnection db, string sql)
    {
        using var c = db.CreateCommand();
        c.CommandText = sql;
        c.ExecuteNonQuery();
    }

    private static void Exec(SqliteConnection db, SqliteTransaction tx, string sql)
    {
        using var c = db.CreateCommand();
        c.Transaction = tx;
        c.CommandText = sql;
        c.ExecuteNonQuery();
    }
}
