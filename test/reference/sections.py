"""Sections of a volume by numpy slicing, independent of Priorscope's index arithmetic: the flat field (x fastest) is
reshaped to (nz, ny, nx) in C order, then x–y at iz is vol[iz, :, :] (rows y), x–z at iy is vol[:, iy, :] (rows z),
y–z at ix is vol[:, :, ix] (rows z). stdin: {"shape": [nx, ny, nz], "field": [...], "cell": [ix, iy, iz]}."""
import json
import sys

import numpy as np

req = json.load(sys.stdin)
nx, ny, nz = req["shape"]
ix, iy, iz = req["cell"]
vol = np.asarray(req["field"], dtype=np.float64).reshape((nz, ny, nx))
print(json.dumps({"xy": vol[iz, :, :].tolist(), "xz": vol[:, iy, :].tolist(), "yz": vol[:, :, ix].tolist()}))
