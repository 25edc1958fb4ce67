"""Outside check of src/core/io/pieces.ts: numpy writes the data and covariance files, and
numpy.linalg.cholesky decides positive definiteness. Reads JSON on stdin, prints JSON."""
import base64, io, json, sys
import numpy as np

req = json.load(sys.stdin)
rng = np.random.default_rng(req["seed"])
out = {"npy": [], "csv": [], "pd": []}
m = 5
for dtype, order in [("<f8", "C"), ("<f8", "F"), ("<f4", "C"), (">f8", "F")]:
    a = np.empty((m, 2), dtype=dtype, order=order)
    a[:, 0] = rng.normal(size=m)
    a[:, 1] = rng.uniform(0.1, 2.0, size=m)
    buf = io.BytesIO()
    np.save(buf, a)
    out["npy"].append({"bytes": base64.b64encode(buf.getvalue()).decode(), "values": a[:, 0].astype(float).tolist(),
                        "sigma": a[:, 1].astype(float).tolist()})
for header in [True, False]:
    a = np.column_stack([rng.normal(size=m), rng.uniform(0.1, 2.0, size=m)])
    buf = io.StringIO()
    np.savetxt(buf, a, delimiter=",", header="value,sigma" if header else "", comments="")
    out["csv"].append({"text": buf.getvalue(), "values": a[:, 0].tolist(), "sigma": a[:, 1].tolist()})
for k in range(12):
    b = rng.normal(size=(m, m))
    c = b @ b.T + (k - 6) * 0.5 * np.eye(m)   # some shifts make it indefinite
    c = (c + c.T) / 2
    try:
        np.linalg.cholesky(c)
        pd = True
    except np.linalg.LinAlgError:
        pd = False
    buf = io.StringIO()
    np.savetxt(buf, c, delimiter=",", fmt="%.17g")
    out["pd"].append({"text": buf.getvalue(), "pd": pd, "minEig": float(np.linalg.eigvalsh(c).min())})
print(json.dumps(out))
