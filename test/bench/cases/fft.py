"""scipy side of the FFT-path cases in test/bench/cases/fft.ts: the dense route a practitioner
scripts (test/bench/dense_route.py: Cm entry by entry, B = Cm G^T, cho_factor, cho_solve,
solve_triangular for the standard deviations) on the same problem, so `npm run bench` reports
ours / dense in one run.

The problem (rays, data, sigma) is written by the TypeScript case's setup to
bench-results/fft-problem-<grid>.json (ours run before the scipy side); params carry only numbers.
"""
import importlib.util
import json
from pathlib import Path

import numpy as np
import scipy.sparse

_here = Path(__file__).resolve().parent
_spec = importlib.util.spec_from_file_location("bench_dense_route", _here.parent / "dense_route.py")
_route = importlib.util.module_from_spec(_spec)
_spec.loader.exec_module(_route)


def _load(params):
    path = _here.parent.parent.parent / "bench-results" / f"fft-problem-{int(params['grid'])}.json"
    if not path.exists():
        raise SystemExit(f"fft.py: {path} is missing (the TypeScript case's setup writes it; run through test/bench/run.ts)")
    p = json.loads(path.read_text())
    g = scipy.sparse.csr_matrix(
        (np.asarray(p["g"]["values"]), np.asarray(p["g"]["colIdx"]), np.asarray(p["g"]["rowPtr"])),
        shape=(p["g"]["rows"], p["g"]["cols"]),
    )
    return p, g


def op_mean(params):
    p, g = _load(params)
    return lambda: _route.dense_mean(p, g, False)


def op_mean_std(params):
    p, g = _load(params)
    return lambda: _route.dense_mean(p, g, True)


OPS = {"dense_route_mean": op_mean, "dense_route_mean_std": op_mean_std}
