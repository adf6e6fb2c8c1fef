#!/usr/bin/python3
"""Reference outputs for the preprocessing steps of fringe/datasets.

Fits scikit-learn's StandardScaler, MinMaxScaler and Normalizer(norm='l2')
on a fixed small training matrix, applies them (with the training
statistics) to the training rows and to test rows, and prints the results as
JSON. The output is the fixture datasets/testdata/pipeline_sklearn.json read
by datasets/pipeline_test.go:

    /usr/bin/python3 scripts/ref_pipeline.py > datasets/testdata/pipeline_sklearn.json

Run with Debian's python3-sklearn (the versions are recorded in the output).
Floats are printed with Python's repr (shortest round-trip form), so Go
parses the very same float64 values.
"""
import json
import platform
import sys

import numpy as np
import sklearn
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import MinMaxScaler, Normalizer, StandardScaler

# Columns: an ordinary feature; a constant 0.1 (its mean has a rounding
# residue, so StandardScaler's near-constant rule matters); a constant 0;
# a feature with a large offset (tests the two-pass variance); a feature
# with negative values.
TRAIN = np.array([
    [5.1, 0.1, 0.0, 1.0e6 + 0.5, -2.0],
    [4.9, 0.1, 0.0, 1.0e6 + 1.5, -0.5],
    [6.3, 0.1, 0.0, 1.0e6 + 0.25, 3.0],
    [5.8, 0.1, 0.0, 1.0e6 + 2.0, -1.25],
    [7.1, 0.1, 0.0, 1.0e6 + 0.75, 0.0],
    [6.0, 0.1, 0.0, 1.0e6 + 1.0, 2.5],
])
# Test rows, some outside the training range (minmax maps them outside
# [0, 1]; nothing is clipped).
TEST = np.array([
    [8.0, 0.2, -1.0, 1.0e6 + 3.0, -4.0],
    [4.0, 0.1, 0.0, 1.0e6, 1.0],
    [5.5, 0.0, 2.0, 1.0e6 + 1.25, 0.5],
])


# A nearly constant first column: 1e8 and its float64 successor. Its
# variance (about 5.6e-17) is pure rounding noise below StandardScaler's
# near-constant bound, so the column is centred and not scaled (a naive
# "variance == 0" test would blow it up to +-1).
ULP = float(np.spacing(1e8))
NEAR_TRAIN = np.array([[1e8, 1.0], [1e8 + ULP, 2.0], [1e8, 3.0], [1e8 + ULP, 4.0]])
NEAR_TEST = np.array([[1e8 + 2 * ULP, 0.0]])


def fit_apply(pipeline, call, est, attrs, train=TRAIN, test=TEST):
    """Fit est on train; record its outputs and the fringe pipeline string
    that should reproduce them."""
    est.fit(train)
    out = {
        "pipeline": pipeline,
        "call": call,
        "train": train.tolist(),
        "test": test.tolist(),
        "train_out": est.transform(train).tolist(),
        "test_out": est.transform(test).tolist(),
    }
    for a in attrs:
        out[a] = getattr(est, a).tolist()
    return out


cases = {
    "std": fit_apply("std", "StandardScaler()", StandardScaler(), ["mean_", "scale_", "var_"]),
    "minmax": fit_apply("minmax", "MinMaxScaler()", MinMaxScaler(), ["data_min_", "data_range_"]),
    "l2": fit_apply("l2", "Normalizer(norm='l2')", Normalizer(norm="l2"), []),
    "std+l2": fit_apply("std+l2", "make_pipeline(StandardScaler(), Normalizer(norm='l2'))",
                        make_pipeline(StandardScaler(), Normalizer(norm="l2")), []),
    "minmax+l2": fit_apply("minmax+l2", "make_pipeline(MinMaxScaler(), Normalizer(norm='l2'))",
                           make_pipeline(MinMaxScaler(), Normalizer(norm="l2")), []),
    "std near-constant": fit_apply("std", "StandardScaler()", StandardScaler(),
                                   ["mean_", "scale_", "var_"], NEAR_TRAIN, NEAR_TEST),
}

doc = {
    "generator": "scripts/ref_pipeline.py",
    "versions": {
        "python": platform.python_version(),
        "numpy": np.__version__,
        "sklearn": sklearn.__version__,
    },
    "cases": cases,
}
json.dump(doc, sys.stdout, indent=1)
sys.stdout.write("\n")
