#!/usr/bin/python3
"""Reference values for the SVM baseline of fringe (package baselines).

Writes two JSON fixtures beside the Go tests that read them:

  baselines/testdata/svm_binary.json  two-class problems, one case per kernel
  baselines/testdata/svm_ovo.json     all of Iris, one-vs-one

Every case records the data it was fitted on, the exact scikit-learn call,
and the fitted quantities the Go tests compare against: decision_function on
fixed test points, predict, support_ (sorted ascending, dual_coef_ permuted
to match), intercept_ and the gamma actually used (SVC._gamma), all with
shrinking=False; and support_ and n_iter_ of the same fit with
shrinking=True (fields "support_shrinking", "n_iter_shrinking").

Run with Debian's interpreter, which has python3-sklearn 1.2.1:

    /usr/bin/python3 scripts/ref_svm.py            # from the repository root

The output is deterministic (fixed seeds, fixed splits); rerunning it must
leave the fixtures byte-identical for the same library versions.
"""

import json
import os
import platform
import sys

import numpy as np
import sklearn
from sklearn.datasets import load_iris
from sklearn.base import clone
from sklearn.svm import SVC

# Stopping tolerance passed to LIBSVM (SVC(tol=...)). Far tighter than the
# default 1e-3 so that the reference is close to the exact optimum; the Go
# tests use the same tolerance in fringe's own solver.
TOL = 1e-8

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "..", "baselines", "testdata")


def standardise(X):
    """z-score every column with the population standard deviation."""
    return (X - X.mean(axis=0)) / X.std(axis=0)


def l2_rows(X):
    return X / np.linalg.norm(X, axis=1, keepdims=True)


def interference_gram(A, B):
    """The interference kernel (1 + <a, b>) / 2 as a precomputed Gram matrix."""
    return (1.0 + A @ B.T) / 2.0


def iris_versicolor_virginica():
    iris = load_iris()
    keep = iris.target > 0
    X = standardise(iris.data[keep])
    y = iris.target[keep] - 1  # versicolor -> 0, virginica -> 1
    return X, y


def split_every_fourth(X, y):
    """Rows 3, 7, 11, ... are test points; the rest train."""
    test = np.arange(len(y)) % 4 == 3
    return X[~test], y[~test], X[test]


def synthetic(seed, n_per_class, d, shift):
    """Two overlapping Gaussian classes, means -shift and +shift on every axis."""
    rng = np.random.default_rng(seed)
    X0 = rng.normal(-shift, 1.0, size=(n_per_class, d))
    X1 = rng.normal(+shift, 1.0, size=(n_per_class, d))
    X = np.vstack([X0, X1])
    y = np.repeat([0, 1], n_per_class)
    Xtest = rng.normal(0.0, 1.5, size=(20, d))
    return X, y, Xtest


