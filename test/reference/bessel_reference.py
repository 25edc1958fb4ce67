"""Outside reference for src/core/special and the Matérn kernel: Debian's scipy.special.

stdin JSON (every key optional):
  {"kv": [[nu, x], ...], "kve": [[nu, x], ...], "matern": [[nu, h], ...],
   "gamma": [x, ...], "gammaln": [x, ...], "zetac": [k, ...], "exp1": [x, ...], "matern_log": [[nu, h], ...]}
stdout JSON: the same keys, each a list of floats (null where scipy's value is not finite or,
for matern, where a factor of the direct product over- or underflows).

Matérn (Rasmussen & Williams 2006 eq. 4.14): rho = 2^(1-nu)/Gamma(nu) * z^nu * K_nu(z), z = sqrt(2 nu) h,
computed as the plain product of scipy's gamma, power and kv in double precision.
matern_log (for large nu, where the product over/underflows) gives [ln rho, S] per pair (null where kve
overflows) with
ln rho = (1-nu) ln 2 - gammaln(nu) + nu ln z + ln kve(nu, z) - z and S the sum of the absolute values of
those terms (the rounding error of ln rho is a few eps * S).
"""
import json
import sys

import numpy as np
import scipy.special as sp


def clean(values):
    return [float(v) if np.isfinite(v) else None for v in values]


def matern(nu, h):
    if h == 0.0:
        return 1.0
    z = np.sqrt(2.0 * nu) * h
    with np.errstate(all="ignore"):
        c = 2.0 ** (1.0 - nu) / sp.gamma(nu)
        zn = z ** nu
        k = sp.kv(nu, z)
        parts = [c, zn, k]
        if not all(np.isfinite(p) and p > 1e-300 for p in parts):
            return float("nan")
        value = (c * zn) * k
    return value if value > 1e-300 else float("nan")


def matern_log(nu, h):
    z = np.sqrt(2.0 * nu) * h
    terms = [(1.0 - nu) * np.log(2.0), -sp.gammaln(nu), nu * np.log(z), np.log(sp.kve(nu, z)), -z]
    if not all(np.isfinite(t) for t in terms):
        return None
    return [float(sum(terms)), float(sum(abs(t) for t in terms))]


def main():
    req = json.load(sys.stdin)
    out = {}
    with np.errstate(all="ignore"):
        if "kv" in req:
            out["kv"] = clean([sp.kv(nu, x) for nu, x in req["kv"]])
        if "kve" in req:
            out["kve"] = clean([sp.kve(nu, x) for nu, x in req["kve"]])
        if "matern" in req:
            out["matern"] = clean([matern(nu, h) for nu, h in req["matern"]])
        if "gamma" in req:
            out["gamma"] = clean(sp.gamma(np.array(req["gamma"], dtype=float)))
        if "gammaln" in req:
            out["gammaln"] = clean(sp.gammaln(np.array(req["gammaln"], dtype=float)))
        if "zetac" in req:
            out["zetac"] = clean(sp.zetac(np.array(req["zetac"], dtype=float)))
        if "exp1" in req:
            out["exp1"] = clean(sp.exp1(np.array(req["exp1"], dtype=float)))
        if "matern_log" in req:
            out["matern_log"] = [matern_log(nu, h) for nu, h in req["matern_log"]]
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
