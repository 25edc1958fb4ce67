"""sklearn side of the `fit` benchmark (test/bench/cases/fit.ts): one whole python3 process that reads the point-data
problem written by the case (JSON: X, y, alpha, nu, variance, length), fits scikit-learn's GaussianProcessRegressor
(Debian python3-sklearn) with ConstantKernel * Matern(nu) from the same start, no restarts, L-BFGS-B with tight
tolerances (gtol 1e-12, ftol 1e-15, as test/reference/typeii_sklearn.py), and writes
{"lml_opt", "theta_opt" (natural units), "lml_start"} to the output path.

    python3 fit_sklearn.py PROBLEM.json OUT.json
"""
import json
import sys

import numpy as np
from scipy.optimize import minimize
from sklearn.gaussian_process import GaussianProcessRegressor
from sklearn.gaussian_process.kernels import ConstantKernel, Matern


def tight_lbfgsb(obj_func, initial_theta, bounds):
    res = minimize(obj_func, initial_theta, method="L-BFGS-B", jac=True, bounds=bounds,
                   options={"gtol": 1e-12, "ftol": 1e-15, "maxiter": 20000, "maxfun": 40000})
    return res.x, res.fun


def main():
    with open(sys.argv[1]) as f:
        case = json.load(f)
    X = np.asarray(case["X"], dtype=float)
    y = np.asarray(case["y"], dtype=float)
    alpha = np.asarray(case["alpha"], dtype=float)
    kernel = ConstantKernel(case["variance"], (1e-8, 1e8)) * Matern(length_scale=case["length"], length_scale_bounds=(1e-6, 1e6), nu=case["nu"])
    gp = GaussianProcessRegressor(kernel=kernel, alpha=alpha, optimizer=tight_lbfgsb, n_restarts_optimizer=0, normalize_y=False).fit(X, y)
    with open(sys.argv[2], "w") as f:
        json.dump({"lml_opt": float(gp.log_marginal_likelihood_value_), "theta_opt": [float(v) for v in np.exp(gp.kernel_.theta)]}, f)


if __name__ == "__main__":
    main()
