"""Independent construction of prior covariances and means with numpy/scipy (Debian python3), shared by
the reference scripts in this folder (prior, posterior, FFT and command-line checks).

Built directly from the definitions, cell pair by cell pair, with none of the project's code:
  * cells (ix, iy) at origin + spacing * index, flat index ix + nx*iy (x fastest);
  * offset d = x_j - x_i; anisotropic terms rotate d by -angle (degrees counter-clockwise from +x to the
    first axis): u = cos t dx + sin t dy, v = -sin t dx + cos t dy, h = sqrt((u/l1)^2 + (v/l2)^2);
  * Matern correlation for every nu from the Bessel form (Rasmussen & Williams 2006, eq. 4.14)
    2^(1-nu)/Gamma(nu) (sqrt(2 nu) h)^nu K_nu(sqrt(2 nu) h) with scipy.special.kv / gamma, so the closed
    forms used in the project (R&W eq. 4.17) are checked, not copied;
  * exponential exp(-h), gaussian exp(-h^2/2), spherical 1 - 1.5 h + 0.5 h^3 for h < 1 else 0
    (the project's stated scalings, ../../src/core/kernels/correlation.ts doc);
  * Cm = S K S + nugget I with S = diag(stdProfile).
"""
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


def correlation(kernel, h, nu=None):
    h = np.asarray(h, dtype=float)
    if kernel == "exponential":
        return np.exp(-h)
    if kernel == "gaussian":
        return np.exp(-0.5 * h * h)
    if kernel == "spherical":
        return np.where(h < 1.0, 1.0 - 1.5 * h + 0.5 * h ** 3, 0.0)
    if kernel == "matern":
        return matern(h, 1.5 if nu is None else nu)
    raise ValueError(f"unknown kernel {kernel}")


def coordinates(grid):
    shape = grid["shape"]
    spacing = grid["spacing"]
    origin = grid.get("origin") or [0.0] * len(shape)
    nx = shape[0]
    ny = shape[1] if len(shape) == 2 else 1
    idx = np.arange(nx * ny)
    x = float(origin[0]) + float(spacing[0]) * (idx % nx)
    y = float(origin[1]) + float(spacing[1]) * (idx // nx) if len(shape) == 2 else np.zeros(nx * ny)
    return x, y


def covariance_at(prior, x, y):
    """Cm for cells at coordinates (x, y)."""
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    dx = x[None, :] - x[:, None]
    dy = y[None, :] - y[:, None]
    c = np.zeros_like(dx)
    for t in prior["terms"]:
        if t.get("lengths") is not None:
            l1, l2 = t["lengths"]
            th = np.deg2rad(t.get("angle") or 0.0)
            u = (np.cos(th) * dx + np.sin(th) * dy) / l1
            v = (-np.sin(th) * dx + np.cos(th) * dy) / l2
            h = np.hypot(u, v)
        else:
            h = np.hypot(dx, dy) / t["length"]
        c += t["variance"] * correlation(t["kernel"], h, t.get("nu"))
    if prior.get("stdProfile") is not None:
        s = np.asarray(prior["stdProfile"], dtype=float)
        c = s[:, None] * c * s[None, :]
    c += (prior.get("nugget") or 0.0) * np.eye(len(x))
    return c


def covariance(grid, prior):
    x, y = coordinates(grid)
    return covariance_at(prior, x, y)


def mean_vector(grid, prior):
    x, y = coordinates(grid)
    m = prior["mean"]
    if "constant" in m:
        return np.full(len(x), float(m["constant"]))
    if "values" in m:
        return np.asarray(m["values"], dtype=float)
    tr = m["trend"]
    slope = list(tr["slope"]) + [0.0]
    return tr["intercept"] + slope[0] * x + slope[1] * y


def rz(a):
    """Rotation about z by a (radians), written out (standard right-handed elementary rotation)."""
    c, s = np.cos(a), np.sin(a)
    return np.array([[c, -s, 0.0], [s, c, 0.0], [0.0, 0.0, 1.0]])


def ry(b):
    """Rotation about y by b (radians)."""
    c, s = np.cos(b), np.sin(b)
    return np.array([[c, 0.0, s], [0.0, 1.0, 0.0], [-s, 0.0, c]])


def rx(g):
    """Rotation about x by g (radians)."""
    c, s = np.cos(g), np.sin(g)
    return np.array([[1.0, 0.0, 0.0], [0.0, c, -s], [0.0, s, c]])
