#!/usr/bin/python3
"""Season matrices with gaps and their numpy reference fits (see SOURCES.md).

Writes, beside this script:
  <case>.csv.gz             station,season,d000..d364; each depth the shortest repr of a float32; empty = missing
  <case>_numpy.json.gz      the reference numbers (pairwise fit, EM fit, and for generated data the truth)

Every reference number is computed in float64 from the float32 values in the CSV (read back from the file written).
Run with Debian's python3 and python3-numpy 1.24.2: python3 make_gappy_reference.py (about a minute). The outputs are
byte for byte the same on every run with the same numpy and LAPACK.
"""

import csv
import gzip
import io
import json
import os
import sys

import numpy as np

DAYS = 365
K = 3
HERE = os.path.dirname(os.path.abspath(__file__))
STATIONS = 12
SEASONS_PER_STATION = 20
FIRST_SEASON = 1990
EM_TOLERANCE = 1e-13  # to the fixed point: far below what float64 rounding lets the fill settle to in 365 × 240 cells
EM_MAX_ITERATIONS = 5000
CLI_DEFAULT_TOLERANCE = 1e-4  # FitOptions defaults, used by `spatial fit --refine`
CLI_DEFAULT_ITERATIONS = 30


# ---------------------------------------------------------------------------------------------------------------
# Generation: exact rank-3 snow-like curves.
# ---------------------------------------------------------------------------------------------------------------

def logistic(z):
    return 1.0 / (1.0 + np.exp(-z))


def snow_shape(d, onset=80.0, melt=255.0, peak=900.0):
    """A snow-like season curve, mm: slow build-up from the onset, a faster melt (smooth; below 0.2 mm in summer)."""
    build = 0.25 + 0.75 * logistic((d - 0.5 * (onset + melt)) / 40.0)
    return peak * logistic((d - onset) / 10.0) * logistic((melt - d) / 7.0) * build


def generating_basis():
    """Mean curve and three orthonormal components: amount (∝ mean), timing (∂/∂shift), duration (∂/∂length)."""
    d = np.arange(DAYS, dtype=np.float64)
    mean = snow_shape(d)
    h = 1e-3
    timing = (snow_shape(d + h) - snow_shape(d - h)) / (2 * h)
    duration = (snow_shape(d, onset=80.0 - h, melt=255.0 + h) - snow_shape(d, onset=80.0 + h, melt=255.0 - h)) / (2 * h)
    q, r = np.linalg.qr(np.stack([mean, timing, duration], axis=1))
    q = q * np.sign(np.diag(r))  # Gram–Schmidt order and signs: component k has a positive projection on its seed
    return mean, q  # q: 365 × 3, orthonormal columns


def keys():
    return [(f"S{s:02d}", FIRST_SEASON + y) for s in range(STATIONS) for y in range(SEASONS_PER_STATION)]


def generate(rng, noise_mm):
    mean, v = generating_basis()
    n = STATIONS * SEASONS_PER_STATION
    sd = np.array([2400.0, 1000.0, 400.0])
    c = rng.standard_normal((n, K)) * sd
    x = mean + c @ v.T
    if noise_mm > 0:
        x = x + noise_mm * rng.standard_normal(x.shape)
    return x, c, mean, v


def random_mask(rng, n, missing):
    observed = rng.random((n, DAYS)) >= missing
    return observed


# ---------------------------------------------------------------------------------------------------------------
# File writing and reading (float32 values, shortest repr).
# ---------------------------------------------------------------------------------------------------------------

def write_matrix(path, ks, x32, observed):
    out = io.StringIO()
    out.write("station,season," + ",".join(f"d{j:03d}" for j in range(DAYS)) + "\n")
    for (station, season), row, ok in zip(ks, x32, observed):
        fields = [repr(np.float32(v)) if o else "" for v, o in zip(row, ok)]
        # repr of np.float32 is the shortest string that reads back to the same float32 (e.g. 123.4567, 1.2e-05).
        out.write(f"{station},{season}," + ",".join(fields) + "\n")
    with open(path, "wb") as f:
        with gzip.GzipFile(fileobj=f, mode="wb", mtime=0) as gz:
            gz.write(out.getvalue().encode("ascii"))


