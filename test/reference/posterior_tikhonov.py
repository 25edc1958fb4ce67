"""Tikhonov solution for the Cd = s^2 I, Cm = t^2 I, m0 = 0 special case of the posterior mean
(Bardsley 2018, Computational UQ for Inverse Problems, section 4.1, memory):
  m = (A^T A + (s^2/t^2) I)^-1 A^T d, by numpy.linalg.solve, and again as the least-squares
solution of the stacked system [A; (s/t) I] m = [d; 0] by scipy.linalg.lstsq.
Input {"A": [row-major], "n": n, "d": [...], "sigma": s, "tau": t}."""
import json
import sys

import numpy as np
from scipy import linalg

q = json.load(sys.stdin)
n = q["n"]
A = np.asarray(q["A"], float).reshape(-1, n)
d = np.asarray(q["d"], float)
lam = (q["sigma"] / q["tau"]) ** 2
normal = np.linalg.solve(A.T @ A + lam * np.eye(n), A.T @ d)
stacked = linalg.lstsq(np.vstack([A, np.sqrt(lam) * np.eye(n)]), np.concatenate([d, np.zeros(n)]))[0]
json.dump({"normal": normal.tolist(), "stacked": stacked.tolist()}, sys.stdout)
