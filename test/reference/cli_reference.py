"""Outside reference for `priorscope posterior`: reads the same problem and prior files the binary
read and computes the posterior independently with numpy/scipy.

stdin:  {"problem": "/path/p.json", "prior": "/path/q.json"}
stdout: {"mean": [...], "std": [...], "predicted": [...], "residuals": [...], "chi2": x, "logEvidence": x}
With "tune": {"term": k, "lengths": [...], "variances": [...]} added to stdin, stdout is instead
{"logEvidence": [[...] one row per length]}: the same logpdf with term k's length (l1, and l2 scaled
in proportion for an anisotropic term) and variance replaced.

Deliberately a different route from the core's data-space form:
- covariance built entry by entry from the file's definitions (kernels/spec.ts): offset rotated
  by -angle, h = sqrt((u/l1)^2 + (v/l2)^2); Matern via scipy.special.kv per Rasmussen & Williams (2006)
  eq. 4.14: 2^(1-nu)/Gamma(nu) (sqrt(2 nu) h)^nu K_nu(sqrt(2 nu) h);
  Cm_ij = s_i s_j sum_t var_t rho_t(h_ij) + nugget delta_ij;
- posterior in model space (Tarantola 2005, sec. 3.2): C~ = (G^T Cd^-1 G + Cm^-1)^-1,
  m~ = m0 + C~ G^T Cd^-1 (d - G m0), using Cholesky solves (scipy.linalg.cho_factor / cho_solve);
- log-evidence: scipy.stats.multivariate_normal.logpdf(d, G m0, G Cm G^T + Cd).
"""
import json
import os
import sys

import numpy as np
from scipy import io as spio
from scipy import linalg, special, stats


def read_operator(spec, base, m, n):
    if "dense" in spec:
        return np.array(spec["dense"], dtype=float)
    if "sparse" in spec:
        g = np.zeros((m, n))
        s = spec["sparse"]
        for i, j, v in zip(s["rows"], s["cols"], s["values"]):
            g[i, j] += v  # duplicates summed
        return g
    path = os.path.join(base, spec["file"])
    low = path.lower()
    if low.endswith(".npy"):
        return np.load(path).astype(float)
    if low.endswith(".mtx"):
        a = spio.mmread(path)
        return a.toarray() if hasattr(a, "toarray") else np.asarray(a, dtype=float)
    return np.loadtxt(path, delimiter=",", ndmin=2)

from reference_prior import covariance_at  # noqa: E402  (shared independent construction)


def prior_covariance(Q, x, y, n):
    return covariance_at(Q, x, y)


def main():
    args = json.load(sys.stdin)
    with open(args["problem"]) as f:
        P = json.load(f)
    with open(args["prior"]) as f:
        Q = json.load(f)
    grid = P["grid"]
    shape = grid["shape"]
    nx = shape[0]
    ny = shape[1] if len(shape) == 2 else 1
    n = nx * ny
    dx = grid["spacing"][0]
    dy = grid["spacing"][1] if len(shape) == 2 else 0.0
    origin = grid.get("origin", [0.0] * len(shape))
    idx = np.arange(n)
    x = origin[0] + dx * (idx % nx)  # cell (ix, iy) has index ix + nx*iy
    y = (origin[1] if len(shape) == 2 else 0.0) + dy * (idx // nx)

    d = np.array(P["data"]["values"], dtype=float)
    m = d.size
    G = read_operator(P["operator"], os.path.dirname(args["problem"]), m, n)
    if "covariance" in P["data"]:
        Cd = np.array(P["data"]["covariance"], dtype=float)
    else:
        Cd = np.diag(np.array(P["data"]["sigma"], dtype=float) ** 2)

    mean = Q["mean"]
    if "constant" in mean:
        m0 = np.full(n, float(mean["constant"]))
    elif "values" in mean:
        m0 = np.array(mean["values"], dtype=float)
    else:
        t = mean["trend"]
        m0 = t["intercept"] + t["slope"][0] * x + (t["slope"][1] * y if len(t["slope"]) > 1 else 0.0)

    if "tune" in args:
        tune = args["tune"]
        k = tune["term"]
        grid_out = []
        for length in tune["lengths"]:
            row = []
            for variance in tune["variances"]:
                q = json.loads(json.dumps(Q))
                t = q["terms"][k]
                if "lengths" in t:
                    t["lengths"] = [length, t["lengths"][1] * length / t["lengths"][0]]
                else:
                    t["length"] = length
                t["variance"] = variance
                Cm = prior_covariance(q, x, y, n)
                row.append(float(stats.multivariate_normal.logpdf(d, mean=G @ m0, cov=G @ Cm @ G.T + Cd)))
            grid_out.append(row)
        json.dump({"logEvidence": grid_out}, sys.stdout)
        return

    Cm = prior_covariance(Q, x, y, n)
    cd = linalg.cho_factor(Cd, lower=True)
    cm = linalg.cho_factor(Cm, lower=True)
    A = G.T @ linalg.cho_solve(cd, G) + linalg.cho_solve(cm, np.eye(n))
    ca = linalg.cho_factor(A, lower=True)
    r0 = d - G @ m0
    mt = m0 + linalg.cho_solve(ca, G.T @ linalg.cho_solve(cd, r0))
    post_cov = linalg.cho_solve(ca, np.eye(n))
    pred = G @ mt
    Ld = linalg.cholesky(Cd, lower=True)
    res = linalg.solve_triangular(Ld, d - pred, lower=True)
    log_ev = stats.multivariate_normal.logpdf(d, mean=G @ m0, cov=G @ Cm @ G.T + Cd)
    json.dump(
        {
            "mean": mt.tolist(),
            "std": np.sqrt(np.diag(post_cov)).tolist(),
            "predicted": pred.tolist(),
            "residuals": res.tolist(),
            "chi2": float(res @ res),
            "logEvidence": float(log_ev),
            "conditionCm": float(np.linalg.cond(Cm)),
        },
        sys.stdout,
    )


main()
