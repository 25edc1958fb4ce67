"""Outside references for src/core/tuning (Debian python3-scipy / python3-numpy).

Input JSON: {"cases": [case, ...]} where each case has
  x (cell coordinates, 1-D), G (M x N rows), d (M), sigma (M), m0 (N),
  terms: [{"kernel": "exponential"|"gaussian"|"matern32", "variance", "length"}], nugget,
  scale (optional): multiply Cm by this before the discrepancy chi-square.
Cm is built here from the kernel formulas (R&W 2006 eq. 4.14/4.17 closed forms; exponential
exp(-r/l), gaussian exp(-r^2/(2 l^2))), independently of the TypeScript assembly.

Output per case:
  logpdf      scipy.stats.multivariate_normal.logpdf(d, G m0, G Cm G^T + Cd)
  quad, sf    r^T K^-1 r and scipy.stats.chi2.sf(quad, M)
  loo         per-datum log N(d_i; G_i m_i, G_i C_i G_i^T + sigma_i^2) from a model-space refit
              (Tarantola 2005 model-space form) with datum i removed
  chi2_scaled chi-square of normalised residuals of the model-space posterior mean with s*Cm
"""
import json
import sys

import numpy as np
from scipy import linalg, stats


def cm_of(case):
    x = np.asarray(case["x"], dtype=float)
    r = np.abs(x[:, None] - x[None, :])
    c = np.zeros_like(r)
    for t in case["terms"]:
        h = r / t["length"]
        if t["kernel"] == "exponential":
            rho = np.exp(-h)
        elif t["kernel"] == "gaussian":
            rho = np.exp(-0.5 * h * h)
        elif t["kernel"] == "matern32":
            rho = (1 + np.sqrt(3) * h) * np.exp(-np.sqrt(3) * h)
        else:
            raise ValueError(t["kernel"])
        c += t["variance"] * rho
    c += case.get("nugget", 0.0) * np.eye(len(x))
    return c


def model_space_mean_cov(G, Cm, m0, d, cd_diag):
    """m~ = m0 + (G^T Cd^-1 G + Cm^-1)^-1 G^T Cd^-1 (d - G m0), C~ = (G^T Cd^-1 G + Cm^-1)^-1."""
    cmi = linalg.inv(Cm)
    H = G.T @ (G / cd_diag[:, None]) + cmi
    Ct = linalg.inv(H)
    mt = m0 + Ct @ (G.T @ ((d - G @ m0) / cd_diag))
    return mt, Ct


out = []
for case in json.load(sys.stdin)["cases"]:
    G = np.asarray(case["G"], dtype=float)
    d = np.asarray(case["d"], dtype=float)
    sig = np.asarray(case["sigma"], dtype=float)
    m0 = np.asarray(case["m0"], dtype=float)
    Cm = cm_of(case)
    K = G @ Cm @ G.T + np.diag(sig**2)
    res = {"logpdf": float(stats.multivariate_normal.logpdf(d, mean=G @ m0, cov=K))}
    r = d - G @ m0
    q = float(r @ linalg.solve(K, r, assume_a="pos"))
    res["quad"] = q
    res["sf"] = float(stats.chi2.sf(q, len(d)))
    loo = []
    for i in range(len(d)):
        keep = [k for k in range(len(d)) if k != i]
        mt, Ct = model_space_mean_cov(G[keep], Cm, m0, d[keep], sig[keep] ** 2)
        mu = float(G[i] @ mt)
        var = float(G[i] @ Ct @ G[i] + sig[i] ** 2)
        loo.append(float(stats.norm.logpdf(d[i], loc=mu, scale=np.sqrt(var))))
    res["loo"] = loo
    if "scale" in case:
        mt, _ = model_space_mean_cov(G, case["scale"] * Cm, m0, d, sig**2)
        res["chi2_scaled"] = float(np.sum(((d - G @ mt) / sig) ** 2))
    out.append(res)
json.dump({"results": out}, sys.stdout)
