"""Outside reference for `priorscope fit`: scikit-learn's GaussianProcessRegressor (Debian python3-sklearn).

Point data (G selects cells) with independent errors is exactly sklearn's model: y ~ N(0, K(X, X) + diag(alpha)),
K = ConstantKernel(variance) * Matern(length_scale, nu) (nu 0.5: exp(-r/l); 1.5 / 2.5: Rasmussen & Williams 2006
eq. 4.17 closed forms; a vector length_scale scales each axis separately). sklearn's log_marginal_likelihood
includes the -n/2 log(2 pi) constant, as ours does.

Input JSON: {"cases": [{"X": [[x, y?], ...], "y": [...], "alpha": [sigma^2 ...], "nu", "variance", "length" (number
or [l1, l2]), "ours": [variance, length...] (our optimum, natural units)}]}
Output per case: {"lml_start", "lml_opt", "theta_opt" (natural units: variance, lengths...), "lml_at_ours",
"se_at_ours" (standard errors of the log parameters from the curvature of sklearn's LML at our optimum)}.
The optimiser is sklearn's default L-BFGS-B on its own objective and gradient, from the same start, without
restarts, with tight tolerances (so that its optimum, not its stopping rule, is compared).
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


def gp_grad(gp, theta):
    return np.asarray(gp.log_marginal_likelihood(theta, eval_gradient=True)[1], dtype=float)


def run(case):
    X = np.asarray(case["X"], dtype=float)
    y = np.asarray(case["y"], dtype=float)
    alpha = np.asarray(case["alpha"], dtype=float)
    length = case["length"]
    kernel = ConstantKernel(case["variance"], (1e-8, 1e8)) * Matern(length_scale=length, length_scale_bounds=(1e-6, 1e6), nu=case["nu"])
    start = GaussianProcessRegressor(kernel=kernel, alpha=alpha, optimizer=None, normalize_y=False).fit(X, y)
    gp = GaussianProcessRegressor(kernel=kernel, alpha=alpha, optimizer=tight_lbfgsb, n_restarts_optimizer=0, normalize_y=False).fit(X, y)
    ours = np.log(np.asarray(case["ours"], dtype=float))
    # Standard errors of the log parameters at our optimum: the observed information -d2 LML / d theta2 by
    # central differences of sklearn's analytic gradient (step 1e-4), symmetrised; se = sqrt(diag(J^-1)).
    p = len(ours)
    h = 1e-4
    J = np.zeros((p, p))
    for j in range(p):
        e = np.zeros(p)
        e[j] = h
        g_plus = gp_grad(gp, ours + e)
        g_minus = gp_grad(gp, ours - e)
        J[:, j] = -(g_plus - g_minus) / (2 * h)
    J = 0.5 * (J + J.T)
    se = np.sqrt(np.diag(np.linalg.solve(J, np.eye(p))))
    return {
        "se_at_ours": [float(v) for v in se],
        "lml_start": float(start.log_marginal_likelihood_value_),
        "lml_opt": float(gp.log_marginal_likelihood_value_),
        "theta_opt": [float(v) for v in np.exp(gp.kernel_.theta)],
        "lml_at_ours": float(gp.log_marginal_likelihood(ours)),
    }


def main():
    cases = json.load(sys.stdin)["cases"]
    json.dump([run(c) for c in cases], sys.stdout)


if __name__ == "__main__":
    main()
