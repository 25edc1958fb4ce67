"""3-D .npy files written by numpy itself (Debian python3-numpy, numpy.save) for test/core/io/cellValues.test.ts:
a[iz, iy, ix] = ix + 10·iy + 100·iz + 0.25 of shape (nz, ny, nx), saved in C order and in Fortran order
(numpy.asfortranarray: the header says fortran_order True). Input {"shape": [nx, ny, nz]}; output base64 of both.
"""
import base64
import io
import json
import sys

import numpy as np

nx, ny, nz = json.load(sys.stdin)["shape"]
iz, iy, ix = np.meshgrid(np.arange(nz), np.arange(ny), np.arange(nx), indexing="ij")
a = ix + 10.0 * iy + 100.0 * iz + 0.25
out = {}
for name, arr in (("c", np.ascontiguousarray(a)), ("f", np.asfortranarray(a))):
    buf = io.BytesIO()
    np.save(buf, arr)
    out[name] = base64.b64encode(buf.getvalue()).decode()
print(json.dumps(out))
