"""Outside check of the dense Cm and Cholesky-factor exports (src/app/session/exports.ts covarianceNpy):
numpy.load reads both .npy files and numpy.linalg.cholesky factors the exported Cm. Reads JSON
{cm: base64, L: base64}; prints the shapes, the largest |L_numpy - L_ours| and |L Lᵀ - Cm|, both relative to max |Cm|."""
import base64, io, json, sys
import numpy as np

req = json.load(sys.stdin)
cm = np.load(io.BytesIO(base64.b64decode(req["cm"])), allow_pickle=False)
L = np.load(io.BytesIO(base64.b64decode(req["L"])), allow_pickle=False)
ref = np.linalg.cholesky(cm)
scale = float(np.max(np.abs(cm)))
print(json.dumps({
    "shapes": [list(cm.shape), list(L.shape)],
    "dtype": str(L.dtype),
    "factorDiff": float(np.max(np.abs(ref - L))) / scale,
    "productDiff": float(np.max(np.abs(L @ L.T - cm))) / scale,
    "upperMax": float(np.max(np.abs(np.triu(L, 1)))),
}))
