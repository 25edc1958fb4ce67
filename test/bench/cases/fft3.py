"""scipy side of test/bench/cases/fft3.ts: the dense route a practitioner scripts on the 3-D problem the TypeScript
case writes (bench-results/fft3-problem-<n>.json): Cm from cdist over the cell centres (x fastest, Matérn 3/2,
R&W 2006 eq. 4.17), B = Cm G^T, K = G B + Cd, cho_factor, cho_solve for the mean, solve_triangular for the
standard deviations (as test/bench/dense_route.py does in 2-D).
"""
import json
from pathlib import Path

import numpy as np
import scipy.linalg
import scipy.sparse
from scipy.spatial.distance import cdist

_results = Path(__file__).resolve().parent.parent.parent.parent / "bench-results"


def _load(params):
    """The problem the TypeScript case wrote, and its G as a scipy CSR matrix."""
    path = _results / f"fft3-problem-{int(params['n'])}.json"
    if not path.exists():
        raise SystemExit(f"fft3.py: {path} is missing (the TypeScript case's setup writes it; run through test/bench/run.ts)")
    p = json.loads(path.read_text())
    g = scipy.sparse.csr_matrix(
        (np.asarray(p["g"]["values"]), np.asarray(p["g"]["colIdx"]), np.asarray(p["g"]["rowPtr"])),
        shape=(p["g"]["rows"], p["g"]["cols"]),
    )
    return p, g


def _cm(p):
    """Dense Cm over the cell centres (x fastest), Matérn 3/2 (R&W 2006 eq. 4.17)."""
    nx, ny, nz = p["grid"]["shape"]
    dx, dy, dz = p["grid"]["spacing"]
    iz, iy, ix = np.meshgrid(np.arange(nz), np.arange(ny), np.arange(nx), indexing="ij")
    pts = np.column_stack([ix.ravel() * dx, iy.ravel() * dy, iz.ravel() * dz])
    r = cdist(pts, pts)
    r *= np.sqrt(3.0) / p["length"]
    return (1.0 + r) * np.exp(-r)


def _route(p, g):
    cm = _cm(p)
    d = np.asarray(p["d"])
    sigma = np.asarray(p["sigma"])
    b = (g @ cm).T
    k = g @ b + np.diag(sigma**2)
    cf = scipy.linalg.cho_factor(k, lower=True)
    mean = b @ scipy.linalg.cho_solve(cf, d)
    w = scipy.linalg.solve_triangular(cf[0], b.T, lower=True)
    var = np.diag(cm) - np.einsum("ij,ij->j", w, w)
    return mean, np.sqrt(np.clip(var, 0, None))


def op_mean_std(params):
    p, g = _load(params)
    return lambda: _route(p, g)


def op_std_step(params):
    """The std step alone (what the exact standard deviations cost on any route that factors K): W = L^-1 B^T by
    solve_triangular, var = diag(Cm) - column sums of W squared; L, B and Cm built untimed."""
    p, g = _load(params)
    cm = _cm(p)
    b = (g @ cm).T
    k = g @ b + np.diag(np.asarray(p["sigma"]) ** 2)
    low = np.linalg.cholesky(k)
    bt = np.ascontiguousarray(b.T)
    diag = np.diag(cm).copy()

    def run():
        w = scipy.linalg.solve_triangular(low, bt, lower=True)
        return np.sqrt(np.clip(diag - np.einsum("ij,ij->j", w, w), 0, None))

    return run


OPS = {"dense_route_3d_mean_std": op_mean_std, "dense_route_3d_std_step": op_std_step}
