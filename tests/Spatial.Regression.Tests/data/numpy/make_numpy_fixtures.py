"""Reference diagnostics for a small heteroscedastic case, computed once with numpy 1.24 (LAPACK) from the
textbook formulas. Run: /usr/bin/python3 make_numpy_fixtures.py (writes hetero.csv and hetero_reference.json).

Formulas (each from its paper; no statistics package used):
- OLS by numpy.linalg.lstsq; classical SE = sqrt(s^2 diag((X'X)^-1)), s^2 = RSS/(n-p).
- HC3 (MacKinnon & White 1985): (X'X)^-1 X' diag(e_i^2/(1-h_i)^2) X (X'X)^-1, h = diag(X (X'X)^-1 X').
- Breusch-Pagan, Koenker (1981) studentised form: n * R^2 of e^2 regressed on [1, x1, x2]; df = 2, so the
  chi-square upper tail is exactly exp(-stat/2).
- Cook's distance (Cook 1977): e_i^2 h_i / (p s^2 (1-h_i)^2).
- VIF: 1/(1 - R_j^2), R_j^2 from regressing x_j on the other predictors and a constant.
- Condition number: numpy.linalg.cond of X with columns scaled to unit Euclidean length (2-norm).
- log-likelihood -n/2 (log(2 pi) + log(RSS/n) + 1); AIC = -2 logL + 2(p+1); BIC = -2 logL + log(n)(p+1).
- WLS with weights w: OLS on sqrt(w) y, sqrt(w) X; SE from the weighted RSS/(n-p).
"""
import json
import numpy as np

rng = np.random.default_rng(20261201)
n = 30
x1 = np.round(rng.uniform(0, 10, n), 3)
x2 = np.round(rng.normal(5, 2, n), 3)
y = np.round(2.0 + 0.8 * x1 - 0.5 * x2 + rng.normal(0, 0.05 + 0.4 * x1, n), 3)
w = np.round(1.0 / (0.05 + 0.4 * x1) ** 2, 6)
X = np.column_stack([np.ones(n), x1, x2])
p = X.shape[1]


def ols(X, y):
    b, *_ = np.linalg.lstsq(X, y, rcond=None)
    e = y - X @ b
    rss = float(e @ e)
    G = np.linalg.inv(X.T @ X)
    s2 = rss / (len(y) - X.shape[1])
    return b, e, rss, G, s2


b, e, rss, G, s2 = ols(X, y)
se = np.sqrt(s2 * np.diag(G))
h = np.einsum("ij,jk,ik->i", X, G, X)
meat = X.T @ np.diag(e**2 / (1 - h) ** 2) @ X
hc3 = np.sqrt(np.diag(G @ meat @ G))
cooks = e**2 * h / (p * s2 * (1 - h) ** 2)
u = e**2
bu, eu, rssu, *_ = ols(X, u)
r2u = 1 - rssu / float(((u - u.mean()) ** 2).sum())
bp = n * r2u
tss = float(((y - y.mean()) ** 2).sum())
r2 = 1 - rss / tss
adj = 1 - (1 - r2) * (n - 1) / (n - p)
F = ((tss - rss) / (p - 1)) / s2
logl = -n / 2 * (np.log(2 * np.pi) + np.log(rss / n) + 1)
vif = []
for j in (1, 2):
    others = [k for k in range(p) if k != j]
    bj, ej, rssj, *_ = ols(X[:, others], X[:, j])
    r2j = 1 - rssj / float(((X[:, j] - X[:, j].mean()) ** 2).sum())
    vif.append(1 / (1 - r2j))
Xs = X / np.linalg.norm(X, axis=0)
cond = np.linalg.cond(Xs)
sw = np.sqrt(w)
bw, ew, rssw, Gw, s2w = ols(X * sw[:, None], y * sw)
sew = np.sqrt(s2w * np.diag(Gw))

with open("hetero.csv", "w") as f:
    f.write("station,y,x1,x2,w\n")
    for i in range(n):
        f.write("S%02d,%r,%r,%r,%r\n" % (i + 1, float(y[i]), float(x1[i]), float(x2[i]), float(w[i])))

ref = {
    "source": "numpy " + np.__version__ + " (LAPACK lstsq/inv), formulas in make_numpy_fixtures.py",
    "coefficients": b.tolist(), "se": se.tolist(), "se_hc3": hc3.tolist(),
    "sigma": float(np.sqrt(s2)), "r2": r2, "adj_r2": adj, "f": F,
    "log_likelihood": float(logl), "aic": float(-2 * logl + 2 * (p + 1)), "bic": float(-2 * logl + np.log(n) * (p + 1)),
    "breusch_pagan_koenker": bp, "breusch_pagan_df": 2, "breusch_pagan_p": float(np.exp(-bp / 2)),
    "leverage": h.tolist(), "cooks_distance": cooks.tolist(), "vif": vif, "condition_number": float(cond),
    "wls_coefficients": bw.tolist(), "wls_se": sew.tolist(), "wls_sigma": float(np.sqrt(s2w)),
}
with open("hetero_reference.json", "w") as f:
    json.dump(ref, f, indent=1)
