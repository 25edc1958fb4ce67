"""Outside check of the exports (src/app/session/exports.ts): numpy.load reads our .npy files and
numpy.loadtxt our CSV files. Reads JSON {npy: {name: base64}, csv: {name: text}}, prints shapes and values."""
import base64, io, json, sys
import numpy as np

req = json.load(sys.stdin)
out = {"npy": {}, "csv": {}}
for name, b64 in req["npy"].items():
    a = np.load(io.BytesIO(base64.b64decode(b64)), allow_pickle=False)
    out["npy"][name] = {"shape": list(a.shape), "dtype": str(a.dtype), "values": a.ravel(order="C").tolist()}
for name, text in req["csv"].items():
    header = text.split("\n", 1)[0].split(",")
    try:
        float(header[0])
        header = []  # no header line (realisations, as priorscope sample writes them)
    except ValueError:
        pass
    a = np.loadtxt(io.StringIO(text), delimiter=",", skiprows=1 if header else 0, ndmin=2)
    out["csv"][name] = {"header": header, "shape": list(a.shape), "values": a.ravel(order="C").tolist()}
print(json.dumps(out))
