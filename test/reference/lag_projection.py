"""P = G Cm Gᵀ built independently with numpy (test/core/tuning/lagProjection.test.ts).

Cm from cell coordinates: term 1 exponential e^(−h) with rotated lengths (h = √((u/l1)² + (v/l2)²), (u, v) the
offset turned by −θ), term 2 Gaussian e^(−h²/2) with one length (textbook forms, Rasmussen & Williams 2006 ch. 4),
scaled by the std profile s (s_i s_j), nugget η on the diagonal; G from its coordinates.
"""
import json, sys
import numpy as np

q = json.load(sys.stdin)
x = np.array(q["x"]); y = np.array(q["y"])
dx = x[None, :] - x[:, None]; dy = y[None, :] - y[:, None]
t1, t2 = q["t1"], q["t2"]
th = np.radians(t1["angle"])
u = np.cos(th) * dx + np.sin(th) * dy
v = -np.sin(th) * dx + np.cos(th) * dy
h1 = np.sqrt((u / t1["l1"]) ** 2 + (v / t1["l2"]) ** 2)
h2 = np.sqrt(dx ** 2 + dy ** 2) / t2["length"]
C = t1["variance"] * np.exp(-h1) + t2["variance"] * np.exp(-0.5 * h2 ** 2)
s = np.array(q["s"])
C = s[:, None] * s[None, :] * C + q["nugget"] * np.eye(len(x))
G = np.zeros((q["m"], len(x)))
for r, c, val in zip(q["rows"], q["cols"], q["values"]):
    G[r, c] += val
print(json.dumps({"P": (G @ C @ G.T).ravel().tolist()}))
