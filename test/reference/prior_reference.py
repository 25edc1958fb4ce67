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

from reference_prior import covariance, mean_vector as mean


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
