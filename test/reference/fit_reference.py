"""Independent reference for the data-fit χ² distribution (src/core/inverse/fitReference.ts).

Input {"cases": [{"weights": [...], "x": [...], "p": [...]}], "mc": {"draws": int, "seed": int},
       "matrices": [{"G": [[...]], "Cm": [[...]], "sigma": [...]}]}
Output per case: cdf at each x by Imhof's integral (Imhof 1961, Biometrika 48:419, eq. 3.2) evaluated
with scipy.integrate.quad on [0, inf) (QUADPACK qagi), quantiles at each p by scipy.optimize.brentq on
that cdf, and a Monte Carlo check with numpy (draws of sum_j w_j z_j^2). For each (G, Cm, sigma), K = G Cm G^T + Cd
with Cd = diag(sigma^2) and the weights as the generalised eigenvalues of Cd v = lambda K v (scipy.linalg.eigh(Cd, K)), which equal
the eigenvalues of L^-1 Cd L^-T without forming L (an independent route to the same weights).
"""
import json
import sys

import numpy as np
from scipy import integrate, linalg, optimize


def imhof_sf(w, x):
    w = np.asarray(w, dtype=float)

    def f(u):
        if u == 0.0:
            return 0.5 * (w.sum() - x)
        theta = 0.5 * np.arctan(w * u).sum() - 0.5 * x * u
        rho = np.exp(0.25 * np.log1p((w * u) ** 2).sum())
        return np.sin(theta) / (u * rho)

    # [0, u0]: plain adaptive quadrature; [u0, inf): the oscillation split off as
    # sin(A - w u) = sin A cos(w u) - cos A sin(w u), w = x/2, and each part integrated by QUADPACK's
    # Fourier-integral routine (quad with weight='cos'/'sin', QAWF), which handles the slowly decaying tail.
    u0 = min(max(1.0, 20 * np.pi / x), 1e6)
    head, _ = integrate.quad(f, 0, u0, limit=20000, epsabs=1e-13, epsrel=1e-12)
    om = 0.5 * x

    def amp(u, part):
        a = 0.5 * np.arctan(w * u).sum()
        rho = np.exp(0.25 * np.log1p((w * u) ** 2).sum())
        return (np.sin(a) if part == 0 else np.cos(a)) / (u * rho)

    t1, _ = integrate.quad(amp, u0, np.inf, args=(0,), weight="cos", wvar=om, limlst=200)
    t2, _ = integrate.quad(amp, u0, np.inf, args=(1,), weight="sin", wvar=om, limlst=200)
    return 0.5 + (head + t1 - t2) / np.pi


def main():
    req = json.load(sys.stdin)
    out = {"cases": [], "weights": []}
    mc = req.get("mc", {"draws": 0, "seed": 1})
    rng = np.random.default_rng(mc["seed"])
    for c in req.get("cases", []):
        w = np.asarray(c["weights"], dtype=float)
        cdf = [float(1.0 - imhof_sf(w, x)) for x in c["x"]]
        q = []
        for p in c["p"]:
            m = w.sum()
            hi = m + 20 * np.sqrt(2 * (w ** 2).sum()) + 10
            lo = m
            while 1.0 - imhof_sf(w, lo) > p:
                lo /= 4
            q.append(float(optimize.brentq(lambda x: (1.0 - imhof_sf(w, x)) - p, lo, hi, xtol=1e-14, rtol=1e-12)))
        mc_cdf = []
        if mc["draws"] > 0:
            s = np.zeros(mc["draws"])
            for wj in w:
                s += wj * rng.standard_normal(mc["draws"]) ** 2
            mc_cdf = [float(np.mean(s <= x)) for x in c["x"]]
        out["cases"].append({"cdf": cdf, "quantiles": q, "mcCdf": mc_cdf})
    for mat in req.get("matrices", []):
        G = np.asarray(mat["G"], dtype=float)
        Cm = np.asarray(mat["Cm"], dtype=float)
        Cd = np.diag(np.asarray(mat["sigma"], dtype=float) ** 2)
        K = G @ Cm @ G.T + Cd
        out["weights"].append(sorted(float(v) for v in linalg.eigh(Cd, K, eigvals_only=True)))
    json.dump(out, sys.stdout)


main()
