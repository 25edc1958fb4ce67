"""The dense numpy/scipy posterior as a whole script, for the command-line benchmark (test/bench/cases/cli.ts):
what a practitioner runs instead of `priorscope posterior`. Reads the problem that test/bench/cases/fft.ts
writes (bench-results/fft-problem-<grid>.json: grid, Matern 3/2 length, CSR operator, data, sigma), builds
Cm entry by entry, B = Cm G^T, K = G B + Cd, cho_factor(K), cho_solve for the mean, solve_triangular
for the standard deviations (test/bench/dense_route.py dense_mean), and writes {"mean", "std"} as JSON.

    python3 dense_posterior.py PROBLEM.json OUT.json
"""
import json
import sys
from pathlib import Path

import numpy as np
import scipy.sparse

sys.path.insert(0, str(Path(__file__).resolve().parent))
from dense_route import dense_mean  # noqa: E402


def main():
    p = json.loads(Path(sys.argv[1]).read_text())
    g = scipy.sparse.csr_matrix(
        (np.asarray(p["g"]["values"]), np.asarray(p["g"]["colIdx"]), np.asarray(p["g"]["rowPtr"])),
        shape=(p["g"]["rows"], p["g"]["cols"]),
    )
    mean, std = dense_mean(p, g, True)
    Path(sys.argv[2]).write_text(json.dumps({"mean": mean.tolist(), "std": std.tolist()}))


if __name__ == "__main__":
    main()
