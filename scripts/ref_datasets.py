#!/usr/bin/python3
"""Reference facts about the embedded datasets of fringe/datasets.

Loads iris, wine and breast cancer with scikit-learn's own loaders
(load_iris, load_wine, load_breast_cancer) and prints, as JSON, what
datasets/embedded_test.go compares the Go loader with: feature and class
names, shape, class counts, and per-feature mean, standard deviation
(ddof=0 and ddof=1), minimum and maximum, plus the SHA-256 of the data
matrix as little-endian float64 in row-major order and of the targets as
little-endian int64. Both parsers round decimal text correctly to float64,
so the matrix digests must agree bit for bit.

    /usr/bin/python3 scripts/ref_datasets.py > datasets/testdata/sklearn_datasets.json

Run with Debian's python3-sklearn (the versions are recorded in the output).
Floats are printed with Python's repr (shortest round-trip form).
"""
import hashlib
import json
import platform
import sys

import numpy as np
import sklearn
from sklearn.datasets import load_breast_cancer, load_iris, load_wine


def describe(name, loader):
    bunch = loader()
    X = np.ascontiguousarray(bunch.data, dtype="<f8")
    y = np.ascontiguousarray(bunch.target, dtype="<i8")
    return {
        "name": name,
        "call": "sklearn.datasets.%s()" % loader.__name__,
        "feature_names": [str(s) for s in bunch.feature_names],
        "target_names": [str(s) for s in bunch.target_names],
        "shape": list(X.shape),
        "class_counts": [int(c) for c in np.bincount(y)],
        "mean": [float(v) for v in X.mean(axis=0)],
        "std_ddof0": [float(v) for v in X.std(axis=0, ddof=0)],
        "std_ddof1": [float(v) for v in X.std(axis=0, ddof=1)],
        "min": [float(v) for v in X.min(axis=0)],
        "max": [float(v) for v in X.max(axis=0)],
        "data_sha256": hashlib.sha256(X.tobytes(order="C")).hexdigest(),
        "target_sha256": hashlib.sha256(y.tobytes()).hexdigest(),
    }


def main():
    out = {
        "generator": "scripts/ref_datasets.py",
        "python": platform.python_version(),
        "numpy": np.__version__,
        "sklearn": sklearn.__version__,
        "datasets": [
            describe("iris", load_iris),
            describe("wine", load_wine),
            describe("breast-cancer", load_breast_cancer),
        ],
    }
    json.dump(out, sys.stdout, indent=1)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
