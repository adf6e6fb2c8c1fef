#!/usr/bin/python3
"""Reference outputs for the "pca" and "select" steps of fringe/datasets.

For iris, wine and breast cancer (scikit-learn's load_iris, load_wine and
load_breast_cancer: the same bytes as fringe's embedded copies) this script
fixes a stratified train/test split, fits on the training rows only and
records, for the Go test datasets/reduce_test.go:

  * PCA(svd_solver="full") (all components): mean_, components_,
    explained_variance_, explained_variance_ratio_ and the transformed
    test rows;
  * n_components_ of PCA(n_components=0.95 and 0.8, svd_solver="full");
  * make_pipeline(StandardScaler(), PCA(n_components=0.95,
    svd_solver="full")): n_components_ and the transformed test rows;
  * make_pipeline(StandardScaler(), PCA(n_components=4,
    svd_solver="full"), Normalizer()) on the test rows;
  * SelectKBest(f_classif, k=2 and k=5; k=2 and 3 for iris, which has
    4 features): scores_ (f_classif on the training rows) and
    get_support(indices=True).

The split is train_test_split(arange(n), test_size=0.25, random_state=0,
stratify=y); its test indices are written into the fixture, so the Go test
does not depend on how scikit-learn draws them.

Writes datasets/testdata/pca_select_sklearn.json (floats in Python's repr,
the shortest text that reads back to the same float64; library versions
recorded). Deterministic: rerunning reproduces the file byte for byte.

    /usr/bin/python3 scripts/ref_pca_select.py
"""
import json
import os
import platform

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_breast_cancer, load_iris, load_wine
from sklearn.decomposition import PCA
from sklearn.feature_selection import SelectKBest, f_classif
from sklearn.model_selection import train_test_split
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import Normalizer, StandardScaler

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT = os.path.join(ROOT, "datasets", "testdata", "pca_select_sklearn.json")


def case(name, loader):
    bunch = loader()
    X, y = bunch.data, bunch.target
    idx = np.arange(len(y))
    train, test = train_test_split(idx, test_size=0.25, random_state=0, stratify=y)
    train, test = np.sort(train), np.sort(test)
    Xtr, Xte, ytr = X[train], X[test], y[train]

    full = PCA(svd_solver="full").fit(Xtr)
    frac = {str(f): int(PCA(n_components=f, svd_solver="full").fit(Xtr).n_components_) for f in (0.95, 0.8)}
    std_pca = make_pipeline(StandardScaler(), PCA(n_components=0.95, svd_solver="full")).fit(Xtr)
    std_pca4_l2 = make_pipeline(StandardScaler(), PCA(n_components=4, svd_solver="full"), Normalizer()).fit(Xtr)
    select = {}
    # k = 2 and 5 (iris has 4 features: 2 and 3; SelectKBest refuses
    # k > n_features, and so does fringe's select(k)).
    for k in (2, 5 if X.shape[1] >= 5 else 3):
        sel = SelectKBest(f_classif, k=k).fit(Xtr, ytr)
        select[str(k)] = {
            "call": "SelectKBest(f_classif, k=%d).fit(X_train, y_train)" % k,
            "scores_": sel.scores_.tolist(),
            "support": [int(i) for i in sel.get_support(indices=True)],
        }
    return {
        "name": name,
        "loader": "sklearn.datasets.%s()" % loader.__name__,
        "split": "train_test_split(arange(n), test_size=0.25, random_state=0, stratify=y), both parts sorted",
        "train": [int(i) for i in train],
        "test": [int(i) for i in test],
        "pca_full": {
            "call": 'PCA(svd_solver="full").fit(X_train)',
            "mean_": full.mean_.tolist(),
            "components_": full.components_.tolist(),
            "explained_variance_": full.explained_variance_.tolist(),
            "explained_variance_ratio_": full.explained_variance_ratio_.tolist(),
            "singular_values_": full.singular_values_.tolist(),
            "test_out": full.transform(Xte).tolist(),
        },
        "pca_frac_n_components_": frac,
        "std_pca95": {
            "call": 'make_pipeline(StandardScaler(), PCA(n_components=0.95, svd_solver="full")).fit(X_train)',
            "n_components_": int(std_pca[-1].n_components_),
            "explained_variance_ratio_": std_pca[-1].explained_variance_ratio_.tolist(),
            "components_": std_pca[-1].components_.tolist(),
            "test_out": std_pca.transform(Xte).tolist(),
        },
        "std_pca4_l2": {
            "call": 'make_pipeline(StandardScaler(), PCA(n_components=4, svd_solver="full"), Normalizer()).fit(X_train)',
            "components_": std_pca4_l2[1].components_.tolist(),
            "test_out": std_pca4_l2.transform(Xte).tolist(),
        },
        "select": select,
    }


def main():
    doc = {
        "generator": "scripts/ref_pca_select.py",
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "sklearn": sklearn.__version__,
        },
        "cases": [
            case("iris", load_iris),
            case("wine", load_wine),
            case("breast-cancer", load_breast_cancer),
        ],
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
