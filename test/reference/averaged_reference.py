"""Outside reference for src/core/tuning/averaged.ts (Debian python3-numpy / python3-scipy).

Direct summation over every cell of a (length x variance) map of one exponential term on a 1-D
grid: per cell Cm (exp(-r/l) formula), K = G Cm G^T + Cd, log evidence by
scipy.stats.multivariate_normal.logpdf, posterior mean and covariance in the model-space form
(Tarantola 2005: C~ = (G^T Cd^-1 G + Cm^-1)^-1, m~ = m0 + C~ G^T Cd^-1 (d - G m0)), weights
exp(logZ) * prior mass (log-uniform: equal per cell; uniform: l * s2), then the mixture's mean and
variance from its second moment: E[m^2] - E[m]^2 with E[m^2] = sum w (diag C~ + m~^2).

Input JSON: x, G (rows), d, sigma, m0, nugget, lengths, variances, hyper.
Output: mean, std, weights (row-major over lengths x variances), logZ.
"""
import json
import sys

import numpy as np
from scipy import linalg, stats

case = json.load(sys.stdin)
x = np.asarray(case["x"], dtype=float)
G = np.asarray(case["G"], dtype=float)
d = np.asarray(case["d"], dtype=float)
sig = np.asarray(case["sigma"], dtype=float)
m0 = np.asarray(case["m0"], dtype=float)
cd = sig**2
r = np.abs(x[:, None] - x[None, :])
logz, means, seconds, logmass = [], [], [], []
for l in case["lengths"]:
    for s2 in case["variances"]:
        Cm = s2 * np.exp(-r / l) + case["nugget"] * np.eye(len(x))
        K = G @ Cm @ G.T + np.diag(cd)
        logz.append(stats.multivariate_normal.logpdf(d, mean=G @ m0, cov=K))
        H = G.T @ (G / cd[:, None]) + linalg.inv(Cm)
        Ct = linalg.inv(H)
        mt = m0 + Ct @ (G.T @ ((d - G @ m0) / cd))
        means.append(mt)
        seconds.append(np.diag(Ct) + mt**2)
        logmass.append(0.0 if case["hyper"] == "log-uniform" else np.log(l) + np.log(s2))
lw = np.asarray(logz) + np.asarray(logmass)
w = np.exp(lw - lw.max())
w /= w.sum()
mean = np.einsum("k,kn->n", w, np.asarray(means))
second = np.einsum("k,kn->n", w, np.asarray(seconds))
print(json.dumps({"mean": mean.tolist(), "std": np.sqrt(second - mean**2).tolist(), "weights": w.tolist(), "logZ": list(map(float, logz))}))
