"""The general-purpose reference for `priorscope fit` in `npm run bench` (test/bench/cases/cli.ts): python3-sklearn's
GaussianProcessRegressor on the same point data, kernel ConstantKernel × Matérn(ν = 1.5) with the data variance as
alpha, started where our fit starts, L-BFGS-B, no restarts. Writes its maximised log marginal likelihood (which
includes −M/2 log 2π, like ours) and the fitted variance and length.

    python3 sklearn_fit.py INPUT.json OUTPUT.json
"""
import json
import sys

import numpy as np
from sklearn.gaussian_process import GaussianProcessRegressor
from sklearn.gaussian_process.kernels import ConstantKernel, Matern

q = json.load(open(sys.argv[1]))
X = np.array(q["X"], dtype=float)
y = np.array(q["y"], dtype=float)
kernel = ConstantKernel(q["variance"], (1e-8, 1e8)) * Matern(length_scale=q["length"], length_scale_bounds=(1e-4, 1e5), nu=1.5)
gp = GaussianProcessRegressor(kernel=kernel, alpha=q["sigma"] ** 2, optimizer="fmin_l_bfgs_b", n_restarts_optimizer=0, normalize_y=False)
gp.fit(X, y)
k = gp.kernel_
json.dump({"logEvidence": float(gp.log_marginal_likelihood_value_), "variance": float(k.k1.constant_value), "length": float(k.k2.length_scale)}, open(sys.argv[2], "w"))
