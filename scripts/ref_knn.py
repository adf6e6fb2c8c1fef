#!/usr/bin/python3
"""Reference predictions of k-nearest-neighbour and nearest-centroid
classifiers from scikit-learn, for the tests of fringe/baselines.

Run with the Debian interpreter (python3-sklearn 1.2.1, numpy 1.24.2):

    /usr/bin/python3 scripts/ref_knn.py

writes baselines/testdata/knn_reference.json (scripts/check-references.sh
reruns it and compares).

Cases:
  gauss  - three Gaussian classes in 5 dimensions (continuous values, so no
           two distances tie and the floating-point formula cannot matter);
           every metric x weighting x k in {1, 4, 7}.
  grid   - small-integer points where many distances tie exactly (integer
           arithmetic is exact in both implementations); Euclidean and
           Manhattan x weighting x k in {1, 2, 3, 4, 6}. Checks the vote tie
           rule (lowest class index).
  iris   - the Iris data as shipped with scikit-learn (load_iris), raw, split
           into even rows (train) and odd rows (test); Euclidean, k in {1, 5}.
Each kNN entry records the exact call, the predictions, predict_proba and,
per test row, whether the k-th and (k+1)-th smallest distances are exactly
equal ("boundary_tie"). On such rows scikit-learn's choice among the tied
training rows depends on the layout of its fixed-size max-heap
(sklearn/utils/_heap.pyx heap_push keys on the distance alone), not on the
training index, so they are not a reference for fringe's stable rule
(distance, then training index); the Go tests check that rule separately.
Exact distances: the grid is integer and Iris has one decimal (scaled by 10
it is integer); the Gaussian case has no ties.

The centroid entries use NearestCentroid() (Euclidean) on the gauss and iris
cases.
"""
import json
import os
import re
import sys

import numpy as np
import sklearn
from sklearn.datasets import load_iris
from sklearn.neighbors import KNeighborsClassifier, NearestCentroid


def gauss_case():
    rng = np.random.default_rng(20240611)
    centres = np.array([[0, 0, 0, 0, 0], [1.5, 0, 1, 0, -1], [0, 1.5, -1, 1, 0]], float)
    y_train = np.repeat([0, 1, 2], [25, 20, 15])
    y_test = np.repeat([0, 1, 2], [14, 13, 13])
    x_train = centres[y_train] + rng.normal(size=(y_train.size, 5))
    x_test = centres[y_test] + rng.normal(size=(y_test.size, 5))
    return x_train, y_train, x_test


def grid_case():
    # Training points on a 5x5 integer grid with classes 0..2 assigned in a
    # fixed scrambled pattern; test points on the same grid and half-way.
    pts = np.array([[i, j] for i in range(-2, 3) for j in range(-2, 3)], float)
    y_train = np.array([(3 * i + 2 * j) % 3 for i in range(5) for j in range(5)])
    x_test = np.array([[i, j] for i in range(-3, 4) for j in range(-3, 4)], float)
    return pts, y_train, x_test


def iris_case():
    iris = load_iris()
    x, y = iris.data, iris.target
    return x[0::2], y[0::2], x[1::2]


def boundary_ties(x_train, x_test, metric, k, scale):
    """Per test row, whether the k-th and (k+1)-th smallest exact distances
    are equal. scale turns the data into integers (exact arithmetic); None
    means no ties are possible (continuous data)."""
    if scale is None or k >= len(x_train):
        return [False] * len(x_test)
    a = np.rint(x_train * scale).astype(np.int64)
    b = np.rint(x_test * scale).astype(np.int64)
    assert np.array_equal(a, x_train * scale) and np.array_equal(b, x_test * scale)
    diff = b[:, None, :] - a[None, :, :]
    if metric == "euclidean":
        dist = (diff * diff).sum(axis=2)
    elif metric == "manhattan":
        dist = np.abs(diff).sum(axis=2)
    else:
        raise ValueError(metric)
    dist.sort(axis=1)
    return (dist[:, k - 1] == dist[:, k]).tolist()


def knn_entries(name, x_train, y_train, x_test, metrics, weightings, ks, scale=None):
    out = []
    for metric in metrics:
        for weights in weightings:
            for k in ks:
                call = ("KNeighborsClassifier(n_neighbors=%d, algorithm='brute', "
                        "metric='%s', weights='%s')" % (k, metric, weights))
                model = KNeighborsClassifier(n_neighbors=k, algorithm="brute",
                                             metric=metric, weights=weights)
                model.fit(x_train, y_train)
                out.append({
                    "case": name, "metric": metric, "weights": weights, "k": k,
                    "call": call,
                    "predicted": model.predict(x_test).tolist(),
                    "proba": model.predict_proba(x_test).tolist(),
                    "boundary_tie": boundary_ties(x_train, x_test, metric, k, scale),
                })
    return out


def main():
    cases = {"gauss": gauss_case(), "grid": grid_case(), "iris": iris_case()}
    knn = []
    knn += knn_entries("gauss", *cases["gauss"], ["euclidean", "manhattan", "cosine"],
                       ["uniform", "distance"], [1, 4, 7])
    knn += knn_entries("grid", *cases["grid"], ["euclidean", "manhattan"],
                       ["uniform", "distance"], [1, 2, 3, 4, 6], scale=1)
    knn += knn_entries("iris", *cases["iris"], ["euclidean", "manhattan"],
                       ["uniform", "distance"], [1, 5], scale=10)
    centroid = []
    for name in ["gauss", "iris"]:
        x_train, y_train, x_test = cases[name]
        model = NearestCentroid().fit(x_train, y_train)
        centroid.append({
            "case": name, "call": "NearestCentroid()",
            "centroids": model.centroids_.tolist(),
            "predicted": model.predict(x_test).tolist(),
        })
    doc = {
        "source": "scripts/ref_knn.py",
        "versions": {"sklearn": sklearn.__version__, "numpy": np.__version__,
                     "python": sys.version.split()[0]},
        "cases": {name: {"x_train": c[0].tolist(), "y_train": c[1].tolist(),
                         "x_test": c[2].tolist(), "n_class": 3}
                  for name, c in cases.items()},
        "knn": knn,
        "centroid": centroid,
    }
    text = json.dumps(doc, indent=1)
    # One line per innermost list of numbers keeps the fixture short and its
    # diffs readable.
    text = re.sub(r"\[\s*([-0-9.e+,\s]+?)\s*\]",
                  lambda m: "[" + ", ".join(m.group(1).split()).replace(",,", ",") + "]", text)
    out = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "baselines",
                       "testdata", "knn_reference.json")
    with open(out, "w") as f:
        f.write(text + "\n")


if __name__ == "__main__":
    main()
