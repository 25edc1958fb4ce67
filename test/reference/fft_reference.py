"""Outside reference for src/core/fft and src/core/inverse/structured.ts: Debian's numpy / scipy.

Reads JSON {"cases": [{"op": ..., ...}]} on stdin and prints {"results": [...]} in the same order.
Complex arrays travel as {"re": [...], "im": [...]} in row-major order with x fastest, i.e. a numpy
array of shape (py, px).

ops:
  fft2        {"px", "py", "re", "im", "inverse"} -> numpy.fft.fft2 / numpy.fft.ifft2
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


def rho(kernel, h, nu):
    """Correlation at scaled distance h (our conventions, src/core/kernels/spec.ts)."""
    h = np.asarray(h, dtype=np.float64)
    if kernel == "exponential":
        return np.exp(-h)
    if kernel == "gaussian":
        return np.exp(-0.5 * h * h)
    if kernel == "spherical":
        return np.where(h < 1, 1 - 1.5 * h + 0.5 * h**3, 0.0)
    if kernel == "matern":
        # Rasmussen & Williams (2006) eq. 4.14: 2^(1-nu)/Gamma(nu) (sqrt(2 nu) h)^nu K_nu(sqrt(2 nu) h)
        z = math.sqrt(2 * nu) * h
        out = np.ones_like(z)
        pos = z > 0
        zp = z[pos]
        out[pos] = (2 ** (1 - nu) / scipy.special.gamma(nu)) * zp**nu * scipy.special.kv(nu, zp)
        return out
    raise ValueError(f"unknown kernel {kernel}")


def coordinates(grid):
    shape = grid["shape"]
    spacing = grid["spacing"]
    nx = shape[0]
    ny = shape[1] if len(shape) > 1 else 1
    dx = spacing[0]
    dy = spacing[1] if len(spacing) > 1 else 0.0
    iy, ix = np.meshgrid(np.arange(ny), np.arange(nx), indexing="ij")
    return (ix.ravel() * dx).astype(np.float64), (iy.ravel() * dy).astype(np.float64)


def covariance(grid, prior):
    x, y = coordinates(grid)
    ox = x[None, :] - x[:, None]
    oy = y[None, :] - y[:, None]
    c = np.zeros_like(ox)
    for t in prior["terms"]:
        if "lengths" in t:
            l1, l2 = t["lengths"]
            th = math.radians(t.get("angle", 0.0))
            u = (math.cos(th) * ox + math.sin(th) * oy) / l1
            v = (-math.sin(th) * ox + math.cos(th) * oy) / l2
            h = np.sqrt(u * u + v * v)
        else:
            h = np.sqrt(ox * ox + oy * oy) / t["length"]
        c += t["variance"] * rho(t["kernel"], h, t.get("nu", 1.5))
    s = prior.get("stdProfile")
    if s is not None:
        s = np.asarray(s, dtype=np.float64)
        c = s[:, None] * c * s[None, :]
    c += prior.get("nugget", 0.0) * np.eye(len(x))
    return c


def mean_vector(grid, prior, n):
    m = prior["mean"]
    if "constant" in m:
        return np.full(n, float(m["constant"]))
    if "values" in m:
        return np.asarray(m["values"], dtype=np.float64)
    x, y = coordinates(grid)
    tr = m["trend"]
    out = tr["intercept"] + tr["slope"][0] * x
    if len(tr["slope"]) > 1:
        out = out + tr["slope"][1] * y
    return out


def run(case):
    op = case["op"]
    if op == "fft2":
        a = (np.asarray(case["re"]) + 1j * np.asarray(case["im"])).reshape(case["py"], case["px"])
        b = np.fft.ifft2(a) if case.get("inverse") else np.fft.fft2(a)
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
