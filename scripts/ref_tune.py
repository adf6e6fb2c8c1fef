#!/usr/bin/python3
"""Reference grid searches for fringe's nested cross-validation (tuned models),
computed with scikit-learn on exactly the folds fringe draws.

Run with the Debian interpreter (python3-sklearn 1.2.1, numpy 1.24.2, under
scripts/check-references.sh's OPENBLAS_CORETYPE):

    /usr/bin/python3 scripts/ref_tune.py

Input: bench/runner/testdata/tune_folds.json, written by
`go test ./bench/runner -run TestTuneAgainstSklearn -update` from the spec of
that test: for every (dataset, model, outer fold) task, the outer training
and test rows (0-based rows of the dataset as loaded) and the inner test
folds (positions into the outer training rows).

Data: sklearn.datasets.load_iris / load_wine / load_breast_cancer (the files
fringe embeds). For each task: StandardScaler fitted on the outer training
rows transforms both parts; then

    GridSearchCV(estimator, grid, cv=[(train_f, test_f) ...], refit=True)

with the inner folds given explicitly (train_f = the other positions), the
default scoring (accuracy), on the scaled outer training part; the refitted
best estimator predicts the scaled outer test part. Estimators and grids
(exact calls):

    svm     SVC(), {"C": [0.1, 1, 10, 100], "gamma": ["scale", 0.01, 0.1, 1]}
    knn     KNeighborsClassifier(algorithm="brute"), {"n_neighbors": [1, 3, 5, 9, 15]}
    logreg  LogisticRegression(max_iter=10000, tol=1e-8), {"C": [0.01, 0.1, 1, 10]}

(LogisticRegression's tolerance is tightened so that its predictions are
those of the minimiser, which fringe reaches to its own tolerance; the
grid's order is ParameterGrid's: keys sorted, first key slowest, as
fringe's.) Output: bench/runner/testdata/tune_sklearn.json with, per task,
mean_test_score (in grid order), best_index and the outer predictions
(class indices).
"""
import json
import os

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_breast_cancer, load_iris, load_wine
from sklearn.linear_model import LogisticRegression
from sklearn.model_selection import GridSearchCV
from sklearn.neighbors import KNeighborsClassifier
from sklearn.preprocessing import StandardScaler
from sklearn.svm import SVC

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
TD = os.path.join(ROOT, "bench", "runner", "testdata")

DATA = {"iris": load_iris(), "wine": load_wine(), "breast-cancer": load_breast_cancer()}
MODELS = {
    "svm": (lambda: SVC(), {"C": [0.1, 1, 10, 100], "gamma": ["scale", 0.01, 0.1, 1]}),
    "knn": (lambda: KNeighborsClassifier(algorithm="brute"), {"n_neighbors": [1, 3, 5, 9, 15]}),
    "logreg": (lambda: LogisticRegression(max_iter=10000, tol=1e-8), {"C": [0.01, 0.1, 1, 10]}),
}


def main():
    with open(os.path.join(TD, "tune_folds.json")) as f:
        folds = json.load(f)
    out = {"source": "scripts/ref_tune.py", "versions": {"sklearn": sklearn.__version__, "numpy": np.__version__, "scipy": scipy.__version__}, "tasks": []}
    for task in folds["tasks"]:
        d = DATA[task["dataset"]]
        X, y = d.data, d.target
        tr, te = np.array(task["train"]), np.array(task["test"])
        sc = StandardScaler().fit(X[tr])
        Xtr, Xte = sc.transform(X[tr]), sc.transform(X[te])
        n = len(tr)
        cv = []
        for test in task["inner_test"]:
            test = np.array(test)
            train = np.setdiff1d(np.arange(n), test)
            cv.append((train, test))
        make, grid = MODELS[task["model"]]
        gs = GridSearchCV(make(), grid, cv=cv, refit=True).fit(Xtr, y[tr])
        out["tasks"].append({
            "key": task["key"],
            "mean_test_score": [float(s) for s in gs.cv_results_["mean_test_score"]],
            "best_index": int(gs.best_index_),
            "predict": [int(c) for c in gs.predict(Xte)],
        })
    path = os.path.join(TD, "tune_sklearn.json")
    with open(path, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    print("wrote", path)


if __name__ == "__main__":
    main()
