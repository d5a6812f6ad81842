"""Writes the invented plumbing results folder in results/ (run once; the tests never run Python).
Invented data for plumbing tests only: the island 'Marrowfell', six stations, five seasons."""
import json, math, random, os
random.seed(7)
R = os.path.join(os.path.dirname(os.path.abspath(__file__)), "results")
os.makedirs(os.path.join(R, "regression"), exist_ok=True)
st = [("MF01", "Harrow Gap", -8.21, 58.62, 412.0), ("MF02", "Cold Tarn, upper", -8.05, 58.70, 655.0),
      ("MF03", "Skellan Moss", -8.33, 58.55, 120.0), ("MF04", "Brae Öster", -7.98, 58.58, 890.0),
      ("MF05", "Low Wick", -8.40, 58.68, 35.0), ("MF06", "Fellhead", -8.12, 58.52, 1020.0)]
def w(path, header, rows):
    with open(os.path.join(R, path), "w", newline="\n") as f:
        f.write(",".join(header) + "\n")
        for r in rows:
            out = []
            for v in r:
                s = "" if v is None else (repr(v) if isinstance(v, float) else str(v))
                if any(c in s for c in ',"\n'):
                    s = '"' + s.replace('"', '""') + '"'
                out.append(s)
            f.write(",".join(out) + "\n")
w("station_list.csv", ["station", "name", "longitude", "latitude", "elevation_m"], [list(s) for s in st])
seasons = []
for sid, _, lon, lat, el in st:
    for y in range(2015, 2020):
        c1 = round(0.3 * el + random.gauss(0, 40), 3)
        c2 = round(random.gauss(0, 20), 3)
        miss = (sid == "MF03" and y == 2017)
        seasons.append([sid, y, 300 if not miss else 120, c1, c2, 1.0, round(random.uniform(0.2, 0.6), 4), round(random.uniform(0.05, 0.2), 4),
                        None if miss else 60 + random.randint(0, 30), None if miss else 200 + random.randint(0, 40),
                        random.randint(40, 150), random.randint(50, 160), round(el * 1.5 + random.uniform(0, 100), 1), random.randint(120, 170), random.randint(100, 150)])
w("seasons.csv", ["station", "season", "observed_days", "c1", "c2", "residual_0", "residual_1", "residual_2", "onset_day", "meltout_day",
                  "longest_cover_days", "snow_days", "peak_depth_mm", "peak_day", "centroid_day"], seasons)
names = ["c1", "c2", "snow_days", "peak_depth_mm"]
rows = []
for sid, _, lon, lat, el in st:
    r = [sid, 5]
    for n in names:
        r += [round(random.uniform(0, 500), 3), round(random.uniform(5, 50), 3), random.randint(-10, 10), round(random.gauss(0, 1), 4), round(random.uniform(0, 1), 4), round(random.gauss(0, 5), 4)]
    r.append("checked" if sid != "MF05" else "")
    rows.append(r)
hdr = ["station", "seasons"] + [f"{p}_{n}" for n in names for p in ["median", "iqr", "mk_s", "mk_z", "mk_p", "sen_per_decade"]] + ["operator_note"]
w("stations.csv", hdr, rows)
cov = []
for sid, _, lon, lat, el in st:
    dem = el + random.uniform(-20, 20)
    asp = random.uniform(0, 360)
    cov.append([sid, lon, lat, el, round(dem, 2), round(dem - el, 2), "" if abs(dem - el) < 15 else "large_difference", round(random.uniform(1, 25), 2),
                round(asp, 1), round(math.cos(math.radians(asp)), 4), round(math.sin(math.radians(asp)), 4), round(random.uniform(20, 200), 1),
                round(random.uniform(100, 600), 1), round(random.uniform(0.5, 12), 3), round(random.uniform(0, 360), 1)])
w("covariates.csv", ["station", "longitude", "latitude", "elevation_listed_m", "elevation_dem_m", "elevation_diff_m", "elevation_flag", "slope_deg", "aspect_deg",
                     "northness", "eastness", "relief_1km_m", "relief_5km_m", "coast_km", "coast_azimuth_deg"], cov)
days = range(365)
mean = [round(max(0.0, 600 * math.sin(math.pi * (d - 60) / 240)) if 60 <= d <= 300 else 0.0, 3) for d in days]
comp1 = [m / math.sqrt(sum(x * x for x in mean)) for m in mean]
comp2 = [math.sin(2 * math.pi * (d - 60) / 240) if 60 <= d <= 300 else 0.0 for d in days]
n2 = math.sqrt(sum(x * x for x in comp2)); comp2 = [round(x / n2, 6) for x in comp2]; comp1 = [round(x, 6) for x in comp1]
basis = {"format_version": 1, "season_start": "09-01", "units": "mm", "mean": mean, "components": [comp1, comp2],
         "eigenvalues": [52000.0, 9100.0], "variance_fraction": [0.78, 0.136], "cumulative_fraction": [0.78, 0.916],
         "north_error": [7350.0, 1290.0], "labels": ["amount", "timing"],
         "training": {"c1": {"mean": 0.0, "sd": 228.0}, "c2": {"mean": 0.0, "sd": 95.4}}, "provenance": {"seasons": 30, "stations": 6}}
