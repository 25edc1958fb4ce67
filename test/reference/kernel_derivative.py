"""dρ/dh of the Matérn correlation from scipy (Debian python3-scipy) for test/core/tuning/termDerivative.test.ts.

Formula (DLMF 10.29.4 with k = 1, d/dz [z^ν K_ν(z)] = −z^ν K_{ν−1}(z), and z = √(2ν) h; R&W 2006 eq. 4.14 scaling):
    dρ/dh = −√(2ν) 2^{1−ν} / Γ(ν) · z^ν K_{ν−1}(z)
evaluated with scipy.special.kv and gammaln in logs (K_{ν−1} = K_{1−ν}, DLMF 10.27.3, is what kv returns for a
negative order). Input {"nus": [...], "hs": [...]}; output {"values": [[dρ/dh at each h] for each ν]}.
"""
import json
import sys

import numpy as np
from scipy.special import gammaln, kve

p = json.load(sys.stdin)
hs = np.asarray(p["hs"], dtype=float)
out = []
for nu in p["nus"]:
    z = np.sqrt(2 * nu) * hs
    log_abs = 0.5 * np.log(2 * nu) + (1 - nu) * np.log(2) - gammaln(nu) + nu * np.log(z) + np.log(kve(nu - 1, z)) - z
    out.append((-np.exp(log_abs)).tolist())
print(json.dumps({"values": out}))
