"""Outside reference for src/core/wasm: Debian's numpy / scipy.

Reads JSON {"cases": [{"op": ..., ...}]} on stdin (matrices as {"rows", "cols", "data": row-major})
and prints {"results": [...]} in the same order.

ops:
  variance {"l", "bt", "pv", "c0", "c1"} -> {"var", "scale"}:
      W     = scipy.linalg.solve_triangular(l, bt[:, c0:c1], lower=True)
      s     = (W ** 2).sum(axis=0)
      var   = max(pv[c0:c1] - s, 0)
      scale = pv[c0:c1] + s   (the size the rounding error of var is relative to)
  gemm_nt  {"alpha", "a", "b", "c"} -> {"c": c + alpha * a @ b.T, "scale": |c| + |alpha| |a| @ |b|.T}
"""
import json
import sys

import numpy as np
import scipy.linalg


def to_np(m):
    return np.array(m["data"], dtype=np.float64).reshape(m["rows"], m["cols"])


def variance(case):
    l = to_np(case["l"])
    bt = to_np(case["bt"])
    c0, c1 = case["c0"], case["c1"]
    pv = np.array(case["pv"], dtype=np.float64)[c0:c1]
    w = scipy.linalg.solve_triangular(l, bt[:, c0:c1], lower=True)
    s = (w ** 2).sum(axis=0)
    return {"var": np.maximum(pv - s, 0.0).tolist(), "scale": (pv + s).tolist()}


def gemm_nt(case):
    alpha = float(case["alpha"])
    a, b, c = to_np(case["a"]), to_np(case["b"]), to_np(case["c"])
    out = c + alpha * (a @ b.T)
    scale = np.abs(c) + abs(alpha) * (np.abs(a) @ np.abs(b).T)
    return {"c": out.ravel().tolist(), "scale": scale.ravel().tolist()}


OPS = {"variance": variance, "gemm_nt": gemm_nt}


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [OPS[c["op"]](c) for c in cases]}, sys.stdout)


if __name__ == "__main__":
    main()
