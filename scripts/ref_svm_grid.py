#!/usr/bin/python3
"""Reference values for fringe's tuned SVM (baselines.TunedSVM) and its folds
(baselines.StratifiedFolds).

Writes baselines/testdata/svm_grid.json with

  folds  test rows of every fold of StratifiedKFold(n_splits=k) (no
         shuffling) for a few label vectors;
  grids  GridSearchCV(SVC(tol=1e-8, ...), {"C": [...], "gamma": [...]},
         cv=StratifiedKFold(k)) fitted on the training rows of a split of
         Breast Cancer or Iris (z-scored with the population standard
         deviation over the whole set): cv_results_["mean_test_score"] in
         ParameterGrid order (C outer, gamma inner), best_params_ and the
         refitted model's predictions on the split's test rows.

The data are scikit-learn's own copies (load_breast_cancer, load_iris), the
same rows as fringe's embedded sets; the fixture records their sums so the
Go test can tell. Run with Debian's interpreter (python3-sklearn 1.2.1):

    /usr/bin/python3 scripts/ref_svm_grid.py       # from the repository root

Deterministic: no randomness; rerunning leaves the fixture byte-identical.
"""

import json
import os
import platform

import numpy as np
import sklearn
from sklearn.datasets import load_breast_cancer, load_iris
from sklearn.model_selection import GridSearchCV, StratifiedKFold
from sklearn.svm import SVC

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "..", "baselines", "testdata", "svm_grid.json")
TOL = 1e-8


def standardise(X):
    return (X - X.mean(axis=0)) / X.std(axis=0)


def fold_case(name, y, k):
    tests = [t.tolist() for _, t in StratifiedKFold(n_splits=k).split(np.zeros(len(y)), y)]
    return {"name": name, "k": k, "y": [int(v) for v in y], "tests": tests}


def grid_case(name, dataset, load, kernel, Cs, gammas, inner, outer, fold):
    """GridSearchCV on the training rows of fold `fold` of StratifiedKFold(outer)."""
    X, y = load(return_X_y=True)
    Xs = standardise(X)
    train, test = list(StratifiedKFold(n_splits=outer).split(X, y))[fold]
    grid = {"C": Cs, "gamma": gammas}
    est = GridSearchCV(SVC(kernel=kernel, tol=TOL), grid, cv=StratifiedKFold(inner))
    est.fit(Xs[train], y[train])
    call = ("GridSearchCV(SVC(kernel=%r, tol=%r), %r, cv=StratifiedKFold(%d))"
            ".fit(Xs[train], y[train]) with train, test = fold %d of StratifiedKFold(%d)"
            % (kernel, TOL, grid, inner, fold, outer))
    return {
        "name": name,
        "call": call,
        "dataset": dataset,
        "x_sum": float(X.sum()),
        "kernel": kernel,
        "C": Cs,
        "gamma": [0.0 if g == "scale" else g for g in gammas],  # 0 means "scale"
        "inner_folds": inner,
        "train": [int(v) for v in train],
        "test": [int(v) for v in test],
        "mean_test_score": [float(v) for v in est.cv_results_["mean_test_score"]],
        "best_C": float(est.best_params_["C"]),
        "best_gamma": 0.0 if est.best_params_["gamma"] == "scale" else float(est.best_params_["gamma"]),
        "predict": [int(v) for v in est.predict(Xs[test])],
    }


def main():
    bc_y = load_breast_cancer().target
    iris_y = load_iris().target
    odd = np.array([2, 2, 0, 1, 1, 1, 0, 2, 2, 2, 1, 0, 0, 0, 0, 1, 2, 2, 1, 0, 5, 5, 1])
    folds = [
        fold_case("breast-cancer/k=10", bc_y, 10),
        fold_case("breast-cancer/k=5", bc_y, 5),
        fold_case("iris/k=5", iris_y, 5),
        fold_case("unbalanced/k=3", odd, 3),
        fold_case("unbalanced/k=5", odd, 5),
    ]
    grids = [
        grid_case("breast-cancer/rbf/fold=0", "breast-cancer", load_breast_cancer, "rbf",
                  [0.1, 1.0, 10.0, 100.0], [0.001, 0.01, 0.1, 1.0], 5, 10, 0),
        grid_case("breast-cancer/rbf/fold=7", "breast-cancer", load_breast_cancer, "rbf",
                  [0.1, 1.0, 10.0, 100.0], [0.001, 0.01, 0.1, 1.0], 5, 10, 7),
        grid_case("iris/rbf/scale", "iris", load_iris, "rbf",
                  [0.5, 5.0], [0.05, 0.5, "scale"], 4, 5, 2),
        grid_case("iris/linear", "iris", load_iris, "linear",
                  [0.01, 0.1, 1.0], [0.1, 1.0], 5, 5, 1),
    ]
    doc = {
        "source": "scripts/ref_svm_grid.py",
        "library": "scikit-learn %s (GridSearchCV, StratifiedKFold, SVC)" % sklearn.__version__,
        "numpy": np.__version__,
        "python": platform.python_version(),
        "tol": TOL,
        "folds": folds,
        "grids": grids,
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
