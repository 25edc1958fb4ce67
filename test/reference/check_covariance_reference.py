"""Matrices for `priorscope check --covariance`, written with numpy / scipy.io and described by numpy.

Input JSON {"dir": folder}. Writes seeded matrices (numpy.random.default_rng) as .npy (numpy.save),
.mtx (scipy.io.mmwrite) and .csv (numpy.savetxt), and prints for each the extreme eigenvalues from
numpy.linalg.eigvalsh (LAPACK) and the 2-norm condition number numpy.linalg.cond.
"""
import json
import os
import sys

import numpy as np
import scipy.io

args = json.load(sys.stdin)
d = args["dir"]
rng = np.random.default_rng(20261204)
out = {}


def describe(name, c):
    ev = np.linalg.eigvalsh(c)
    out[name] = {"min": float(ev[0]), "max": float(ev[-1]), "cond": float(np.linalg.cond(c)) if ev[0] > 0 else None, "n": int(c.shape[0])}


a = rng.standard_normal((60, 60))
spd = a @ a.T / 60 + 0.05 * np.eye(60)
np.save(os.path.join(d, "spd.npy"), spd)
scipy.io.mmwrite(os.path.join(d, "spd.mtx"), spd)
np.savetxt(os.path.join(d, "spd.csv"), spd, delimiter=",", fmt="%.17g")
describe("spd", spd)

w, v = np.linalg.eigh(spd)
w[3] = -0.5  # one negative eigenvalue
indefinite = (v * w) @ v.T
indefinite = (indefinite + indefinite.T) / 2
np.save(os.path.join(d, "indefinite.npy"), indefinite)
describe("indefinite", indefinite)

asym = spd.copy()
asym[7, 2] += 1e-3
np.save(os.path.join(d, "asymmetric.npy"), asym)
np.save(os.path.join(d, "rectangular.npy"), rng.standard_normal((4, 5)))
json.dump(out, sys.stdout)
