"""Extreme eigenvalues of prior covariances with numpy.linalg.eigvalsh (LAPACK syevd).

Input JSON {"cases": [{"grid": ..., "prior": ...} | {"matrix": [[...]]}, ...]}; the covariance is
built independently by prior_reference.covariance. Output {"cases": [{"min", "max", "n"}]}.
"""
import json
import os
import sys

import numpy as np

sys.path.insert(0, os.path.dirname(os.path.abspath(__file__)))
from prior_reference import covariance  # noqa: E402

out = []
for case in json.load(sys.stdin)["cases"]:
    c = np.asarray(case["matrix"], dtype=float) if "matrix" in case else covariance(case["grid"], case["prior"])
    ev = np.linalg.eigvalsh(c)
    out.append({"min": float(ev[0]), "max": float(ev[-1]), "n": int(c.shape[0])})
json.dump({"cases": out}, sys.stdout)
