"""Independent re-implementation of Hansen (1994) deriv2 / shaw / gravity with numpy and scipy.

Input JSON: {"sizes": [n, ...], "integrals": [n, ...]}
Output JSON: {"deriv2": {n: {A, x, b}}, "shaw": {...}, "gravity": {...},
              "continuous": {"shaw": {n: [...]}, "gravity": {n: [...]}}}

deriv2 is rebuilt from the kernel K(s,t) by Galerkin quadrature (not from Hansen's closed-form
entries): off-diagonal boxes lie on one side of s = t where K is bilinear, so 2-point Gauss-Legendre
is exact; diagonal boxes are split along s = t and integrated with scipy.integrate.dblquad.
shaw and gravity evaluate the kernels at the midpoints with numpy broadcasting (np.sinc handles u = 0).
"continuous" holds g(s_i) = ∫ K(s_i, t) f(t) dt by scipy.integrate.quad, the limit the midpoint-rule
right-hand side b converges to at O(h^2).
"""
import json
import sys

import numpy as np
from scipy import integrate


def deriv2_kernel(s, t):
    return np.where(s < t, s * (t - 1.0), t * (s - 1.0))


def deriv2(n):
    h = 1.0 / n
    g, w = np.polynomial.legendre.leggauss(2)
    A = np.zeros((n, n))
    for i in range(n):
        for j in range(n):
            lo_s, lo_t = i * h, j * h
            if i != j:
                s = lo_s + (g + 1) * h / 2
                t = lo_t + (g + 1) * h / 2
                S, T = np.meshgrid(s, t, indexing="ij")
                val = np.sum(np.outer(w, w) * deriv2_kernel(S, T)) * (h / 2) ** 2
            else:
                a, b = lo_s, lo_s + h
                # s < t part: t from s to b ; s >= t part: t from a to s
                v1, _ = integrate.dblquad(lambda t, s: s * (t - 1.0), a, b, lambda s: s, lambda s: b, epsabs=1e-15, epsrel=1e-13)
                v2, _ = integrate.dblquad(lambda t, s: t * (s - 1.0), a, b, lambda s: a, lambda s: s, epsabs=1e-15, epsrel=1e-13)
                val = v1 + v2
            A[i, j] = val / h  # two box functions of height h^(-1/2)
    x = np.array([integrate.quad(lambda t: t, i * h, (i + 1) * h, epsabs=1e-16)[0] / np.sqrt(h) for i in range(n)])
    return A, x


def shaw_kernel(s, t):
    u = np.pi * (np.sin(s) + np.sin(t))
    return (np.cos(s) + np.cos(t)) ** 2 * np.sinc(u / np.pi) ** 2


def shaw_solution(t):
    return 2 * np.exp(-6 * (t - 0.8) ** 2) + np.exp(-2 * (t + 0.5) ** 2)


def shaw(n):
    h = np.pi / n
    t = -np.pi / 2 + (np.arange(n) + 0.5) * h
    S, T = np.meshgrid(t, t, indexing="ij")
    A = h * shaw_kernel(S, T)
    return A, shaw_solution(t), t


DEPTH = 0.25


def gravity_kernel(s, t):
    return DEPTH / (DEPTH ** 2 + (s - t) ** 2) ** 1.5


def gravity_solution(t):
    return np.sin(np.pi * t) + 0.5 * np.sin(2 * np.pi * t)


def gravity(n):
    h = 1.0 / n
    t = (np.arange(n) + 0.5) * h
    S, T = np.meshgrid(t, t, indexing="ij")
    return h * gravity_kernel(S, T), gravity_solution(t), t


def pack(A, x):
    return {"A": A.tolist(), "x": x.tolist(), "b": (A @ x).tolist()}


def main():
    req = json.load(sys.stdin)
    out = {"deriv2": {}, "shaw": {}, "gravity": {}, "continuous": {"shaw": {}, "gravity": {}}}
    for n in req.get("sizes", []):
        A, x = deriv2(n)
        out["deriv2"][str(n)] = pack(A, x)
        A, x, _ = shaw(n)
        out["shaw"][str(n)] = pack(A, x)
        A, x, _ = gravity(n)
        out["gravity"][str(n)] = pack(A, x)
    for n in req.get("integrals", []):
        _, _, s = shaw(n)
        out["continuous"]["shaw"][str(n)] = [
            integrate.quad(lambda t: shaw_kernel(si, t) * shaw_solution(t), -np.pi / 2, np.pi / 2, epsabs=1e-13, limit=200)[0]
            for si in s
        ]
        _, _, s = gravity(n)
        out["continuous"]["gravity"][str(n)] = [
            integrate.quad(lambda t: gravity_kernel(si, t) * gravity_solution(t), 0, 1, epsabs=1e-13, limit=200)[0]
            for si in s
        ]
    json.dump(out, sys.stdout)


main()