json.dump(basis, open(os.path.join(R, "basis.json"), "w"), indent=1)
interp = {"components": [{"component": "c1", "label": "amount", "meaning": "more snow than the mean curve through the whole season",
                          "correlations": {"peak_depth_mm": 0.93, "snow_days": 0.71}},
                         {"component": "c2", "label": "timing", "meaning": "an earlier season: snow arrives and melts earlier",
                          "correlations": {"centroid_day": -0.88}}],
          "best_seasons": [{"station": "MF02", "season": 2016, "residual": 0.06}, {"station": "MF04", "season": 2018, "residual": 0.07}],
          "worst_seasons": [{"station": "MF03", "season": 2017, "residual": 0.58}],
          "extremes": {"c1": {"lowest": {"station": "MF05", "season": 2019, "value": -85.2}, "highest": {"station": "MF06", "season": 2015, "value": 402.1}}}}
json.dump(interp, open(os.path.join(R, "interpretation.json"), "w"), indent=1)
quality = {"stations": 6, "records": 10950, "station_seasons": 30, "kept_station_seasons": 29,
           "removed_by_rule": {"negative_depth": 4, "spike": 2, "flagged_bad": 11}, "min_observed_days": 200}
json.dump(quality, open(os.path.join(R, "quality.json"), "w"), indent=1)
manifest = {"tool": "spatial", "version": "0.1.0", "runs": {
    "import": {"time_utc": "2026-11-30T10:00:00Z", "version": "0.1.0", "inputs": [{"path": "records.csv", "sha256": "9f" * 32, "bytes": 123456}], "parameters": {"unit": "mm"}},
    "fit": {"time_utc": "2026-11-30T10:05:00Z", "version": "0.1.0", "inputs": [], "parameters": {"components": "2"}}}}
json.dump(manifest, open(os.path.join(R, "manifest.json"), "w"), indent=1)
preds = ["elevation_dem_m", "coast_km"]
def coef(name, est):
    se = abs(est) * 0.2 + 0.5
    return {"name": name, "estimate": est, "se": se, "t": est / se, "p": 0.01, "ci_low": est - 2 * se, "ci_high": est + 2 * se, "se_hc3": se * 1.1, "standardised": 0.5, "vif": 1.3 if name != "intercept" else None}
models = []
fitted = []
local = []
for resp in ["median_c1", "median_snow_days"]:
    models.append({"response": resp, "predictors": preds, "n": 6, "df_residual": 3,
                   "coefficients": [coef("intercept", 12.0), coef("elevation_dem_m", 0.31), coef("coast_km", 4.2)],
                   "sigma": 21.5, "r2": 0.91, "adj_r2": 0.85, "f": 15.2, "f_p": 0.027, "aic": 55.1, "bic": 54.5, "condition_number": 820.0,
                   "breusch_pagan": {"statistic": 1.2, "df": 2, "p": 0.55},
                   "influential": [{"station": "MF06", "leverage": 0.71, "cooks_distance": 1.3}],
                   "moran": {"weights": "inverse distance, 20 km", "i": -0.12, "expected": -0.2, "variance_normal": 0.04, "z_normal": 0.4, "variance_randomisation": 0.05, "z_randomisation": 0.36, "p_permutation": 0.62, "permutations": 999},
                   "block_cv": {"block_km": 10.0, "rmse_in_sample": 17.0, "r2_in_sample": 0.91, "rmse_out_of_block": 29.0, "r2_out_of_block": 0.7},
                   "local": {"kernel": "bisquare", "adaptive": True, "bandwidth": 5, "aicc": 60.2}})
    for (sid, _, lon, lat, el), c in zip(st, cov):
        obs = round(random.uniform(50, 400), 3); fit = round(obs + random.gauss(0, 20), 3)
        fitted.append([sid, resp, obs, fit, round(obs - fit, 3), round(random.uniform(0.1, 0.7), 4), round(random.uniform(0, 1.3), 4)])
        local.append([sid, resp, round(random.uniform(0.5, 0.95), 4), round(random.gauss(12, 3), 3), round(random.uniform(1, 3), 3),
                      round(random.gauss(0.3, 0.05), 4), round(random.uniform(0.01, 0.05), 4), round(random.gauss(4, 1), 3), round(random.uniform(0.5, 2), 3)])
json.dump({"models": models}, open(os.path.join(R, "regression", "regression.json"), "w"), indent=1)
w("regression/fitted.csv", ["station", "response", "observed", "fitted", "residual", "leverage", "cooks_distance"], fitted)
w("regression/local.csv", ["station", "response", "local_r2", "local_intercept", "local_se_intercept", "local_elevation_dem_m", "local_se_elevation_dem_m", "local_coast_km", "local_se_coast_km"], local)
# Coastline: one island polygon written clockwise on purpose (the exporter must re-orient it) with one lake hole written counterclockwise.
ring = [(-8.5 + 0.65 * (1 + math.cos(t)) / 1, 58.62 + 0.14 * math.sin(t)) for t in [-2 * math.pi * k / 24 for k in range(24)]]
ring.append(ring[0])
hole = [(-8.14 + 0.02 * math.cos(t), 58.6 + 0.01 * math.sin(t)) for t in [2 * math.pi * k / 8 for k in range(8)]]
hole.append(hole[0])
coast = {"type": "FeatureCollection", "features": [{"type": "Feature", "properties": {"name": "Marrowfell"},
         "geometry": {"type": "Polygon", "coordinates": [[[round(x, 7), round(y, 7)] for x, y in ring], [[round(x, 7), round(y, 7)] for x, y in hole]]}}]}
json.dump(coast, open(os.path.join(R, "coastline.geojson"), "w"))
