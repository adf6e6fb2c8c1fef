#!/usr/bin/python3
"""Reference values for fringe's fold metrics, from scikit-learn.

Writes results/testdata/metrics_sklearn.json. Run with Debian's python3
(python3-sklearn 1.2.1):  /usr/bin/python3 scripts/ref_metrics.py
"""
import json
import os

import numpy as np
import sklearn
from sklearn.metrics import accuracy_score, balanced_accuracy_score, f1_score

rng = np.random.default_rng(20261201)
cases = []
# Fixed hand-made cases: a class never predicted, a class never true,
# perfect and all-wrong predictions.
fixed = [
    ([0, 0, 1, 1, 2, 2], [0, 1, 1, 1, 2, 0], 3),
    ([0, 0, 0, 1], [0, 0, 0, 0], 2),
    ([0, 1, 1, 1], [2, 1, 1, 0], 3),
    ([1, 1, 1], [1, 1, 1], 3),
    ([0, 1], [1, 0], 2),
]
for t, p, k in fixed:
    cases.append((t, p, k))
for n, k in [(15, 2), (15, 3), (57, 3), (30, 4), (1, 3)]:
    t = rng.integers(0, k, n).tolist()
    p = [x if rng.random() < 0.6 else int(rng.integers(0, k)) for x in t]
    cases.append((t, p, k))

out = {
    "source": "scikit-learn %s, numpy %s: accuracy_score(t, p), balanced_accuracy_score(t, p), "
              "f1_score(t, p, average='macro', zero_division=0)" % (sklearn.__version__, np.__version__),
    "cases": [],
}
for t, p, k in cases:
    out["cases"].append({
        "truth": t, "pred": p, "n_class": k,
        "accuracy": accuracy_score(t, p),
        "balanced_accuracy": balanced_accuracy_score(t, p),
        "macro_f1": f1_score(t, p, average="macro", zero_division=0),
    })
path = os.path.join(os.path.dirname(__file__), "..", "results", "testdata", "metrics_sklearn.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", os.path.normpath(path))