def read_matrix(path):
    with gzip.open(path, "rt", newline="") as f:
        rows = list(csv.reader(f))
    body = rows[1:]
    x = np.full((len(body), DAYS), np.nan, dtype=np.float32)
    for i, r in enumerate(body):
        for j, s in enumerate(r[2:]):
            if s != "":
                x[i, j] = np.float32(s)
    return [(r[0], int(r[1])) for r in body], x


# ---------------------------------------------------------------------------------------------------------------
# The reference arithmetic (float64), as SeasonalFit.cs documents it.
# ---------------------------------------------------------------------------------------------------------------

def eigen_descending(c):
    """numpy.linalg.eigh (LAPACK dsyevd): eigenvalues descending, unit eigenvectors; all of them returned."""
    w, v = np.linalg.eigh(c)
    order = np.argsort(-w, kind="stable")
    w = w[order]
    v = v[:, order]
    # Sign: largest-magnitude element positive (arbitrary; tests compare up to sign).
    for i in range(v.shape[1]):
        j = np.argmax(np.abs(v[:, i]))
        if v[j, i] < 0:
            v[:, i] = -v[:, i]
    return w, v


def pairwise_mean_cov(x):
    """Mean of observed values per day (NaN if never observed); C_ij = Σ_s (x_si − m_i)(x_sj − m_j)/(n_ij − 1) over seasons
    observed on both days, 0 where n_ij < 2 (Covariance.cs)."""
    obs = ~np.isnan(x)
    mean = _nanmean(x, obs)
    a = np.where(obs, x - np.where(np.isnan(mean), 0.0, mean), 0.0)
    s = a.T @ a
    n = obs.T.astype(np.float64) @ obs.astype(np.float64)
    cov = np.zeros_like(s)
    ok = n >= 2
    cov[ok] = s[ok] / (n[ok] - 1)
    return mean, cov, n


def _nanmean(x, obs):
    """numpy.nanmean per day, NaN (not a warning) for a day never observed."""
    cnt = obs.sum(axis=0)
    tot = np.where(obs, x, 0.0).sum(axis=0)
    mean = np.full(DAYS, np.nan)
    mean[cnt > 0] = tot[cnt > 0] / cnt[cnt > 0]
    return mean


def gappy(x, mean, comps):
    """Per season: least squares on the observed (usable) days only (numpy.linalg.lstsq, LAPACK dgelsd), and
    residual_k = ‖y − Σ_{i≤k} c_i v_i‖/‖y‖ over those days, y = x − m, with the same coefficients c (residual_0 = 1)."""
    usable = ~np.isnan(mean)
    n, k = x.shape[0], comps.shape[1]
    coeffs = np.full((n, k), np.nan)
    resid = np.full((n, k + 1), np.nan)
    cond = np.full((n, 2), np.nan)
    for s in range(n):
        o = ~np.isnan(x[s]) & usable
        if not o.any():
            continue
        y = x[s, o] - mean[o]
        vo = comps[o, :]
        c, *_ = np.linalg.lstsq(vo, y, rcond=None)
        coeffs[s] = c
        yy = np.sqrt(y @ y)
        cond[s] = [yy, 1.0 / np.linalg.svd(vo, compute_uv=False).min() ** 2]
        for j in range(k + 1):
            r = y - vo[:, :j] @ c[:j]
            resid[s, j] = np.sqrt(r @ r) / yy if yy > 0 else np.nan
    return coeffs, resid, cond


def zero_unusable(v, mean):
    v = v.copy()
    v[np.isnan(mean), :] = 0.0
    return v


