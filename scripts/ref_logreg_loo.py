#!/usr/bin/python3
"""Leave-one-out reference of scikit-learn's default two-class logistic
regression on Ionosphere and Breast Cancer, for the tests of
fringe/baselines (LogReg, binary form).

Run with the Debian interpreter (python3-sklearn 1.2.1, numpy 1.24.2):

    /usr/bin/python3 scripts/ref_logreg_loo.py

writes baselines/testdata/logreg_loo.json.

Data (every row):
  ionosphere     datasets/data/ionosphere.csv (the embedded file: a first
                 line "351,34,b,g", then 34 features and the class code),
                 class 1 = g is the positive class
  breast-cancer  sklearn.datasets.load_breast_cancer() (the file embedded as
                 datasets/data/breast_cancer.csv), class 1 = benign

For each row i: the other rows are the training part, StandardScaler() is
fitted on them and transforms both parts, and three models are fitted on
the scaled training part:

  default      LogisticRegression()  (C=1.0, solver='lbfgs', tol=1e-4,
               max_iter=100, multi_class='auto', i.e. the binary model)
  tight        LogisticRegression(solver='newton-cholesky', tol=1e-10,
               max_iter=100)  (same objective, Newton with a Cholesky
               solve: the precise minimiser; newton-cg at tol=1e-10 runs
               into its 10000 iterations here once the gradient is at
               rounding level)
  multinomial  LogisticRegression(multi_class='multinomial')  (the softmax
               form, equal to the binary model at C = 2)

and the prediction and decision value of row i recorded (decision_function;
for the multinomial model, whose coef_ and intercept_ keep W_1 and b_1 of a
fit with W_0 = -W_1, b_0 = -b_1, twice that: t = z_1 - z_0). The objective of the binary model is

  f(w, c) = sum_i log(1 + exp(-s_i t_i)) + ||w||^2 / (2C),  t_i = w x_i + c.

For every fold the script also computes with numpy, at the default and the
tight answers, the 2-norm of the gradient of f and, at the tight answer,
the smallest eigenvalue mu of its Hessian (and the same for the
multinomial answer (W_1, b_1) as the point 2 (W_1, b_1) of the binary
objective at C = 2): a point with gradient g lies
within ||g||_2 / mu of the minimiser (f is mu-strongly convex there), which
is what the Go test's tolerances are made of. Coefficients of the tight fit
are recorded for the folds i = 0, 25, 50, ... and for the fit on all rows.
"""
import json
import os
import re
import sys
import warnings

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_breast_cancer
from sklearn.linear_model import LogisticRegression
from sklearn.preprocessing import StandardScaler

HERE = os.path.dirname(os.path.abspath(__file__))
ROOT = os.path.join(HERE, "..")
OUT = os.path.join(ROOT, "baselines", "testdata", "logreg_loo.json")

DEFAULT = "LogisticRegression()"
TIGHT = "LogisticRegression(solver='newton-cholesky', tol=1e-10, max_iter=100)"
MULTI = "LogisticRegression(multi_class='multinomial')"
COEF_EVERY = 25


def ionosphere():
    path = os.path.join(ROOT, "datasets", "data", "ionosphere.csv")
    a = np.loadtxt(path, delimiter=",", skiprows=1)
    return a[:, :-1], a[:, -1].astype(int)


def breast_cancer():
    b = load_breast_cancer()
    return b.data, b.target


def grad_hess(w, c, x, y, C):
    """Gradient and Hessian of sum_i softplus(t_i) - y_i t_i + ||w||^2/(2C)
    at (w, c), parameters ordered (w, c)."""
    n, d = x.shape
    xa = np.hstack([x, np.ones((n, 1))])
    theta = np.append(w, c)
    t = xa @ theta
    p = 0.5 * (1.0 + np.tanh(0.5 * t))  # sigma(t) without overflow
    pen = np.ones(d + 1) / C
    pen[d] = 0.0
    grad = xa.T @ (p - y) + theta * pen
    hess = (xa * (p * (1 - p))[:, None]).T @ xa + np.diag(pen)
    return grad, hess


