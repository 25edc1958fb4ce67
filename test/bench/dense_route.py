"""The dense route with Debian's numpy/scipy, for the FFT-path benchmark (test/bench/cases/fft.ts).

What a practitioner scripts today: build Cm (N x N) from the kernel, B = Cm G^T, K = G B + Cd,
scipy.linalg.cho_factor(K), alpha = cho_solve(K, d - G m0), mean = m0 + B alpha; for the standard
deviations W = solve_triangular(L, B^T) and var = diag(Cm) - sum(W^2, axis=0).

Reads JSON on stdin:
  {"problems": [{"name", "grid": {"shape", "spacing"}, "length", "g": {"rows", "cols", "rowPtr",
    "colIdx", "values"}, "d", "sigma", "runs"}], "fft": {"sizes1d": [...], "sizes2d": [...]}}
Matérn nu = 1.5, variance 1, isotropic `length`, constant mean 0 (Rasmussen & Williams 2006,
eq. 4.17). Prints {"problems": [{"name", "mean_s", "mean_std_s" (medians), "mean_min_s", "mean_std_min_s",
"peak_rss_mb", "mean", "std"}],
"fft": [...], "blas": ...}. Run by fft.ts with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE removed
from this child's environment only.
"""
import json
import resource
import statistics
import sys
import time

import numpy as np
import scipy
import scipy.linalg
import scipy.sparse
from scipy.spatial.distance import cdist


def coordinates(grid):
    nx, ny = grid["shape"]
    dx, dy = grid["spacing"]
    iy, ix = np.meshgrid(np.arange(ny), np.arange(nx), indexing="ij")
    return np.column_stack([ix.ravel() * dx, iy.ravel() * dy])


def matern15(points, length):
    r = cdist(points, points)
    r *= np.sqrt(3.0) / length
    c = 1.0 + r
    np.negative(r, out=r)
    np.exp(r, out=r)
    c *= r
    return c


def dense_mean(p, g, want_std):
    points = coordinates(p["grid"])
    cm = matern15(points, p["length"])
    d = np.asarray(p["d"])
    sigma = np.asarray(p["sigma"])
    m0 = np.zeros(cm.shape[0])
    b = (g @ cm).T  # Cm G^T (N x M); Cm is symmetric
    k = g @ b + np.diag(sigma**2)
    cf = scipy.linalg.cho_factor(k, lower=True)
    alpha = scipy.linalg.cho_solve(cf, d - g @ m0)
    mean = m0 + b @ alpha
    if not want_std:
        return mean, None
    w = scipy.linalg.solve_triangular(cf[0], b.T, lower=True)
    var = np.diag(cm) - np.einsum("ij,ij->j", w, w)
    return mean, np.sqrt(np.clip(var, 0, None))


def time_runs(fn, runs):
    times = []
    out = None
    for _ in range(runs):
        t0 = time.perf_counter()
        out = fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times), times, out


def fft_timings(spec):
    rng = np.random.default_rng(1)
    out = []
    for n in spec.get("sizes1d", []):
        a = rng.standard_normal(n) + 1j * rng.standard_normal(n)
        reps = max(20, int(2e6 // n))
        np.fft.fft(a)
        t0 = time.perf_counter()
        for _ in range(reps):
            np.fft.fft(a)
        out.append({"kind": "fft 1-D complex", "size": [n], "seconds": (time.perf_counter() - t0) / reps})
    for n in spec.get("sizes2d", []):
        a = rng.standard_normal((n, n)) + 1j * rng.standard_normal((n, n))
        np.fft.fft2(a)
        med, _, _ = time_runs(lambda: np.fft.fft2(a), 7)
        out.append({"kind": "fft2 complex", "size": [n, n], "seconds": med})
        r = rng.standard_normal((n, n))
        med, _, _ = time_runs(lambda: np.fft.rfft2(r), 7)
        out.append({"kind": "rfft2 real input", "size": [n, n], "seconds": med})
    return out


def main():
    req = json.load(sys.stdin)
    results = []
    for p in req.get("problems", []):
        g = scipy.sparse.csr_matrix(
            (np.asarray(p["g"]["values"]), np.asarray(p["g"]["colIdx"]), np.asarray(p["g"]["rowPtr"])),
            shape=(p["g"]["rows"], p["g"]["cols"]),
        )
        runs = int(p.get("runs", 3))
        mean_s, mean_times, _ = time_runs(lambda: dense_mean(p, g, False), runs)
        std_s, std_times, (mean, std) = time_runs(lambda: dense_mean(p, g, True), runs)
        results.append({
            "name": p["name"],
            "mean_s": mean_s,
            "mean_min_s": min(mean_times),
            "mean_times_s": mean_times,
            "mean_std_s": std_s,
            "mean_std_min_s": min(std_times),
            "mean_std_times_s": std_times,
            "peak_rss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024,
            "mean": mean.tolist(),
            "std": std.tolist(),
        })
    blas = None
    try:
        from threadpoolctl import threadpool_info  # optional
        blas = threadpool_info()
    except Exception:
        blas = {"numpy": np.__version__, "scipy": scipy.__version__}
    json.dump({"problems": results, "fft": fft_timings(req.get("fft", {})), "blas": blas}, sys.stdout)


if __name__ == "__main__":
    main()