def em(x, mean0, vectors0, k, tolerance=EM_TOLERANCE, max_iterations=EM_MAX_ITERATIONS, must_converge=True):
    """EM refinement as SeasonalFit.Refine: start from the pairwise mean and top-k eigenvectors; fill each missing
    (usable) day with m + Σ c_k v_k from the season's gappy coefficients; then repeat: mean and complete covariance
    (n − 1) of the filled data, eigen-decomposition, coefficients of each filled centred season by dot products with
    the new components, new fill; stop when RMS change of the fill ÷ RMS of the observed anomalies < tolerance."""
    obs = ~np.isnan(x)
    n = x.shape[0]
    usable = ~np.isnan(mean0)
    comps = zero_unusable(vectors0[:, :k], mean0)
    coeffs, _, _ = gappy(x, mean0, comps)
    coeffs[np.isnan(coeffs).any(axis=1)] = 0.0
    dev = np.where(obs & usable, x - np.where(usable, mean0, 0.0), 0.0)
    obs_rms = np.sqrt((dev ** 2).sum() / obs.sum())
    fill = mean0 + coeffs @ comps.T  # NaN on unusable days (mean NaN)
    missing = ~obs & usable
    history = []
    for it in range(1, max_iterations + 1):
        y = np.where(obs, x, fill)
        new_mean = y.mean(axis=0)  # NaN exactly on the unusable days
        ok = ~np.isnan(new_mean)
        a = np.where(ok, y - np.where(ok, new_mean, 0.0), 0.0)
        cov = (a.T @ a) / (n - 1)
        w, v = eigen_descending(cov)
        new_comps = zero_unusable(v[:, :k], new_mean)
        new_coeffs = a @ new_comps
        new_fill = new_mean + new_coeffs @ new_comps.T
        delta = (new_fill - fill)[missing]
        rms = np.sqrt((delta ** 2).sum() / missing.sum()) if missing.any() else 0.0
        rel = rms / obs_rms
        history.append(rel)
        fill = new_fill
        if rel < tolerance:
            return new_mean, cov, w, v, it, rel, history, obs_rms
    if must_converge:
        raise RuntimeError(f"EM did not reach {tolerance} in {max_iterations} iterations (last {rel})")
    return new_mean, cov, w, v, max_iterations, rel, history, obs_rms


def fit_block(mean, cov, w, v, x):
    comps = zero_unusable(v[:, :K], mean)
    coeffs, resid, cond = gappy(x, mean, comps)
    tr = float(np.trace(cov))
    lam = w[:K]
    gaps = []
    for i in range(K):
        g = [abs(lam[i] - w[j]) for j in range(len(w)) if j != i]
        gaps.append(min(g))
    return {
        "mean": mean,
        "eigenvalues": lam,
        "eigenvalue_next": float(w[K]),
        "eigengap": np.array(gaps),
        "trace": tr,
        "variance_fraction": lam / tr,
        "components": comps.T,
        "coefficients": coeffs,
        "residuals": resid,
        # Per season ‖y‖ over the observed usable days (y = x − m) and ‖G⁻¹‖₂, G = V_obsᵀV_obs: the conditioning of the
        # gappy least squares, used by the tests to carry component differences over to coefficients and residuals.
        "anomaly_norm": cond[:, 0],
        "inverse_gram_norm": cond[:, 1],
    }


def truth_block(x_true, usable):
    """The complete data (every day of every season, float64 before float32 rounding) over the days the fit can use."""
    mean = np.where(usable, x_true.mean(axis=0), np.nan)
    a = np.where(usable, x_true - np.where(usable, mean, 0.0), 0.0)
    cov = (a.T @ a) / (x_true.shape[0] - 1)
    w, v = eigen_descending(cov)
    comps = zero_unusable(v[:, :K], mean)
    return {"mean": mean, "eigenvalues": w[:K], "eigenvalue_next": float(w[K]), "trace": float(np.trace(cov)),
            "components": comps.T, "coefficients": a @ comps}


# ---------------------------------------------------------------------------------------------------------------
# Figures: how far a fit is from the truth.
# ---------------------------------------------------------------------------------------------------------------

