#!/usr/bin/python3
"""Reference for the svmlight / LIBSVM reader of fringe/datasets.

Writes a small svmlight file of its own making (seeded numpy draws; the
numbers mean nothing) into datasets/testdata/svmlight/sample.svm, reads it
back with scikit-learn's loader and writes what it returns to
datasets/testdata/svmlight_sklearn.json for datasets/svmlight_test.go:

    sklearn.datasets.load_svmlight_file(path, zero_based=False)   # one-based (LIBSVM)
    sklearn.datasets.load_svmlight_file(path, zero_based=True)
    sklearn.datasets.load_svmlight_file(path, zero_based="auto")

each densified with .toarray(), with the labels y. The file has comment
lines, trailing comments, a blank line, tabs between tokens, a row with no
features, a feature index that never occurs (an all-zero column), values in
decimal and exponent notation, and labels -1, 1 and 2. Floats are written
with repr (the shortest text that reads back to the same float64) or with
"%.6e", so both readers parse the same decimal text; JSON uses repr too.

Deterministic: rerunning reproduces both files byte for byte.

    /usr/bin/python3 scripts/ref_svmlight.py
"""
import json
import os
import platform

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_svmlight_file

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DATA = os.path.join(ROOT, "datasets", "testdata", "svmlight", "sample.svm")
OUT = os.path.join(ROOT, "datasets", "testdata", "svmlight_sklearn.json")
REL = "datasets/testdata/svmlight/sample.svm"

N_ROWS = 30
MAX_INDEX = 15
UNUSED = 9  # this index never occurs: its column is all zeros
LABELS = ["-1", "1", "2"]


def write_sample():
    rng = np.random.default_rng(20240517)
    lines = ["# svmlight sample written by scripts/ref_svmlight.py (seeded draws, no meaning)"]
    for i in range(N_ROWS):
        label = LABELS[int(rng.integers(len(LABELS)))]
        if i == 7:
            lines.append(label)  # a row with no features
            continue
        idx = [j for j in range(1, MAX_INDEX + 1) if j != UNUSED and rng.random() < 0.45]
        if i == 3:
            idx = sorted(set(idx) | {MAX_INDEX})
        toks = []
        for j in idx:
            v = float(rng.normal(0, 10) * 10 ** int(rng.integers(-3, 4)))
            text = repr(v) if rng.random() < 0.7 else "%.6e" % v
            toks.append("%d:%s" % (j, text))
        sep = "\t" if i % 5 == 2 else " "
        line = sep.join([label] + toks)
        if i % 6 == 4:
            line += "  # trailing comment"
        lines.append(line)
        if i == 12:
            lines.append("")
            lines.append("# a comment line")
    os.makedirs(os.path.dirname(DATA), exist_ok=True)
    with open(DATA, "w") as f:
        f.write("\n".join(lines) + "\n")


def read(zero_based):
    X, y = load_svmlight_file(DATA, zero_based=zero_based)
    return {
        "call": "load_svmlight_file(%r, zero_based=%r)" % (REL, zero_based),
        "shape": list(X.shape),
        "X": X.toarray().tolist(),
        "y": y.tolist(),
    }


def main():
    write_sample()
    doc = {
        "generator": "scripts/ref_svmlight.py",
        "file": REL,
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "sklearn": sklearn.__version__,
        },
        "one_based": read(False),
        "zero_based": read(True),
        "auto": read("auto"),
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
