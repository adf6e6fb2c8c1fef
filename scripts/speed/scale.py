#!/usr/bin/python3
"""The scikit-learn side of scripts/speed/scale.sh: one model of the scaling
measurement on the folds fringe used.

usage: scale.py DATA.csv PREDICTIONS.csv MODEL

DATA.csv is written by scripts/speed/scaledata (16 feature columns, the
label last); PREDICTIONS.csv is fringe's predictions.csv of the same data,
whose fold and row columns give each fold's test rows (the training part is
the rest), so both sides fit and score the same splits. MODEL is fringe's
model name: interference, knn-k5, svm-rbf-C1 or logreg-C1. The pipeline is
StandardScaler -> Normalizer (fringe's std+l2), fitted on each training
part. The interference classifier is its closed form in the weighted
class-centre form (P(k | acc) is proportional to n_k + <x, sum of the
class-k training vectors>, all unit vectors), linear in the rows, as
fringe computes it; the others are KNeighborsClassifier(n_neighbors=5),
SVC(C=1, gamma='scale') and LogisticRegression(C=1, max_iter=10000) with
scikit-learn's other defaults.

Prints one line: MODEL, the seconds spent in pipeline fit, model fit and
predict summed over the folds (time.perf_counter), and the mean accuracy
over the folds. Run with Debian's python3 (python3-sklearn 1.2.1).
"""
import csv
import sys
import time

import numpy as np
from sklearn.linear_model import LogisticRegression
from sklearn.neighbors import KNeighborsClassifier
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import Normalizer, StandardScaler
from sklearn.svm import SVC


class Interference:
    """Closed form of the interference classifier in class-centre form."""

    def fit(self, X, y):
        X = X / np.linalg.norm(X, axis=1, keepdims=True)
        self.classes_, yi = np.unique(y, return_inverse=True)
        k = len(self.classes_)
        self.count_ = np.bincount(yi, minlength=k).astype(float)
        self.centre_ = np.zeros((k, X.shape[1]))
        np.add.at(self.centre_, yi, X)
        return self

    def predict(self, X):
        X = X / np.linalg.norm(X, axis=1, keepdims=True)
        scores = self.count_ + X @ self.centre_.T
        return self.classes_[np.argmax(scores, axis=1)]


MODELS = {
    "interference": Interference,
    "knn-k5": lambda: KNeighborsClassifier(n_neighbors=5),
    "svm-rbf-C1": lambda: SVC(C=1.0, kernel="rbf", gamma="scale"),
    "logreg-C1": lambda: LogisticRegression(C=1.0, max_iter=10000),
}


def main():
    data, preds, model = sys.argv[1], sys.argv[2], sys.argv[3]
    with open(data) as f:
        header = f.readline().rstrip("\n").split(",")
    d = len(header) - 1
    X = np.loadtxt(data, delimiter=",", skiprows=1, usecols=range(d))
    y = np.loadtxt(data, delimiter=",", skiprows=1, usecols=[d], dtype=str)
    folds = {}
    with open(preds, newline="") as f:
        for r in csv.DictReader(f):
            if r["model"] == model and r["repeat"] == "0":
                folds.setdefault(int(r["fold"]), []).append(int(r["row"]))
    seconds, acc = 0.0, []
    for fold in sorted(folds):
        test = np.array(sorted(folds[fold]))
        mask = np.ones(len(y), dtype=bool)
        mask[test] = False
        t = time.perf_counter()
        pipe = make_pipeline(StandardScaler(), Normalizer(), MODELS[model]())
        pipe.fit(X[mask], y[mask])
        pred = pipe.predict(X[test])
        seconds += time.perf_counter() - t
        acc.append(np.mean(pred == y[test]))
    print(f"{model} {seconds:.3f} {np.mean(acc):.4f}")


if __name__ == "__main__":
    main()