def figures(fit, truth):
    cos = [abs(float(fit["components"][i] @ truth["components"][i])) for i in range(K)]
    m = fit["components"] @ truth["components"].T
    smin = np.linalg.svd(m, compute_uv=False).min()
    return {
        "eigenvalue_relative_error": [float(abs(a - b) / b) for a, b in zip(fit["eigenvalues"], truth["eigenvalues"])],
        "one_minus_abs_cos": [1.0 - c for c in cos],
        "subspace_sine": float(np.sqrt(max(0.0, 1.0 - smin ** 2))),
        "max_residual_k": float(np.nanmax(fit["residuals"][:, K])),
        "median_residual_k": float(np.nanmedian(fit["residuals"][:, K])),
    }


# ---------------------------------------------------------------------------------------------------------------
# JSON output (float64 reprs, NaN → null).
# ---------------------------------------------------------------------------------------------------------------

def jsonable(o):
    if isinstance(o, dict):
        return {k: jsonable(v) for k, v in o.items()}
    if isinstance(o, (list, tuple)):
        return [jsonable(v) for v in o]
    if isinstance(o, np.ndarray):
        return jsonable(o.tolist())
    if isinstance(o, (float, np.floating)):
        f = float(o)
        return None if np.isnan(f) else f
    if isinstance(o, (np.integer,)):
        return int(o)
    return o


def write_json(path, obj):
    text = json.dumps(jsonable(obj), indent=None, separators=(",", ":"), allow_nan=False)
    with open(path, "wb") as f:
        with gzip.GzipFile(fileobj=f, mode="wb", mtime=0) as gz:
            gz.write(text.encode("ascii"))


# ---------------------------------------------------------------------------------------------------------------
# Cases.
# ---------------------------------------------------------------------------------------------------------------

def case_exact(rng):
    x, c, mean, v = generate(rng, noise_mm=0.0)
    observed = random_mask(rng, x.shape[0], 0.30)
    observed[:, [0, 1, 2, 200]] = False  # days never observed: the first three of the season and one mid-winter day
    return x, observed, "exact rank 3 (mean + 3 orthonormal smooth components), 30 % of days missing at random, days 0, 1, 2 and 200 never observed"


def case_noisy(rng, x_exact, observed_exact):
    x = x_exact + 5.0 * rng.standard_normal(x_exact.shape)
    return x, observed_exact.copy(), "the exact-rank-3 seasons and gaps plus Gaussian noise, sd 5 mm, on every day"


def case_outages(rng):
    x, c, mean, v = generate(rng, noise_mm=0.0)
    n = x.shape[0]
    observed = random_mask(rng, n, 0.10)
    for s in range(n):
        station = s // SEASONS_PER_STATION
        if station < 4:
            observed[s, :60] = False  # summer never reported at stations S00–S03
            observed[s, 300:] = False
        if rng.random() < 0.4:  # an outage of 2–6 weeks
            length = int(rng.integers(14, 43))
            start = int(rng.integers(0, DAYS - length))
            observed[s, start:start + length] = False
    observed[:, 362:] = False  # the records end two days early everywhere: days 362–364 never observed
    observed[:, 130] = False
    observed[17, 130] = True  # day 130 observed in exactly one season: a mean but no covariance (n_ij < 2)
    return x, observed, ("exact rank 3; stations S00–S03 never report days 0–59 and 300–364; 40 % of seasons have one "
                         "outage of 14–42 consecutive days; 10 % of days missing at random; days 362–364 never observed; "
                         "day 130 observed in one season only")


