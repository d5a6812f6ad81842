#!/bin/sh
# Recreates the DEM fixtures in this folder (run once by hand; the tests never run it).
# Needs python3 (only to write the invented source grid) and GDAL 3.6 (gdal_translate).
set -e
python3 - <<'PY'
import math, random
rng = random.Random(20261201)
w, h, cell = 60, 50, 100.0
x0, y0 = 500000.0, 6705000.0   # UTM 33N, west edge and north edge
rows = []
for r in range(h):
    row = []
    for c in range(w):
        x = x0 + (c + 0.5) * cell; y = y0 - (r + 0.5) * cell
        z = 520 + 310 * math.sin((x - x0) / 900.0) * math.cos((y0 - y) / 1300.0) + 0.004 * (x - x0) + rng.uniform(-4, 4)
        row.append(z)
    rows.append(row)
for (c, r) in [(7, 9), (30, 31), (31, 31), (59, 49)]:
    rows[r][c] = -9999
with open("src_area.asc", "w") as f:
    f.write(f"ncols {w}\nnrows {h}\nxllcorner {x0}\nyllcorner {y0 - h * cell}\ncellsize {cell}\nNODATA_value -9999\n")
    for row in rows:
        f.write(" ".join(f"{v:.3f}" for v in row) + "\n")
with open("src_center.asc", "w") as f:
    f.write(f"ncols {w}\nnrows {h}\nxllcenter {x0 + cell / 2}\nyllcenter {y0 - h * cell + cell / 2}\ncellsize {cell}\nnodata_value -9999\n")
    for row in rows:
        f.write(" ".join(f"{v:.3f}" for v in row) + "\n")
PY
gdal_translate -q -of GTiff -a_srs EPSG:32633 -ot Float32 src_area.asc dem_f32_strip.tif
gdal_translate -q -of GTiff -a_srs EPSG:32633 -ot Float32 -co TILED=YES -co BLOCKXSIZE=16 -co BLOCKYSIZE=16 -co COMPRESS=DEFLATE src_area.asc dem_f32_tiled.tif
gdal_translate -q -of GTiff -a_srs EPSG:32633 -ot Int16 -co COMPRESS=LZW -co PREDICTOR=2 src_area.asc dem_i16_strip.tif
gdal_translate -q -of GTiff -a_srs EPSG:32633 -ot UInt16 -a_nodata 0 -co TILED=YES -co BLOCKXSIZE=32 -co BLOCKYSIZE=32 src_area.asc dem_u16_tiled.tif
gdal_translate -q -of GTiff -a_srs EPSG:32633 -ot Float32 -mo AREA_OR_POINT=Point src_area.asc dem_f32_point.tif
gdalwarp -q -overwrite -t_srs EPSG:4326 -r bilinear -ot Float32 -dstnodata -9999 -tr 0.0015 0.0009 dem_f32_strip.tif dem_f32_geographic.tif
cp src_area.asc dem_area.asc
cp src_center.asc dem_center.asc
gdalsrsinfo -o wkt1 EPSG:32633 > dem_area.prj
rm -f src_area.asc src_center.asc *.aux.xml
