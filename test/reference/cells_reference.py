"""Cell lists (irregular centres): prior covariance and model-space posterior with numpy/scipy (Debian python3),
for test/reference/cells.test.ts.

Independent of the project's code:
  * pairwise scaled distances by scipy.spatial.distance.cdist on the rotated, scaled centres: row p -> (R^T p) / l,
    with R = Rz(a1) @ Ry(a2) @ Rx(a3) written out as explicit matrices (3-D) or the plane rotation by the angle (2-D)
    (standard right-handed elementary rotations; common practice, no source); the distance between rotated, scaled
    points equals |diag(1/l) R^T (x_j - x_i)|;
  * correlations from reference_prior.correlation (Matern by scipy.special.kv, Rasmussen & Williams 2006 eq. 4.14);
  * posterior in the model-space form (Tarantola 2005 eq. 3.37-3.38): C~ = (G^T Cd^-1 G + Cm^-1)^-1,
    m~ = m0 + C~ G^T Cd^-1 (d - G m0), by Cholesky solves (scipy.linalg.cho_factor / cho_solve);
  * the extreme eigenvalues of Cm by numpy.linalg.eigvalsh (LAPACK).
"""
import json
import sys

import numpy as np
from scipy import linalg
from scipy.spatial.distance import cdist

from reference_prior import correlation, rx, ry, rz


def covariance(p, prior):
    c = np.zeros((len(p), len(p)))
    for t in prior["terms"]:
        if t.get("lengths") is not None and len(t["lengths"]) == 3:
            a = np.deg2rad(t["angles"])
            R = rz(a[0]) @ ry(a[1]) @ rx(a[2])
            q = (p @ R) / np.asarray(t["lengths"], dtype=float)
        elif t.get("lengths") is not None:
            R = rz(np.deg2rad(t.get("angle") or 0.0))[:2, :2]
            q = (p[:, :2] @ R) / np.asarray(t["lengths"], dtype=float)
        else:
            q = p / t["length"]
        c += t["variance"] * correlation(t["kernel"], cdist(q, q), t.get("nu"))
    if prior.get("stdProfile") is not None:
        s = np.asarray(prior["stdProfile"], dtype=float)
        c = s[:, None] * c * s[None, :]
    return c + (prior.get("nugget") or 0.0) * np.eye(len(p))


def main():
    out = []
    for case in json.load(sys.stdin):
        p = np.asarray(case["centres"], dtype=float)
        prior = case["prior"]
        cm = covariance(p, prior)
        m = prior["mean"]
        if "constant" in m:
            m0 = np.full(len(p), float(m["constant"]))
        elif "values" in m:
            m0 = np.asarray(m["values"], dtype=float)
        else:
            m0 = m["trend"]["intercept"] + p @ np.asarray(m["trend"]["slope"], dtype=float)
        G = np.asarray(case["G"], dtype=float).reshape(len(case["d"]), len(p))
        d = np.asarray(case["d"], dtype=float)
        w = 1.0 / np.asarray(case["sigma"], dtype=float) ** 2
        A = G.T @ (w[:, None] * G) + linalg.cho_solve(linalg.cho_factor(cm), np.eye(len(p)))
        fa = linalg.cho_factor(A)
        mean = m0 + linalg.cho_solve(fa, G.T @ (w * (d - G @ m0)))
        std = np.sqrt(np.diag(linalg.cho_solve(fa, np.eye(len(p)))))
        ev = np.linalg.eigvalsh(cm)
        out.append(
            {"Cm": cm.ravel().tolist(), "m0": m0.tolist(), "mean": mean.tolist(), "std": std.tolist(), "eig": [ev[0], ev[-1]]}
        )
    json.dump(out, sys.stdout)


main()
