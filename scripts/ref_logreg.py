#!/usr/bin/python3
"""Reference coefficients of L2-penalised logistic regression (multinomial,
and binary for the two-class cases) from scikit-learn, for the tests of
fringe/baselines (LogReg).

Run with the Debian interpreter (python3-sklearn 1.2.1, numpy 1.24.2):

    /usr/bin/python3 scripts/ref_logreg.py

writes baselines/testdata/logreg_reference.json (scripts/check-references.sh
reruns it and compares).

Every case is fitted twice, with

    LogisticRegression(C=C, multi_class='multinomial', solver='lbfgs',
                       tol=1e-10, max_iter=10000)
    LogisticRegression(C=C, multi_class='multinomial', solver='newton-cg',
                       tol=1e-10, max_iter=10000)

The two-class cases are also fitted in scikit-learn's default binary form
(multi_class='auto', one weight vector; keys binary_lbfgs, binary_newton_cg):

    LogisticRegression(C=C, solver='lbfgs', tol=1e-10, max_iter=10000)
    LogisticRegression(C=C, solver='newton-cg', tol=1e-10, max_iter=10000)

minimising sum_i log(1 + exp(-s_i t_i)) + ||w||^2 / (2C), t_i = w x_i + c,
with the gradient and the smallest Hessian eigenvalue of that objective
recorded in the same way (its Hessian is positive definite: no flat
direction).

The lbfgs fit stops on scipy's L-BFGS-B default relative-decrease test
(ftol = 2.2e-9, not exposed by scikit-learn 1.2.1) long before its gradient
reaches tol: on iris-std the gradient at its answer is 1.4e-4 and the
coefficients are about 1e-4 from the exact minimiser (1.5e-3 on
iris-raw-c0.1). The newton-cg fit of the same objective gets the gradient
to 1e-9 or below and is the precise reference; newton-cg may warn about
its line search or hit max_iter once the gradient is at rounding level,
which is harmless: the gradient recorded below is what counts.

on data derived from the Iris file shipped with scikit-learn (load_iris):
  iris-std        all 150 rows, z-scored with the mean and population standard
                  deviation of all rows (StandardScaler), 3 classes, C = 1
  iris-raw-c0.1   all 150 rows unscaled, 3 classes, C = 0.1
  iris-vv-std     versicolor (0) vs virginica (1), rows 50-149, z-scored over
                  those rows, C = 1 (the two-class case)
  iris-sv-raw-c10 setosa (0) vs virginica (1), rows 0-49 and 100-149, unscaled,
                  C = 10 (nearly separable: large coefficients)

scikit-learn 1.2.1 minimises sum_i CE_i + ||W||_F^2 / (2C) over the full
K x d matrix W and the unpenalised intercepts b (for K = 2 too, reporting
coef_ = W[1] and intercept_ = b[1]). For each case the script also records,
computed here with numpy at scikit-learn's solution, the infinity norm of
the gradient of that objective and the smallest eigenvalue mu of its Hessian
on the subspace sum_k b_k = 0 (the objective is flat along adding one
constant to every b_k). ||theta_sk - theta*||_2 <= ||g_sk||_2 / mu bounds the
distance of scikit-learn's answer from the exact minimiser, which justifies
the tolerance of the Go test.
"""
import json
import os
import re
import sys
import warnings

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_iris
from sklearn.linear_model import LogisticRegression
from sklearn.preprocessing import StandardScaler

CALL = ("LogisticRegression(C={C}, multi_class='multinomial', solver='{solver}', "
        "tol=1e-10, max_iter=10000)")
BINARY_CALL = "LogisticRegression(C={C}, solver='{solver}', tol=1e-10, max_iter=10000)"


def full_parameters(model, n_class):
    """The K x (d+1) matrix [W | b] scikit-learn optimised."""
    coef = model.coef_
    icpt = model.intercept_
    if n_class == 2:
        coef = np.vstack([-coef[0], coef[0]])
        icpt = np.array([-icpt[0], icpt[0]])
    return np.hstack([coef, icpt[:, None]])


def gradient_hessian(theta, x, y, C):
    """Gradient and Hessian of sum_i CE_i + ||W||^2/(2C) at theta
    (K x (d+1)), parameters ordered row by row."""
    n, d = x.shape
    k = theta.shape[0]
    xa = np.hstack([x, np.ones((n, 1))])
    z = xa @ theta.T
    z -= z.max(axis=1, keepdims=True)
    p = np.exp(z)
    p /= p.sum(axis=1, keepdims=True)
    yy = np.eye(k)[y]
    pen = np.ones(d + 1) / C
    pen[d] = 0.0
    grad = (p - yy).T @ xa + theta * pen
    hess = np.zeros((k * (d + 1), k * (d + 1)))
    for i in range(n):
        s = np.diag(p[i]) - np.outer(p[i], p[i])
        hess += np.kron(s, np.outer(xa[i], xa[i]))
    hess += np.diag(np.tile(pen, k))
    return grad, hess


