#!/usr/bin/python3
"""Reference values for fringe/qkernel (exact mode) computed with numpy.

Writes qkernel/testdata/ref_qkernel.json, read by qkernel's Go tests:

  * "problem": a fixed seeded problem (3 classes of unequal size, d = 5, raw
    features of varied scale so that the L2 normalisation matters) with the
    closed-form outputs for plain (1/M) and balanced (1/(C M_k)) weights;
  * "iris_demo": the published demonstration setup (Iris setosa vs versicolor,
    sepal length and width, standardised over rows 0-99 with ddof 0, then
    L2-normalised; training rows 33 and 85, test rows 28 and 36) for the data
    file shipped with scikit-learn and for its UCI variant (row 37 sepal
    width 3.1 instead of 3.6).

The closed form is evaluated pair by pair in its distance form,
P(a=0, c=k) = sum_{m in k} w_m ||x + x_m||^2 / 4 and
p_acc = 1/2 + 1/2 sum_m w_m <x, x_m>, independently of the Go code's
per-class centroid form.

Usage:  /usr/bin/python3 scripts/ref_qkernel.py [--time]
Run from the repository root. --time instead prints numpy timings (ns per
test-train pair) for the sizes of qkernel's BenchmarkExact, for speed ratios.
"""

import hashlib
import json
import sys
import time

import numpy as np
import sklearn

SEED = 20170330
IRIS = "/usr/lib/python3/dist-packages/sklearn/datasets/data/iris.csv"
OUT = "qkernel/testdata/ref_qkernel.json"


def unit(X):
    return X / np.linalg.norm(X, axis=1, keepdims=True)


def weights(y, balance):
    y = np.asarray(y)
    if not balance:
        return np.full(len(y), 1.0 / len(y))
    classes, counts = np.unique(y, return_counts=True)
    size = dict(zip(classes.tolist(), counts.tolist()))
    return np.array([1.0 / (len(classes) * size[k]) for k in y.tolist()])


def closed_form(Xtr, ytr, Xte, n_class, balance):
    tr, te = unit(Xtr), unit(Xte)
    w = weights(ytr, balance)
    p_acc, probs, pred = [], [], []
    for x in te:
        joint = np.zeros(n_class)
        for m in range(len(tr)):
            joint[ytr[m]] += w[m] * np.sum((x + tr[m]) ** 2) / 4
        pa = 0.5 + 0.5 * np.sum(w * (tr @ x))
        p_acc.append(float(pa))
        probs.append((joint / pa).tolist())
        pred.append(int(np.argmax(joint)))
    return {"weights": w.tolist(), "p_acc": p_acc, "probs": probs, "pred": pred}


def problem():
    rng = np.random.default_rng(SEED)
    sizes = [5, 11, 19]  # unequal on purpose
    d = 5
    centres = rng.normal(0.0, 1.0, size=(3, d)) + 0.5
    Xtr, ytr = [], []
    for k, n in enumerate(sizes):
        pts = centres[k] + 0.6 * rng.normal(size=(n, d))
        pts *= rng.uniform(0.1, 10.0, size=(n, 1))  # row scale: normalisation must undo it
        Xtr.append(pts)
        ytr += [k] * n
    Xtr = np.vstack(Xtr)
    perm = rng.permutation(len(ytr))
    Xtr, ytr = Xtr[perm], [ytr[i] for i in perm]
    Xte = centres[rng.integers(0, 3, size=12)] + 0.8 * rng.normal(size=(12, d))
    Xte *= rng.uniform(0.1, 10.0, size=(12, 1))
    return {
        "seed": SEED,
        "call": "numpy.random.default_rng(seed); see problem() in scripts/ref_qkernel.py",
        "n_class": 3,
        "train_x": Xtr.tolist(),
        "train_y": ytr,
        "test_x": Xte.tolist(),
        "plain": closed_form(Xtr, ytr, Xte, 3, False),
        "balanced": closed_form(Xtr, ytr, Xte, 3, True),
    }


def iris_demo():
    data = np.loadtxt(IRIS, delimiter=",", skiprows=1)
    out = {}
    for variant in ("sklearn", "uci"):
        X = data[:100, :2].copy()
        if variant == "uci":
            X[37] = [4.9, 3.1]  # UCI iris.data line 38 (recalled from memory)
        Z = unit((X - X.mean(axis=0)) / X.std(axis=0))
        train, test = [33, 85], [28, 36]
        res = closed_form(Z[train], [0, 1], Z[test], 2, False)
        res["vectors"] = {str(r): Z[r].tolist() for r in [28, 36, 33, 85]}
        out[variant] = res
    return out


def timings():
    rng = np.random.default_rng(SEED)
    for d in (4, 13, 30):
        for n_train, n_test in ((135, 15), (4500, 500)):
            Xtr = rng.normal(size=(n_train, d))
            Xte = rng.normal(size=(n_test, d))
            y = rng.integers(0, 3, size=n_train)
            onehot = np.eye(3)[y]
            w = weights(y, True)
            reps = max(20, 2000000 // (n_train * n_test))

            def gram():  # all test-train inner products, then per-class sums
                G = unit(Xte) @ unit(Xtr).T
                joint = ((1 + G) / 2 * w) @ onehot
                probs = joint / joint.sum(axis=1, keepdims=True)
                return probs.argmax(axis=1)

            def centroid():  # the per-class centroid form used by the Go code
                mass = w @ onehot
                centre = (w[:, None] * unit(Xtr)).T @ onehot
                joint = (mass + unit(Xte) @ centre) / 2
                probs = joint / joint.sum(axis=1, keepdims=True)
                return probs.argmax(axis=1)

            for name, fn in (("gram", gram), ("centroid", centroid)):
                best = float("inf")
                for _ in range(5):
                    t0 = time.perf_counter()
                    for _ in range(reps):
                        fn()
                    best = min(best, (time.perf_counter() - t0) / reps)
                print(f"d={d}/train={n_train}/test={n_test}/form={name}: "
                      f"{best * 1e9 / (n_train * n_test):.3f} ns/pair ({best * 1e6:.1f} us per fit+predict)")


def main():
    if "--time" in sys.argv[1:]:
        timings()
        return
    with open(IRIS, "rb") as f:
        iris_sha = hashlib.sha256(f.read()).hexdigest()
    doc = {
        "generator": "scripts/ref_qkernel.py",
        "python": sys.version.split()[0],
        "numpy": np.__version__,
        "sklearn": sklearn.__version__,
        "iris_file": IRIS,
        "iris_sha256": iris_sha,
        "problem": problem(),
        "iris_demo": iris_demo(),
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
