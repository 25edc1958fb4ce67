"""Outside reference for src/core/fft and src/core/inverse/structured.ts: Debian's numpy / scipy.

Reads JSON {"cases": [{"op": ..., ...}]} on stdin and prints {"results": [...]} in the same order.
Complex arrays travel as {"re": [...], "im": [...]} in row-major order with x fastest, i.e. a numpy
array of shape (py, px).

ops:
  fft2        {"px", "py", "re", "im", "inverse"} -> numpy.fft.fft2 / numpy.fft.ifft2
  fft1        {"n", "count", "re", "im", "inverse"} -> numpy.fft.fft / numpy.fft.ifft of each of the
              count rows of length n (shape (count, n))
  cov_apply   {"grid", "prior", "x": [[...], ...]} -> Cm @ x for each vector, Cm built here from the
              kernel formulas (Matérn through scipy.special.kv, Rasmussen & Williams 2006 eq. 4.14)
  bccb_eigs   {"px", "py", "base"} -> numpy.linalg.eigvalsh of the explicitly formed block-circulant
              matrix C[i, j] = base[(jx - ix) mod px, (jy - iy) mod py] (no FFT involved), ascending
  posterior   {"grid", "prior", "g": {"rows", "cols", "data"}, "d", "sigma" | "cd"} -> scipy
              cho_factor / cho_solve of K = G Cm Gᵀ + Cd: mean, std, log evidence, trace of R, chi²
"""
import json
import math
import sys

import numpy as np
import scipy.linalg
import scipy.special

from reference_prior import covariance, mean_vector as _mean_vector  # noqa: E402  (shared independent construction)


def mean_vector(grid, prior, n):
    return _mean_vector(grid, prior)


def run(case):
    op = case["op"]
    if op == "fft2":
        a = (np.asarray(case["re"]) + 1j * np.asarray(case["im"])).reshape(case["py"], case["px"])
        b = np.fft.ifft2(a) if case.get("inverse") else np.fft.fft2(a)
        return {"re": b.real.ravel().tolist(), "im": b.imag.ravel().tolist()}
    if op == "fft1":
        a = (np.asarray(case["re"]) + 1j * np.asarray(case["im"])).reshape(case["count"], case["n"])
        b = np.fft.ifft(a, axis=1) if case.get("inverse") else np.fft.fft(a, axis=1)
        return {"re": b.real.ravel().tolist(), "im": b.imag.ravel().tolist()}
    if op == "cov_apply":
        c = covariance(case["grid"], case["prior"])
        x = np.asarray(case["x"], dtype=np.float64)
        return (x @ c.T).tolist()
    if op == "bccb_eigs":
        px, py = case["px"], case["py"]
        base = np.asarray(case["base"], dtype=np.float64).reshape(py, px)
        iy, ix = np.meshgrid(np.arange(py), np.arange(px), indexing="ij")
        ix = ix.ravel()
        iy = iy.ravel()
        c = base[(iy[None, :] - iy[:, None]) % py, (ix[None, :] - ix[:, None]) % px]
        return np.linalg.eigvalsh(0.5 * (c + c.T)).tolist()
    if op == "posterior":
        grid, prior = case["grid"], case["prior"]
        cm = covariance(grid, prior)
        n = cm.shape[0]
        gm = case["g"]
        g = np.asarray(gm["data"], dtype=np.float64).reshape(gm["rows"], gm["cols"])
        d = np.asarray(case["d"], dtype=np.float64)
        if "sigma" in case:
            sig = np.asarray(case["sigma"], dtype=np.float64)
            cd = np.diag(sig**2)
        else:
            cd = np.asarray(case["cd"], dtype=np.float64).reshape(len(d), len(d))
        m0 = mean_vector(grid, prior, n)
        b = cm @ g.T
        k = g @ b + cd
        cf = scipy.linalg.cho_factor(k, lower=True)
        r = d - g @ m0
        alpha = scipy.linalg.cho_solve(cf, r)
        mean = m0 + b @ alpha
        post = cm - b @ scipy.linalg.cho_solve(cf, b.T)
        std = np.sqrt(np.clip(np.diag(post), 0, None))
        lk = np.tril(cf[0])
        log_ev = -0.5 * r @ alpha - np.sum(np.log(np.diag(lk))) - 0.5 * len(d) * math.log(2 * math.pi)
        res = cm @ g.T @ scipy.linalg.cho_solve(cf, g)
        pred = g @ mean
        ld = np.linalg.cholesky(cd)
        nres = scipy.linalg.solve_triangular(ld, d - pred, lower=True)
        return {
            "mean": mean.tolist(),
            "std": std.tolist(),
            "logEvidence": float(log_ev),
            "resolutionTrace": float(np.trace(res)),
            "chi2": float(nres @ nres),
            "residuals": nres.tolist(),
        }
    raise ValueError(f"unknown op {op}")


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [run(c) for c in cases]}, sys.stdout)


if __name__ == "__main__":
    main()
