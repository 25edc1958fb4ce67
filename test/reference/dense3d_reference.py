"""3-D prior covariance and model-space posterior with numpy/scipy (Debian python3), for test/reference/dense3d.test.ts.

Independent of the project's code:
  * cells of a regular grid from np.meshgrid(indexing="ij") over (z, y, x), flattened so that x runs fastest
    (flat index ix + nx*(iy + ny*iz)); or the given cell centres (cell lists);
  * rotation R = Rz(a1) @ Ry(a2) @ Rx(a3), each matrix written out explicitly as in the README's 3-D conventions (the standard
    right-handed elementary rotations; common practice, no source); (u, v, w) = R^T d, h = |diag(1/l) (u, v, w)|;
  * correlations from reference_prior.correlation (Matern by scipy.special.kv, Rasmussen & Williams 2006 eq. 4.14);
  * posterior in the model-space form (Tarantola 2005 eq. 3.37-3.38): C~ = (G^T Cd^-1 G + Cm^-1)^-1,
    m~ = m0 + C~ G^T Cd^-1 (d - G m0), by Cholesky solves (scipy.linalg.cho_factor / cho_solve).
"""
import json
import sys

import numpy as np
from scipy import linalg

from reference_prior import correlation, rx, ry, rz


def centres(case):
    if "cells" in case:
        p = np.asarray(case["cells"], dtype=float)
        return np.hstack([p, np.zeros((p.shape[0], 3 - p.shape[1]))])
    g = case["grid"]
    shape = list(g["shape"]) + [1] * (3 - len(g["shape"]))
    spacing = list(g["spacing"]) + [0.0] * (3 - len(g["spacing"]))
    origin = list(g.get("origin") or [0.0] * len(g["shape"])) + [0.0] * (3 - len(g["shape"]))
    iz, iy, ix = np.meshgrid(np.arange(shape[2]), np.arange(shape[1]), np.arange(shape[0]), indexing="ij")
    return np.stack([origin[k] + spacing[k] * i.ravel() for k, i in enumerate((ix, iy, iz))], axis=1)


def covariance(case):
    p = centres(case)
    prior = case["prior"]
    d = p[None, :, :] - p[:, None, :]  # d[i, j] = x_j - x_i
    c = np.zeros(d.shape[:2])
    for t in prior["terms"]:
        if t.get("lengths") is not None and len(t["lengths"]) == 3:
            R = rz(np.deg2rad(t["angles"][0])) @ ry(np.deg2rad(t["angles"][1])) @ rx(np.deg2rad(t["angles"][2]))
            uvw = d @ R  # row vector d R = (R^T d)^T
            h = np.linalg.norm(uvw / np.asarray(t["lengths"], dtype=float), axis=2)
        elif t.get("lengths") is not None:
            th = np.deg2rad(t.get("angle") or 0.0)
            R = rz(th)[:2, :2]
            uv = d[:, :, :2] @ R
            h = np.linalg.norm(uv / np.asarray(t["lengths"], dtype=float), axis=2)
        else:
            h = np.linalg.norm(d, axis=2) / t["length"]
        c += t["variance"] * correlation(t["kernel"], h, t.get("nu"))
    if prior.get("stdProfile") is not None:
        s = np.asarray(prior["stdProfile"], dtype=float)
        c = s[:, None] * c * s[None, :]
    c += (prior.get("nugget") or 0.0) * np.eye(len(p))
    return c, p


def main():
    out = []
    for case in json.load(sys.stdin):
        cm, p = covariance(case)
        m = case["prior"]["mean"]
        if "constant" in m:
            m0 = np.full(len(p), float(m["constant"]))
        else:
            sl = list(m["trend"]["slope"]) + [0.0] * (3 - len(m["trend"]["slope"]))
            m0 = m["trend"]["intercept"] + p @ np.asarray(sl)
        res = {"Cm": cm.ravel().tolist(), "m0": m0.tolist()}
        if case.get("eig"):
            ev = np.linalg.eigvalsh(cm)
            res["eig"] = [float(ev[0]), float(ev[-1])]
        if "G" in case:
            G = np.asarray(case["G"], dtype=float).reshape(len(case["d"]), len(p))
            d = np.asarray(case["d"], dtype=float)
            w = 1.0 / np.asarray(case["sigma"], dtype=float) ** 2
            A = G.T @ (w[:, None] * G) + linalg.cho_solve(linalg.cho_factor(cm), np.eye(len(p)))
            fa = linalg.cho_factor(A)
            post = linalg.cho_solve(fa, np.eye(len(p)))
            mean = m0 + linalg.cho_solve(fa, G.T @ (w * (d - G @ m0)))
            res["mean"] = mean.tolist()
            res["std"] = np.sqrt(np.diag(post)).tolist()
        out.append(res)
    json.dump(out, sys.stdout)


main()
