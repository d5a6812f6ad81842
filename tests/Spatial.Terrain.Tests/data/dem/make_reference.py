# Records GDAL's values at seeded random points of each DEM fixture (run once by hand; tests never run it).
# Bilinear: GDAL 3.6.2's gdallocationinfo has no -r option, so each value is GDAL's own bilinear resampling
# (gdalwarp -r bilinear) of a one-cell output grid centred on the point at the source resolution, then read with
# gdallocationinfo -valonly. Nearest: gdallocationinfo -valonly -geoloc on the fixture itself.
import os, random, subprocess, tempfile
rng = random.Random(20261202)
grids = {
    "dem_f32_strip.tif": (500000.0, 6705000.0, 100.0, 100.0, 60, 50),
    "dem_f32_tiled.tif": (500000.0, 6705000.0, 100.0, 100.0, 60, 50),
    "dem_i16_strip.tif": (500000.0, 6705000.0, 100.0, 100.0, 60, 50),
    "dem_u16_tiled.tif": (500000.0, 6705000.0, 100.0, 100.0, 60, 50),
    "dem_f32_point.tif": (500000.0, 6705000.0, 100.0, 100.0, 60, 50),
    "dem_f32_geographic.tif": (14.999999999999982, 60.48117037959419, 0.0015, 0.0009, 72, 50),
}
def run(*a):
    return subprocess.run(a, capture_output=True, text=True, check=True).stdout.strip()
scratch = os.path.join(tempfile.mkdtemp(), "one.tif")
with open("gdal_samples.csv", "w") as out:
    out.write("file,x,y,bilinear,nearest\n")
    for name, (x0, y0, dx, dy, w, h) in grids.items():
        pts = [(x0 + rng.uniform(0.6, w - 0.6) * dx, y0 - rng.uniform(0.6, h - 0.6) * dy) for _ in range(25)]
        pts.append((x0 + 7.5 * dx, y0 - 9.5 * dy))            # on a no-data cell (f32/i16)
        pts.append((x0 - 3 * dx, y0 - 10 * dy))               # outside, west
        for (x, y) in pts:
            x = round(x, 6 if dx > 1 else 9); y = round(y, 6 if dx > 1 else 9)
            run("gdalwarp", "-q", "-overwrite", "-r", "bilinear", "-ot", "Float64", "-te", repr(x - dx / 2), repr(y - dy / 2), repr(x + dx / 2), repr(y + dy / 2),
                "-tr", repr(dx), repr(dy), "-dstnodata", "-1e30", name, scratch)
            b = run("gdallocationinfo", "-valonly", scratch, "0", "0")
            b = "" if b in ("", "-1e+30") else b
            n = run("gdallocationinfo", "-valonly", "-geoloc", name, repr(x), repr(y)) if (x0 <= x <= x0 + w * dx) else ""
            out.write(f"{name},{x!r},{y!r},{b},{n}\n")