def smallest_eigenvalue_off_intercept_shift(hess, k, d):
    """Smallest eigenvalue of hess restricted to the complement of the
    direction that adds one constant to every intercept."""
    v = np.zeros(k * (d + 1))
    v[d::d + 1] = 1.0
    v /= np.linalg.norm(v)
    proj = np.eye(len(v)) - np.outer(v, v)
    # Complement basis: eigenvectors of proj with eigenvalue 1.
    w, q = np.linalg.eigh(proj)
    basis = q[:, w > 0.5]
    return float(np.linalg.eigvalsh(basis.T @ hess @ basis).min())


def binary_gradient_hessian(coef, icpt, x, y, C):
    """Gradient and Hessian of sum_i softplus(t_i) - y_i t_i + ||w||^2/(2C),
    t = x w + c, at (w, c), parameters ordered (w, c)."""
    n, d = x.shape
    xa = np.hstack([x, np.ones((n, 1))])
    theta = np.append(coef, icpt)
    t = xa @ theta
    p = 0.5 * (1.0 + np.tanh(0.5 * t))  # sigma(t), no overflow
    pen = np.ones(d + 1) / C
    pen[d] = 0.0
    grad = xa.T @ (p - y) + theta * pen
    hess = (xa * (p * (1 - p))[:, None]).T @ xa + np.diag(pen)
    return grad, hess


def fit_binary(x, y, C, solver):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # as in fit
        model = LogisticRegression(C=C, solver=solver, tol=1e-10, max_iter=10000).fit(x, y)
    grad, hess = binary_gradient_hessian(model.coef_[0], model.intercept_[0], x, y, C)
    return {
        "call": BINARY_CALL.format(C=C, solver=solver),
        "coef": model.coef_.tolist(),
        "intercept": model.intercept_.tolist(),
        "proba": model.predict_proba(x).tolist(),
        "predicted": model.predict(x).tolist(),
        "n_iter": int(model.n_iter_[0]),
        "grad_inf_norm": float(np.abs(grad).max()),
        "grad_2_norm": float(np.linalg.norm(grad)),
        "hessian_min_eig": float(np.linalg.eigvalsh(hess).min()),
    }


def cases():
    iris = load_iris()
    x, y = iris.data, iris.target
    out = []
    out.append(("iris-std", StandardScaler().fit_transform(x), y, 1.0))
    out.append(("iris-raw-c0.1", x.copy(), y, 0.1))
    vv = y >= 1
    out.append(("iris-vv-std", StandardScaler().fit_transform(x[vv]), y[vv] - 1, 1.0))
    sv = y != 1
    out.append(("iris-sv-raw-c10", x[sv].copy(), np.where(y[sv] == 2, 1, 0), 10.0))
    return out


def fit(x, y, C, solver):
    n_class = int(y.max()) + 1
    with warnings.catch_warnings():
        # newton-cg warns once the gradient is at rounding level; see above.
        warnings.simplefilter("ignore")
        model = LogisticRegression(C=C, multi_class="multinomial", solver=solver,
                                   tol=1e-10, max_iter=10000).fit(x, y)
    theta = full_parameters(model, n_class)
    grad, hess = gradient_hessian(theta, x, y, C)
    mu = smallest_eigenvalue_off_intercept_shift(hess, n_class, x.shape[1])
    return {
        "call": CALL.format(C=C, solver=solver),
        "coef": model.coef_.tolist(),
        "intercept": model.intercept_.tolist(),
        "proba": model.predict_proba(x).tolist(),
        "predicted": model.predict(x).tolist(),
        "n_iter": int(model.n_iter_[0]),
        "grad_inf_norm": float(np.abs(grad).max()),
        "grad_2_norm": float(np.linalg.norm(grad)),
        "hessian_min_eig": mu,
    }


def main():
    entries = []
    for name, x, y, C in cases():
        entry = {
            "name": name,
            "C": C,
            "x": x.tolist(),
            "y": y.tolist(),
            "n_class": int(y.max()) + 1,
            "lbfgs": fit(x, y, C, "lbfgs"),
            "newton_cg": fit(x, y, C, "newton-cg"),
        }
        if entry["n_class"] == 2:
            entry["binary_lbfgs"] = fit_binary(x, y, C, "lbfgs")
            entry["binary_newton_cg"] = fit_binary(x, y, C, "newton-cg")
        entries.append(entry)
    doc = {
        "source": "scripts/ref_logreg.py",
        "versions": {"sklearn": sklearn.__version__, "numpy": np.__version__,
                     "scipy": scipy.__version__, "python": sys.version.split()[0]},
        "cases": entries,
    }
    text = json.dumps(doc, indent=1)
    # One line per innermost list of numbers keeps the fixture short and its
    # diffs readable.
    text = re.sub(r"\[\s*([-0-9.e+,\s]+?)\s*\]",
                  lambda m: "[" + ", ".join(m.group(1).split()).replace(",,", ",") + "]", text)
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "baselines",
                       "testdata", "logreg_reference.json")
    with open(out, "w") as f:
        f.write(text + "\n")


if __name__ == "__main__":
    main()
