"""Reference for the starting-prior rule (../../src/core/tuning/startPrior.ts) with numpy and scipy.

Written from the rule's statement in the un-whitened form, with none of the project's code:
  R  exponential correlation exp(-r/l), cell pair by cell pair (reference_prior.py),
  A  = G R G^T, g = G 1, K(s) = s A + Cd (numpy.linalg.solve for every K^-1 product),
  c(s) = g^T K^-1 d / g^T K^-1 g,   q(s) = (d - c g)^T K^-1 (d - c g),
  s solves q(s) = M - 1 (scipy.optimize.brentq on log s), floored at
  0.1 (M - 1) / t with t = tr(W A) - g^T W A W g / g^T W g, W = Cd^-1.
Also P(chi2_{M-1} <= M - 1) from scipy.stats.chi2 for the simulation check, and q at a given
variance for the replicates ("qAt").
Input: {"cases": [{"grid", "G": rows, "d", "sigma"?, "cov"?, "length", "qAt"?}]}.
"""
import json
import sys

import numpy as np
from scipy import optimize, stats

from reference_prior import covariance


def one(case):
    G = np.asarray(case["G"], dtype=float)
    d = np.asarray(case["d"], dtype=float)
    m = len(d)
    if case.get("cov") is not None:
        Cd = np.asarray(case["cov"], dtype=float)
    else:
        Cd = np.diag(np.asarray(case["sigma"], dtype=float) ** 2)
    prior = {"terms": [{"kernel": "exponential", "variance": 1.0, "length": case["length"]}]}
    R = covariance(case["grid"], prior)
    A = G @ R @ G.T
    g = G @ np.ones(G.shape[1])

    def at(s):
        K = s * A + Cd
        Kd = np.linalg.solve(K, d)
        Kg = np.linalg.solve(K, g)
        c = (g @ Kd) / (g @ Kg)
        r = d - c * g
        return c, r @ np.linalg.solve(K, r)

    W = np.linalg.solve(Cd, np.eye(m))
    Wg = W @ g
    t = np.trace(W @ A) - (Wg @ A @ Wg) / (g @ Wg)
    dof = m - 1
    floor = 0.1 * dof / t
    out = {"floor": floor, "chi2CdfAtDof": float(stats.chi2.cdf(dof, dof))}
    if at(floor)[1] <= dof:
        out.update({"variance": floor, "floored": True})
    else:
        hi = floor * 10
        while at(hi)[1] > dof:
            hi *= 10
        x = optimize.brentq(lambda u: at(np.exp(u))[1] - dof, np.log(floor), np.log(hi), xtol=1e-14, rtol=1e-14)
        out.update({"variance": float(np.exp(x)), "floored": False})
    c, q = at(out["variance"])
    out.update({"mean": c, "statistic": q})
    if case.get("qAt") is not None:
        out["qAtGiven"] = at(case["qAt"])[1]
    return out


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [one(c) for c in cases]}, sys.stdout)


main()