def build(name, ks, x_true, observed, description, seed_note, exact_rank):
    x32 = x_true.astype(np.float32)
    path = os.path.join(HERE, f"{name}.csv.gz")
    write_matrix(path, ks, x32, observed)
    ks2, xr = read_matrix(path)
    assert ks2 == ks
    expect = np.where(observed, x32, np.float32(np.nan))
    assert np.array_equal(np.isnan(xr), np.isnan(expect)) and np.array_equal(xr[~np.isnan(xr)], expect[~np.isnan(expect)]), "float32 round trip"
    x = xr.astype(np.float64)

    mean, cov, pairs = pairwise_mean_cov(x)
    w, v = eigen_descending(cov)
    pairwise = fit_block(mean, cov, w, v, x)
    pairwise["pairs_below_two"] = int((pairs < 2).sum())
    em_mean, em_cov, em_w, em_v, iterations, rel, history, obs_rms = em(x, mean, v, K)
    refined = fit_block(em_mean, em_cov, em_w, em_v, x)
    refined["iterations"] = iterations
    refined["final_relative_change"] = rel
    refined["observed_anomaly_rms"] = obs_rms
    ratios = [b / a for a, b in zip(history[4:], history[5:]) if b > 1e3 * EM_TOLERANCE]
    refined["contraction_rate"] = float(np.median(ratios))  # relative change of iteration i+1 ÷ of iteration i
    refined["relative_change_history"] = history
    d_mean, d_cov, d_w, d_v, d_it, d_rel, _, _ = em(x, mean, v, K, CLI_DEFAULT_TOLERANCE, CLI_DEFAULT_ITERATIONS, False)
    cli_default = fit_block(d_mean, d_cov, d_w, d_v, x)
    cli_default["iterations"] = d_it
    cli_default["final_relative_change"] = d_rel

    out = {
        "case": name,
        "description": description,
        "generator": seed_note,
        "seasons": len(ks),
        "components": K,
        "observed_fraction": float(observed.mean()),
        "never_observed_days": [int(j) for j in np.where(~observed.any(axis=0))[0]],
        "software": {"numpy": np.__version__, "python": sys.version.split()[0],
                     "lapack": "Debian liblapack3 3.11.0 (reference LAPACK): eigh → dsyevd, lstsq → dgelsd"},
        "pairwise": pairwise,
        "em": refined,
    }
    # "truth": the complete data (no gaps, float64 before float32 rounding) over the days the fit can use; for the
    # noise-free cases its span is the generating span restricted to those days.
    usable = ~np.isnan(mean)
    truth = truth_block(x_true, usable)
    truth["residual_k_of_float32_data"] = float(np.nanmax(gappy(x, truth["mean"], truth["components"].T)[1][:, K]))
    if exact_rank:
        _, gen = generating_basis()
        q, _ = np.linalg.qr(np.where(usable[:, None], gen, 0.0))
        sine = np.sqrt(max(0.0, 1.0 - np.linalg.svd(q.T @ truth["components"].T, compute_uv=False).min() ** 2))
        assert sine < 1e-7, sine
        truth["sine_to_generating_span"] = float(sine)
    out["truth"] = truth
    out["figures"] = {"pairwise_vs_truth": figures(pairwise, truth), "em_vs_truth": figures(refined, truth),
                      "em_cli_defaults_vs_truth": dict(figures(cli_default, truth), iterations=d_it, final_relative_change=d_rel)}
    write_json(os.path.join(HERE, f"{name}_numpy.json.gz"), out)
    print(name, "EM iterations", iterations, "final rel", rel, "contraction", refined["contraction_rate"])
    print(json.dumps(jsonable(out["figures"]), indent=1))
    return out


def main():
    rng = np.random.default_rng(20250601)
    ks = keys()
    x, observed, desc = case_exact(rng)
    build("exact_rank3", ks, x, observed, desc, "numpy default_rng(20250601): coefficients, then the random mask", True)
    xn, on, descn = case_noisy(rng, x, observed)
    build("noisy_rank3", ks, xn, on, descn, "same generator, continued: noise after the exact case", False)
    xo, oo, desco = case_outages(np.random.default_rng(20250602))
    build("outages_rank3", ks, xo, oo, desco, "numpy default_rng(20250602): coefficients, random mask, outages", True)


if __name__ == "__main__":
    main()
