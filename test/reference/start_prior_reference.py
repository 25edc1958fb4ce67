"""Reference for the starting-prior rule (../../src/core/tuning/startPrior.ts) with numpy only.

Written from the rule's statement in the un-whitened form, with none of the project's code:
  R  exponential correlation exp(-r/l) built cell pair by cell pair (reference_prior.py),
  A  = G R G^T,  W = Cd^-1 (numpy.linalg.solve),  g = G 1,
  c  = g^T W d / g^T W g                    (generalised least squares through G),
  r  = d - c g,  rr = r^T W r,  p = 1,
  t  = tr(W A) - g^T W A W g / g^T W g      (= tr(P A~) in the whitened form),
  s2 = (rr - (M - p)) / t, floored at 0.1 (M - p) / t.
Also returns tr(B^2) with B = P (s2 A~ + I) P in the whitened form, B = Cd^-1/2 ... computed as
tr((W S)^2) with S = (I - g g^T W / g^T W g)(s2 A + Cd)(I - W g g^T / g^T W g), the variance
of rr being 2 tr(B^2) (a Gaussian quadratic form; Mathai & Provost 1992, Thm 3.2b.2, memory).
Input: {"cases": [{"grid", "G": rows, "d", "sigma"? , "cov"?, "length", "s2true"?}]}.
"""
import json
import sys

import numpy as np

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
    W = np.linalg.solve(Cd, np.eye(m))
    W = 0.5 * (W + W.T)
    g = G @ np.ones(G.shape[1])
    gWg = g @ W @ g
    c = (g @ W @ d) / gWg
    r = d - c * g
    rr = r @ W @ r
    Wg = W @ g
    t = np.trace(W @ A) - (Wg @ A @ Wg) / gWg
    dof = m - 1
    s2 = (rr - dof) / t
    floor = 0.1 * dof / t
    out = {"mean": c, "momentVariance": s2, "variance": max(s2, floor), "floored": bool(not s2 > floor),
           "residualSquares": rr, "operatorTrace": t}
    if case.get("s2true") is not None:
        Pl = np.eye(m) - np.outer(g, Wg) / gWg
        S = Pl @ (case["s2true"] * A + Cd) @ Pl.T
        WS = W @ S
        out["trB2"] = float(np.trace(WS @ WS))
    return out


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [one(c) for c in cases]}, sys.stdout)


main()