def fit(call, xt, yt):
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        if call == DEFAULT:
            m = LogisticRegression()
        elif call == TIGHT:
            m = LogisticRegression(solver="newton-cholesky", tol=1e-10, max_iter=100)
        else:
            m = LogisticRegression(multi_class="multinomial")
        m.fit(xt, yt)
    return m, [str(w.message).split("\n")[0] for w in caught]


def loo(name, x, y):
    n, d = x.shape
    C = 1.0
    rows = {k: [] for k in ("predicted_default", "decision_default", "n_iter_default",
                            "grad2_default", "decision_tight", "grad2_tight", "mu_tight",
                            "predicted_multinomial", "decision_multinomial",
                            "grad2_multinomial", "mu_multinomial")}
    coefs = []
    warned = []
    for i in range(n):
        tr = np.arange(n) != i
        sc = StandardScaler().fit(x[tr])
        xt, xs = sc.transform(x[tr]), sc.transform(x[i:i + 1])
        yt = y[tr]
        md, wd = fit(DEFAULT, xt, yt)
        mt, wt = fit(TIGHT, xt, yt)
        mm, wm = fit(MULTI, xt, yt)
        for call, ws in ((DEFAULT, wd), (TIGHT, wt), (MULTI, wm)):
            for w in ws:
                warned.append("row %d, %s: %s" % (i, call, w))
        gd, _ = grad_hess(md.coef_[0], md.intercept_[0], xt, yt, C)
        gt, ht = grad_hess(mt.coef_[0], mt.intercept_[0], xt, yt, C)
        rows["predicted_default"].append(int(md.predict(xs)[0]))
        rows["decision_default"].append(float(md.decision_function(xs)[0]))
        rows["n_iter_default"].append(int(md.n_iter_[0]))
        rows["grad2_default"].append(float(np.linalg.norm(gd)))
        rows["decision_tight"].append(float(mt.decision_function(xs)[0]))
        rows["grad2_tight"].append(float(np.linalg.norm(gt)))
        rows["mu_tight"].append(float(np.linalg.eigvalsh(ht).min()))
        rows["predicted_multinomial"].append(int(mm.predict(xs)[0]))
        rows["decision_multinomial"].append(float(2 * mm.decision_function(xs)[0]))
        # The multinomial answer as a point of the binary objective at C = 2.
        gm, hm = grad_hess(2 * mm.coef_[0], 2 * mm.intercept_[0], xt, yt, 2 * C)
        rows["grad2_multinomial"].append(float(np.linalg.norm(gm)))
        rows["mu_multinomial"].append(float(np.linalg.eigvalsh(hm).min()))
        if i % COEF_EVERY == 0:
            coefs.append({"left_out": i, "coef": mt.coef_[0].tolist(),
                          "intercept": float(mt.intercept_[0])})
    # The fit on all rows (scaled over all rows).
    xa = StandardScaler().fit_transform(x)
    mt, wt = fit(TIGHT, xa, y)
    for w in wt:
        warned.append("all rows, %s: %s" % (TIGHT, w))
    coefs.append({"left_out": -1, "coef": mt.coef_[0].tolist(),
                  "intercept": float(mt.intercept_[0])})
    entry = {"name": name, "n": n, "d": d, "C": C, "y": y.tolist()}
    entry.update(rows)
    entry["tight_coef"] = coefs
    entry["warnings"] = warned
    return entry


def main():
    doc = {
        "source": "scripts/ref_logreg_loo.py",
        "versions": {"sklearn": sklearn.__version__, "numpy": np.__version__,
                     "scipy": scipy.__version__, "python": sys.version.split()[0]},
        "calls": {"default": DEFAULT, "tight": TIGHT, "multinomial": MULTI,
                  "scaler": "StandardScaler() fitted on each training part"},
        "datasets": [loo("ionosphere", *ionosphere()), loo("breast-cancer", *breast_cancer())],
    }
    text = json.dumps(doc, indent=1)
    # One line per innermost list of numbers keeps the fixture short.
    text = re.sub(r"\[\s*([-0-9.e+,\s]+?)\s*\]",
                  lambda m: "[" + ", ".join(m.group(1).split()).replace(",,", ",") + "]", text)
    with open(OUT, "w") as f:
        f.write(text + "\n")


if __name__ == "__main__":
    main()
