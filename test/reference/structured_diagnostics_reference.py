"""Exact extreme eigenvalues for the FFT-route diagnostics checks (numpy.linalg.eigvalsh, LAPACK).

Input JSON {"cases": [{"grid": ..., "prior": ...}, ...]}. Each covariance Cm is built cell pair by
cell pair by reference_prior.covariance (none of the project's code), then all its eigenvalues
are computed with numpy.linalg.eigvalsh. Output {"cases": [{"min", "max", "n", "cond"}]} with
cond = numpy.linalg.cond(Cm) (2-norm, from the singular values) when Cm is positive definite.
"""
import json
import os
import sys

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from reference_prior import covariance  # noqa: E402

out = []
for case in json.load(sys.stdin)["cases"]:
    c = covariance(case["grid"], case["prior"])
    ev = np.linalg.eigvalsh(c)
    cond = float(np.linalg.cond(c)) if ev[0] > 0 else None
    out.append({"min": float(ev[0]), "max": float(ev[-1]), "n": int(c.shape[0]), "cond": cond})
json.dump({"cases": out}, sys.stdout)
