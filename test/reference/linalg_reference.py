"""Outside reference for src/core/linalg: Debian's numpy / scipy.

Reads JSON {"cases": [{"op": ..., ...}]} on stdin and prints {"results": [...]} in the same order.
Matrices travel as {"rows": r, "cols": c, "data": [row-major values]}.

ops:
  cholesky          {"a"}            -> numpy.linalg.cholesky(a) (lower), or {"failed": true} on LinAlgError
  solve_lower       {"l", "b"}       -> scipy.linalg.solve_triangular(l, b, lower=True)
  solve_lower_t     {"l", "b"}       -> scipy.linalg.solve_triangular(l, b, lower=True, trans='T')
  cho_solve         {"l", "b"}       -> scipy.linalg.cho_solve((l, True), b)  (A x = b with A = l lᵀ)
  eigvalsh          {"a"}            -> numpy.linalg.eigvalsh(a) (ascending; reads the lower triangle)
  eigh              {"a"}            -> numpy.linalg.eigh(a): values and vectors (columns)
  eigh_project      {"a", "b"}       -> eigh values and vᵀ b (rows: eigenvectors' projections of b)
  leading_minor_det {"a", "k"}       -> numpy.linalg.det(a[:k, :k]) for k = 1..k (sign pattern of minors)
  matmul            {"a", "b"}       -> a @ b
  colsumsq          {"a"}            -> (a ** 2).sum(axis=0)
  operator          {"g", "v", "u", "x", "c", "a", "b"}
                                     -> every product of src/core/linalg/operator.ts with G built densely
                                        from coordinates by numpy.add.at (duplicates summed): G v, Gᵀ u,
                                        G X, G C, A Gᵀ, G Bᵀ, G C Gᵀ, G Gᵀ, Σ_i |G_ij|, and G itself
"""
import json
import sys

import numpy as np
import scipy.linalg


def to_np(m):
    return np.array(m["data"], dtype=np.float64).reshape(m["rows"], m["cols"])


def from_np(a):
    a = np.atleast_2d(a)
    return {"rows": int(a.shape[0]), "cols": int(a.shape[1]), "data": a.ravel().tolist()}


def run(case):
    op = case["op"]
    if op == "cholesky":
        a = to_np(case["a"])
        try:
            return {"failed": False, "factor": from_np(np.linalg.cholesky(a))}
        except np.linalg.LinAlgError:
            return {"failed": True}
    if op == "solve_lower":
        return from_np(scipy.linalg.solve_triangular(to_np(case["l"]), to_np(case["b"]), lower=True))
    if op == "solve_lower_t":
        return from_np(scipy.linalg.solve_triangular(to_np(case["l"]), to_np(case["b"]), lower=True, trans="T"))
    if op == "cho_solve":
        return from_np(scipy.linalg.cho_solve((to_np(case["l"]), True), to_np(case["b"])))
    if op == "eigvalsh":
        return np.linalg.eigvalsh(to_np(case["a"]), UPLO="L").tolist()
    if op == "eigh":
        w, v = np.linalg.eigh(to_np(case["a"]), UPLO="L")
        return {"values": w.tolist(), "vectors": from_np(v)}
    if op == "eigh_project":
        w, v = np.linalg.eigh(to_np(case["a"]), UPLO="L")
        return {"values": w.tolist(), "projected": from_np(v.T @ to_np(case["b"]))}
    if op == "leading_minor_det":
        a = to_np(case["a"])
        return [float(np.linalg.det(a[:k, :k])) for k in range(1, case["k"] + 1)]
    if op == "colsumsq":
        return (to_np(case["a"]) ** 2).sum(axis=0).tolist()
    if op == "operator":
        g = case["g"]
        G = np.zeros((g["rows"], g["cols"]))
        np.add.at(G, (np.array(g["ri"], dtype=int), np.array(g["ci"], dtype=int)), np.array(g["v"], dtype=np.float64))
        C = to_np(case["c"])
        B = to_np(case["b"])
        return {
            "dense": from_np(G),
            "gv": (G @ np.array(case["v"])).tolist(),
            "gtu": (G.T @ np.array(case["u"])).tolist(),
            "gx": from_np(G @ to_np(case["x"])),
            "gc": from_np(G @ C),
            "agt": from_np(to_np(case["a"]) @ G.T),
            "gbt": from_np(G @ B.T),
            "gcgt": from_np(G @ C @ G.T),
            "ggt": from_np(G @ G.T),
            "abscolsums": np.abs(G).sum(axis=0).tolist(),
        }
    if op == "matmul":
        return from_np(to_np(case["a"]) @ to_np(case["b"]))
    raise ValueError(f"linalg_reference.py: unknown op {op!r}")


def main():
    request = json.load(sys.stdin)
    json.dump({"results": [run(c) for c in request["cases"]]}, sys.stdout)


if __name__ == "__main__":
    main()