def fit_case(name, X, y, Xtest, kernel, C, gamma=None, degree=3, coef0=0.0):
    """Fit SVC and return the fixture record for one case.

    gamma None means "scale". kernel "interference" runs SVC on the
    precomputed Gram matrix (1 + X X^T) / 2.
    """
    if kernel == "interference":
        est = SVC(C=C, kernel="precomputed", tol=TOL, shrinking=False)
        call = ("SVC(C=%r, kernel='precomputed', tol=%r, shrinking=False)"
                ".fit((1 + X @ X.T) / 2, y); decision_function((1 + Xt @ X.T) / 2)"
                % (C, TOL))
        est.fit(interference_gram(X, X), y)
        Ktest = interference_gram(Xtest, X)
        dec = est.decision_function(Ktest)
        pred = est.predict(Ktest)
        gamma_used = None
    else:
        g = "scale" if gamma is None else gamma
        est = SVC(C=C, kernel=kernel, gamma=g, degree=degree, coef0=coef0,
                  tol=TOL, shrinking=False, decision_function_shape="ovo")
        call = ("SVC(C=%r, kernel=%r, gamma=%r, degree=%r, coef0=%r, tol=%r, "
                "shrinking=False, decision_function_shape='ovo').fit(X, y)"
                % (C, kernel, g, degree, coef0, TOL))
        est.fit(X, y)
        dec = est.decision_function(Xtest)
        pred = est.predict(Xtest)
        gamma_used = float(est._gamma)
    if est.fit_status_ != 0:
        sys.exit("ref_svm: %s did not converge" % name)
    # The same fit with LIBSVM's shrinking heuristic on (its default), for
    # the tests of fringe's shrinking: support set and iteration counts.
    shr = clone(est).set_params(shrinking=True)
    if kernel == "interference":
        shr.fit(interference_gram(X, X), y)
    else:
        shr.fit(X, y)
    if shr.fit_status_ != 0:
        sys.exit("ref_svm: %s with shrinking did not converge" % name)
    order = np.argsort(est.support_, kind="stable")
    rec = {
        "name": name,
        "call": call,
        "kernel": kernel,
        "C": C,
        "gamma": 0.0 if gamma is None else gamma,  # 0 means "scale"
        "degree": degree,
        "coef0": coef0,
        "n_class": int(len(est.classes_)),
        "x_train": X.tolist(),
        "y_train": [int(v) for v in y],
        "x_test": Xtest.tolist(),
        "gamma_used": gamma_used,
        "support": [int(v) for v in est.support_[order]],
        "intercept": [float(v) for v in est.intercept_],
        "decision": np.asarray(dec).tolist(),
        "predict": [int(v) for v in pred],
        "n_iter": [int(v) for v in np.atleast_1d(est.n_iter_)],
        "support_shrinking": sorted(int(v) for v in shr.support_),
        "n_iter_shrinking": [int(v) for v in np.atleast_1d(shr.n_iter_)],
    }
    if len(est.classes_) == 2:
        rec["dual_coef"] = [float(v) for v in est.dual_coef_[0][order]]
    return rec


def binary_cases():
    X, y = iris_versicolor_virginica()
    Xtr, ytr, Xte = split_every_fourth(X, y)
    Xl = l2_rows(X)
    Xltr, yltr, Xlte = split_every_fourth(Xl, y)
    S, sy, St = synthetic(seed=20240611, n_per_class=40, d=3, shift=0.5)
    return [
        fit_case("iris-vv/rbf/C=1/gamma=scale", Xtr, ytr, Xte, "rbf", 1.0),
        fit_case("iris-vv/linear/C=1", Xtr, ytr, Xte, "linear", 1.0),
        fit_case("iris-vv/poly/C=1/gamma=0.5/degree=3/coef0=1", Xtr, ytr, Xte,
                 "poly", 1.0, gamma=0.5, degree=3, coef0=1.0),
        fit_case("iris-vv-l2/interference/C=1", Xltr, yltr, Xlte,
                 "interference", 1.0),
        fit_case("synthetic/rbf/C=10/gamma=0.5", S, sy, St, "rbf", 10.0,
                 gamma=0.5),
        fit_case("synthetic/linear/C=0.1", S, sy, St, "linear", 0.1),
        fit_case("synthetic/poly/C=1/gamma=scale/degree=2/coef0=0", S, sy, St,
                 "poly", 1.0, degree=2, coef0=0.0),
        fit_case("synthetic/interference/C=1", S, sy, St, "interference", 1.0),
    ]


def ovo_cases():
    iris = load_iris()
    X = standardise(iris.data)
    Xtr, ytr, Xte = split_every_fourth(X, iris.target)
    return [
        fit_case("iris/rbf/C=1/gamma=scale", Xtr, ytr, Xte, "rbf", 1.0),
        fit_case("iris/linear/C=0.5", Xtr, ytr, Xte, "linear", 0.5),
        fit_case("iris/poly/C=2/gamma=scale/degree=3/coef0=1", Xtr, ytr, Xte,
                 "poly", 2.0, degree=3, coef0=1.0),
    ]


def write(path, cases):
    doc = {
        "source": "scripts/ref_svm.py",
        "library": "scikit-learn %s (sklearn.svm.SVC, LIBSVM inside)"
                   % sklearn.__version__,
        "numpy": np.__version__,
        "python": platform.python_version(),
        "tol": TOL,
        "cases": cases,
    }
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


def main():
    os.makedirs(OUT, exist_ok=True)
    write(os.path.join(OUT, "svm_binary.json"), binary_cases())
    write(os.path.join(OUT, "svm_ovo.json"), ovo_cases())


if __name__ == "__main__":
    main()
