"""Independent construction of prior covariances and means with numpy/scipy (Debian python3).

Reads JSON {"cases": [{"grid": ..., "prior": ..., "x": [...]?}, ...]} on stdin and prints
{"cases": [{"covariance": [[...]], "mean": [...], "product": [...]?}, ...]}.

Built directly from the definitions, cell pair by cell pair, with none of the project's code:
  * cells (ix, iy) at origin + spacing * index, flat index ix + nx*iy (x fastest);
  * offset d = x_j - x_i; anisotropic terms rotate d by -angle with a numpy rotation matrix
    [[cos t, sin t], [-sin t, cos t]] and scale by the lengths;
  * Matern correlation for every nu from the Bessel form (Rasmussen & Williams 2006, eq. 4.14)
    2^(1-nu)/Gamma(nu) (sqrt(2 nu) h)^nu K_nu(sqrt(2 nu) h) with scipy.special.kv / gamma,
    so the closed forms used in the project (R&W eq. 4.17) are checked, not copied;
  * exponential exp(-h), gaussian exp(-h^2/2), spherical 1 - 1.5 h + 0.5 h^3 for h < 1 else 0
    (the project's stated scalings, ../../src/core/kernels/correlation.ts doc);
  * Cm = S K S + nugget I with S = diag(stdProfile).
"""
import json
import sys

import numpy as np
from scipy import special


def matern(h, nu):
    h = np.asarray(h, dtype=float)
    out = np.ones_like(h)
    pos = h > 0
    z = np.sqrt(2.0 * nu) * h[pos]
    with np.errstate(under="ignore", over="ignore", invalid="ignore"):
        val = 2.0 ** (1.0 - nu) / special.gamma(nu) * z ** nu * special.kv(nu, z)
    val[~np.isfinite(val)] = 0.0  # K_nu underflow at very large z
    out[pos] = val
    return out


def correlation(kernel, h, nu):
    if kernel == "exponential":
        return np.exp(-h)
    if kernel == "gaussian":
        return np.exp(-0.5 * h * h)
    if kernel == "spherical":
        return np.where(h < 1.0, 1.0 - 1.5 * h + 0.5 * h ** 3, 0.0)
    if kernel == "matern":
        return matern(h, 1.5 if nu is None else nu)
    raise ValueError(kernel)


def coordinates(grid):
    shape = grid["shape"]
    spacing = grid["spacing"]
    origin = grid.get("origin", [0.0] * len(shape))
    nx = shape[0]
    ny = shape[1] if len(shape) == 2 else 1
    iy, ix = np.meshgrid(np.arange(ny), np.arange(nx), indexing="ij")  # rows iy, x fastest after ravel
    x = float(origin[0]) + float(spacing[0]) * ix.ravel().astype(float)
    y = (float(origin[1]) + float(spacing[1]) * iy.ravel().astype(float)) if len(shape) == 2 else np.zeros(nx)
    return x, y


def covariance(grid, prior):
    x, y = coordinates(grid)
    dx = x[None, :] - x[:, None]
    dy = y[None, :] - y[:, None]
    k = np.zeros_like(dx)
    for term in prior["terms"]:
        if "lengths" in term:
            t = np.deg2rad(term.get("angle", 0.0))
            rot = np.array([[np.cos(t), np.sin(t)], [-np.sin(t), np.cos(t)]])
            d = np.stack([dx.ravel(), dy.ravel()])
            uv = rot @ d
            l1, l2 = term["lengths"]
            h = np.sqrt((uv[0] / l1) ** 2 + (uv[1] / l2) ** 2).reshape(dx.shape)
        else:
            h = np.hypot(dx, dy) / term["length"]
        k += term["variance"] * correlation(term["kernel"], h, term.get("nu"))
    s = np.asarray(prior.get("stdProfile", np.ones(len(x))), dtype=float)
    c = (s[:, None] * k) * s[None, :]
    c += prior.get("nugget", 0.0) * np.eye(len(x))
    return c


def mean(grid, prior):
    x, y = coordinates(grid)
    m = prior["mean"]
    if "constant" in m:
        return np.full(len(x), float(m["constant"]))
    if "values" in m:
        return np.asarray(m["values"], dtype=float)
    slope = m["trend"]["slope"]
    out = m["trend"]["intercept"] + slope[0] * x
    if len(slope) > 1:
        out = out + slope[1] * y
    return out


def main():
    inp = json.load(sys.stdin)
    out = []
    for case in inp["cases"]:
        c = covariance(case["grid"], case["prior"])
        r = {"covariance": c.tolist(), "mean": mean(case["grid"], case["prior"]).tolist()}
        if "x" in case:
            r["product"] = (c @ np.asarray(case["x"], dtype=float)).tolist()
        out.append(r)
    json.dump({"cases": out}, sys.stdout)


if __name__ == "__main__":
    main()
