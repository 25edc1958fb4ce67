"""scipy/numpy side of the benchmark harness (test/bench/run.ts).

Reads JSON {"cases": [{"name", "op", "params", "runs", "warmup"}]} (or {"list_ops": true}) on stdin, builds inputs of the
given sizes, times each op (median of `runs` after `warmup`) and prints
{"blas": {...}, "results": [{"name", "median_s", "min_s", "times_s"}]}.

OPS maps an op name to setup(params) -> zero-argument callable. More ops come from plugins: every
test/bench/cases/*.py that defines a dict OPS of the same form (e.g. cases/posterior.py).
run.ts starts this script with OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE removed from the environment,
so OpenBLAS picks its own kernel; the "blas" field records what ran.
"""
import contextlib
import ctypes
import importlib.util
import io
import json
import os
import re
import statistics
import sys
import time
from pathlib import Path

import numpy as np
import scipy
import scipy.linalg


def bench_spd(n, seed=1):
    """Exponential correlation exp(-|xi - xj| / 0.1) of n random points in [0, 1] plus 0.1 I."""
    rng = np.random.default_rng(seed)
    x = rng.random(n)
    a = np.exp(-np.abs(x[:, None] - x[None, :]) / 0.1)
    a[np.diag_indices(n)] += 0.1
    return a


def random_dense(rows, cols, seed):
    return np.random.default_rng(seed).uniform(-1.0, 1.0, size=(rows, cols))


def op_cholesky(p):
    a = bench_spd(int(p["n"]))
    return lambda: np.linalg.cholesky(a)


def op_solve_lower(p):
    n, k = int(p["n"]), int(p["k"])
    l = np.linalg.cholesky(bench_spd(n))
    b = random_dense(n, k, 2)
    return lambda: scipy.linalg.solve_triangular(l, b, lower=True)


def op_solve_lower_rows(p):
    """Rows of b (n x m) solved against l (m x m): the same as solve_triangular(l, b.T)."""
    m, n = int(p["m"]), int(p["n"])
    l = np.linalg.cholesky(bench_spd(m))
    b = random_dense(n, m, 5)
    return lambda: scipy.linalg.solve_triangular(l, b.T, lower=True)


def op_symmetric_product(p):
    """g @ b, full (numpy has no half-product for a symmetric result of a general product)."""
    m, n = int(p["m"]), int(p["n"])
    g = random_dense(m, n, 6)
    b = random_dense(n, m, 7)
    return lambda: g @ b


def op_eigvalsh(p):
    a = bench_spd(int(p["n"]))
    return lambda: np.linalg.eigvalsh(a)


def op_matmul_nt(p):
    a = random_dense(int(p["m"]), int(p["k"]), 3)
    b = random_dense(int(p["n"]), int(p["k"]), 4)
    return lambda: a @ b.T


def op_matmul(p):
    a = random_dense(int(p["m"]), int(p["k"]), 3)
    b = random_dense(int(p["k"]), int(p["n"]), 4)
    return lambda: a @ b


OPS = {
    "cholesky": op_cholesky,
    "solve_lower": op_solve_lower,
    "solve_lower_rows": op_solve_lower_rows,
    "symmetric_product": op_symmetric_product,
    "eigvalsh": op_eigvalsh,
    "matmul_nt": op_matmul_nt,
    "matmul": op_matmul,
}


def load_plugins():
    cases_dir = Path(__file__).resolve().parent / "cases"
    for path in sorted(cases_dir.glob("*.py")):
        spec = importlib.util.spec_from_file_location(f"bench_plugin_{path.stem}", path)
        module = importlib.util.module_from_spec(spec)
        spec.loader.exec_module(module)
        for name, fn in getattr(module, "OPS", {}).items():
            if name in OPS:
                raise SystemExit(f"scipy_dense.py: op {name!r} from {path.name} is already defined")
            OPS[name] = fn


def blas_info():
    """Which BLAS is loaded, its kernel (core) and thread count, from OpenBLAS itself when possible."""
    info = {
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "cpu_count": os.cpu_count(),
        "env": {k: os.environ.get(k) for k in ("OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE", "OPENBLAS_NUM_THREADS", "OMP_NUM_THREADS")},
    }
    try:
        from threadpoolctl import threadpool_info  # type: ignore

        info["threadpoolctl"] = threadpool_info()
        return info
    except ImportError:
        pass
    maps = Path("/proc/self/maps").read_text() if Path("/proc/self/maps").exists() else ""
    libs = sorted(set(re.findall(r"(/\S*(?:blas|lapack)\S*\.so[.\d]*)", maps)))
    info["libraries"] = libs
    for lib in libs:
        if "openblas" not in os.path.basename(lib):
            continue
        try:
            dll = ctypes.CDLL(lib)
            dll.openblas_get_config.restype = ctypes.c_char_p
            dll.openblas_get_corename.restype = ctypes.c_char_p
            info["openblas"] = {
                "library": lib,
                "config": dll.openblas_get_config().decode(),
                "core": dll.openblas_get_corename().decode(),
                "threads": int(dll.openblas_get_num_threads()),
            }
        except (OSError, AttributeError) as e:
            info["openblas_error"] = str(e)
        break
    if "openblas" not in info:
        buf = io.StringIO()
        with contextlib.redirect_stdout(buf):
            np.show_config()
        info["numpy_show_config"] = buf.getvalue()[:2000]
    return info


def time_case(case):
    op = case["op"]
    if op not in OPS:
        raise SystemExit(f"scipy_dense.py: case {case['name']!r} asks for unknown op {op!r} (known: {', '.join(sorted(OPS))})")
    fn = OPS[op](case["params"])
    for _ in range(int(case.get("warmup", 1))):
        fn()
    times = []
    for _ in range(max(5, int(case.get("runs", 5)))):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return {"name": case["name"], "median_s": statistics.median(times), "min_s": min(times), "times_s": times}


def main():
    request = json.load(sys.stdin)
    load_plugins()
    if request.get("list_ops"):
        json.dump({"ops": sorted(OPS)}, sys.stdout)
        return
    # Touch BLAS once so its library is mapped before blas_info() looks for it.
    np.ones((4, 4)) @ np.ones((4, 4))
    results = [time_case(c) for c in request["cases"]]
    json.dump({"blas": blas_info(), "results": results}, sys.stdout)


if __name__ == "__main__":
    main()
