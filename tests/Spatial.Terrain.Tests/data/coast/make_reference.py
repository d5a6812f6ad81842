# Coast fixture and GeographicLib reference distances (run once by hand; tests never run it).
# Invented geometry: an island polygon with a lake (hole), a coastline LineString and two isolated Points, near 60°N 5°E.
# Reference: for each station, the minimum of GeographicLib's inverse distance (GeodSolve -i -p 9, WGS84) over the
# points of every segment, the segment taken as straight in longitude/latitude (RFC 7946); the minimum is found by
# nested sampling (1001 points per segment, then 1001 points within ±2 steps of the best, three more times).
import json, random, subprocess
rng = random.Random(20261203)
island = [[5.00, 60.00], [5.30, 59.98], [5.52, 60.10], [5.45, 60.30], [5.20, 60.36], [4.98, 60.22], [5.00, 60.00]]
lake = [[5.20, 60.12], [5.28, 60.14], [5.26, 60.20], [5.18, 60.19], [5.20, 60.12]]
line = [[5.9, 59.7], [6.4, 59.9], [6.45, 60.4], [6.2, 60.9]]
points = [[4.5, 60.6], [5.7, 60.7]]
fc = {"type": "FeatureCollection", "features": [
    {"type": "Feature", "properties": {"name": "island"}, "geometry": {"type": "Polygon", "coordinates": [island, lake]}},
    {"type": "Feature", "properties": {"name": "mainland"}, "geometry": {"type": "LineString", "coordinates": line}},
    {"type": "Feature", "properties": {"name": "skerries"}, "geometry": {"type": "MultiPoint", "coordinates": points}}]}
json.dump(fc, open("coast.geojson", "w"), indent=1)
segs = []
for ring in (island, lake, line):
    segs += [(ring[i], ring[i + 1]) for i in range(len(ring) - 1)]
segs += [(p, p) for p in points]
def geod(lines):
    out = subprocess.run(["GeodSolve", "-i", "-p", "9"], input="".join(lines), capture_output=True, text=True, check=True).stdout.split("\n")
    return [tuple(float(v) for v in l.split()) for l in out if l.strip()]
stations = [(rng.uniform(4.6, 6.8), rng.uniform(59.7, 60.8)) for _ in range(30)]
stations += [(5.25, 60.16), (5.1, 60.1), (5.35, 60.05)]   # in the lake (sea side), inside the island twice
rows = []
for (slon, slat) in stations:
    best = None
    for (a, b) in segs:
        lo, hi = 0.0, 1.0
        for level in range(5):
            ts = [lo + (hi - lo) * k / 1000 for k in range(1001)]
            pts = [(a[1] + t * (b[1] - a[1]), a[0] + t * (b[0] - a[0])) for t in ts]
            res = geod([f"{slat!r} {slon!r} {p[0]!r} {p[1]!r}\n" for p in pts])
            k = min(range(len(res)), key=lambda i: res[i][2])
            step = (hi - lo) / 1000
            cand = (res[k][2], res[k][0], pts[k][1], pts[k][0])
            lo, hi = max(0.0, ts[k] - 2 * step), min(1.0, ts[k] + 2 * step)
            if a == b:
                break
        if best is None or cand[0] < best[0]:
            best = cand
    rows.append((slon, slat) + best)
with open("coast_reference.csv", "w") as f:
    f.write("lon,lat,distance_m,azimuth_deg,coast_lon,coast_lat\n")
    for (slon, slat, d, az, clon, clat) in rows:
        f.write(f"{slon!r},{slat!r},{d!r},{az!r},{clon!r},{clat!r}\n")
# Afterwards the on_land column (1 = inside the island and outside its lake) was added by even-odd ray casting
# over the two rings (a plain parity test on the invented geometry).
