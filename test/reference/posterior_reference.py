"""Model-space linear-Gaussian posterior with numpy/scipy, for the data-space TypeScript code.

Input JSON {"cases": [case, ...]}, each case:
  grid:  {"shape": [nx] | [nx, ny], "spacing": [...], "origin": [...]?}
  prior: {"mean": {"constant": c} | {"values": [...]} | {"trend": {"intercept": a, "slope": [...]}},
          "terms": [{"kernel", "variance", "length"? , "lengths"?, "angle"?, "nu"?}], "nugget"?, "stdProfile"?}
  G:     {"rows", "cols", "dense": [row-major]} or {"rows", "cols", "i": [...], "j": [...], "v": [...]}
  d:     [...];  sigma: [...]  or  Cd: [row-major M*M]
Output {"results": [...]}: Cm, m0, mean, std, cov, R, predicted, residuals, chi2, misfit, logEvidence,
traceR (matrices row-major, flattened).

Covariance (our spec, src/core/prior/spec.ts; built here independently):
  Cm_ij = s_i s_j sum_t var_t rho_t(h_t) + nugget delta_ij, with
  exponential exp(-h); gaussian exp(-h^2/2); spherical 1 - 1.5h + 0.5h^3 (h < 1);
  matern 2^(1-nu)/Gamma(nu) (sqrt(2 nu) h)^nu K_nu(sqrt(2 nu) h) via scipy.special.kv
  (Rasmussen & Williams 2006, eq. 4.14); h = r/l or, anisotropic, the offset rotated by -angle.
Posterior in the model-space form (Tarantola 2005, Inverse Problem Theory, section 3.2):
  C~ = (G^T Cd^-1 G + Cm^-1)^-1,  m~ = m0 + C~ G^T Cd^-1 (d - G m0),  R = C~ G^T Cd^-1 G
with scipy.linalg.cho_factor / cho_solve; evidence by scipy.stats.multivariate_normal.logpdf of
d ~ N(G m0, G Cm G^T + Cd); misfit as the cost (d-Gm~)^T Cd^-1 (d-Gm~) + (m~-m0)^T Cm^-1 (m~-m0).
"""
import json
import sys

import numpy as np
from scipy import linalg, special, stats

from reference_prior import covariance, mean_vector  # noqa: E402  (shared independent construction)


def operator(g):
    if "dense" in g:
        return np.asarray(g["dense"], float).reshape(g["rows"], g["cols"])
    G = np.zeros((g["rows"], g["cols"]))
    np.add.at(G, (np.asarray(g["i"]), np.asarray(g["j"])), np.asarray(g["v"], float))
    return G


def solve_case(c):
    if "Cm" in c:
        n = len(c["m0"])
        Cm = np.asarray(c["Cm"], float).reshape(n, n)
        m0 = np.asarray(c["m0"], float)
    else:
        Cm = covariance(c["grid"], c["prior"])
        m0 = mean_vector(c["grid"], c["prior"])
    G = operator(c["G"])
    d = np.asarray(c["d"], float)
    M, N = G.shape
    if "sigma" in c:
        sigma = np.asarray(c["sigma"], float)
        Cd = np.diag(sigma ** 2)
    else:
        Cd = np.asarray(c["Cd"], float).reshape(M, M)
    eyeN = np.eye(N)
    Cm_f = linalg.cho_factor(Cm, lower=True)
    Cd_f = linalg.cho_factor(Cd, lower=True)
    Cm_inv = linalg.cho_solve(Cm_f, eyeN)
    Cd_inv_G = linalg.cho_solve(Cd_f, G)
    P = G.T @ Cd_inv_G + Cm_inv
    P_f = linalg.cho_factor(P, lower=True)
    Cpost = linalg.cho_solve(P_f, eyeN)
    Cpost = 0.5 * (Cpost + Cpost.T)
    mean = m0 + Cpost @ (G.T @ linalg.cho_solve(Cd_f, d - G @ m0))
    pred = G @ mean
    if "sigma" in c:
        res = (d - pred) / sigma
    else:
        res = linalg.solve_triangular(np.linalg.cholesky(Cd), d - pred, lower=True)
    R = Cpost @ (G.T @ Cd_inv_G)
    misfit = float((d - pred) @ linalg.cho_solve(Cd_f, d - pred) + (mean - m0) @ linalg.cho_solve(Cm_f, mean - m0))
    K = G @ Cm @ G.T + Cd
    logev = float(stats.multivariate_normal.logpdf(d, mean=G @ m0, cov=K))
    return {
        "Cm": Cm.ravel().tolist(),
        "m0": m0.tolist(),
        "mean": mean.tolist(),
        "std": np.sqrt(np.clip(np.diag(Cpost), 0, None)).tolist(),
        "cov": Cpost.ravel().tolist(),
        "R": R.ravel().tolist(),
        "predicted": pred.tolist(),
        "residuals": res.tolist(),
        "chi2": float(res @ res),
        "misfit": misfit,
        "logEvidence": logev,
        "traceR": float(np.trace(R)),
    }


req = json.load(sys.stdin)
json.dump({"results": [solve_case(c) for c in req["cases"]]}, sys.stdout)
