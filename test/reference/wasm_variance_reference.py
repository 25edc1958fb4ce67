"""Outside reference for src/core/wasm/varianceBlock.ts: Debian's numpy / scipy.

Reads JSON {"cases": [{"l", "bt", "pv", "c0", "c1"}]} on stdin (matrices as {"rows", "cols",
"data": row-major}) and prints {"results": [{"var", "scale"}]} in the same order:
  W     = scipy.linalg.solve_triangular(l, bt[:, c0:c1], lower=True)
  s     = (W ** 2).sum(axis=0)
  var   = max(pv[c0:c1] - s, 0)
  scale = pv[c0:c1] + s   (the size the rounding error of var is relative to)
"""
import json
import sys

import numpy as np
import scipy.linalg


def to_np(m):
    return np.array(m["data"], dtype=np.float64).reshape(m["rows"], m["cols"])


def run(case):
    l = to_np(case["l"])
    bt = to_np(case["bt"])
    c0, c1 = case["c0"], case["c1"]
    pv = np.array(case["pv"], dtype=np.float64)[c0:c1]
    w = scipy.linalg.solve_triangular(l, bt[:, c0:c1], lower=True)
    s = (w ** 2).sum(axis=0)
    return {"var": np.maximum(pv - s, 0.0).tolist(), "scale": (pv + s).tolist()}


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump({"results": [run(c) for c in cases]}, sys.stdout)


if __name__ == "__main__":
    main()
