"""Outside reference for the file formats: NumPy and SciPy write and read the files the parsers and
writers of src/core/io handle.

stdin:  {"mode": "write", "dir": D, "matrix": [[...]]}  -> writes files into D with numpy / scipy,
        returns {"files": {name: [[values as read back by numpy]]}}
        {"mode": "read", "files": {name: path}}          -> reads each file with numpy / scipy,
        returns {name: {"shape": [...], "values": [[...]] (C order)}}
Writers: numpy.save (format 1.0), numpy.lib.format.write_array with version (2, 0) and (3, 0),
float32 and big-endian dtypes, Fortran order; scipy.io.mmwrite (coordinate from a scipy.sparse matrix,
array from a dense one); numpy.savetxt with a header line.
"""
import json
import os
import sys

import numpy as np
import scipy.io as spio
import scipy.sparse as sp


def write(args):
    d = args["dir"]
    a = np.array(args["matrix"], dtype=float)
    out = {}

    def save(name, arr, version=None):
        with open(os.path.join(d, name), "wb") as f:
            if version is None:
                np.save(f, arr)
            else:
                np.lib.format.write_array(f, arr, version=version)
        out[name] = np.asarray(arr, dtype=float).tolist()

    save("v1.npy", a)
    save("v2.npy", a, (2, 0))
    save("v3.npy", a, (3, 0))
    save("f32.npy", a.astype("<f4"))
    save("big.npy", a.astype(">f8"))
    save("big32.npy", a.astype(">f4"))
    save("fortran.npy", np.asfortranarray(a))
    save("vector.npy", a[0].copy())
    spio.mmwrite(os.path.join(d, "coord.mtx"), sp.coo_matrix(a), precision=17)
    out["coord.mtx"] = a.tolist()
    spio.mmwrite(os.path.join(d, "array.mtx"), a, precision=17)
    out["array.mtx"] = a.tolist()
    sym = a[:, : a.shape[0]] if a.shape[1] >= a.shape[0] else a[: a.shape[1], :]
    sym = sym + sym.T
    spio.mmwrite(os.path.join(d, "sym.mtx"), sp.coo_matrix(sym), precision=17, symmetry="symmetric")
    out["sym.mtx"] = sym.tolist()
    np.savetxt(os.path.join(d, "table.csv"), a, delimiter=",", fmt="%.17g",
               header=",".join("c%d" % j for j in range(a.shape[1])), comments="")
    out["table.csv"] = a.tolist()
    return {"files": out}


def read(args):
    res = {}
    for name, path in args["files"].items():
        low = name.lower()
        if low.endswith(".npy"):
            arr = np.load(path)
        elif low.endswith(".mtx"):
            arr = spio.mmread(path)
            arr = arr.toarray() if hasattr(arr, "toarray") else np.asarray(arr)
        else:
            arr = np.loadtxt(path, delimiter=",", ndmin=2, skiprows=args.get("skiprows", {}).get(name, 0))
        arr = np.ascontiguousarray(arr, dtype=float)
        res[name] = {"shape": list(arr.shape), "dtype": str(np.load(path).dtype) if low.endswith(".npy") else "float64",
                     "values": arr.tolist()}
    return res


args = json.load(sys.stdin)
json.dump(write(args) if args["mode"] == "write" else read(args), sys.stdout)
