#!/usr/bin/python3
"""The speed-comparison grid written the way a researcher would write it in
Python with numpy and scikit-learn: 10 x 10 repeated stratified k-fold over
Iris, Wine and Breast Cancer, pipeline StandardScaler -> Normalizer (fringe's
std+l2), four models: the interference classifier's closed form in numpy,
k-NN (k = 5), an RBF SVM (C = 1, gamma = 'scale') and multinomial logistic
regression (C = 1, lbfgs). Prints the mean accuracy per cell.

The same grid for fringe is scripts/speed/grid.toml; scripts/speed/ratio.sh
times both in one run. Run with Debian's python3 (python3-sklearn 1.2.1).
"""
import sys
import time

t0 = time.perf_counter()
import numpy as np
from sklearn.base import BaseEstimator, ClassifierMixin
from sklearn.datasets import load_breast_cancer, load_iris, load_wine
from sklearn.linear_model import LogisticRegression
from sklearn.model_selection import RepeatedStratifiedKFold, cross_val_score
from sklearn.neighbors import KNeighborsClassifier
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import Normalizer, StandardScaler
from sklearn.svm import SVC
t_import = time.perf_counter() - t0


class Interference(BaseEstimator, ClassifierMixin):
    """Closed form of the interference classifier: P(k | acc) is proportional
    to sum over class-k training vectors of (1 + <x~, x_m>), unit vectors."""

    def fit(self, X, y):
        X = X / np.linalg.norm(X, axis=1, keepdims=True)
        self.classes_, yi = np.unique(y, return_inverse=True)
        self.X_, self.y_ = X, yi
        return self

    def predict(self, X):
        X = X / np.linalg.norm(X, axis=1, keepdims=True)
        k = 1.0 + X @ self.X_.T
        scores = np.stack([k[:, self.y_ == c].sum(axis=1) for c in range(len(self.classes_))], axis=1)
        return self.classes_[np.argmax(scores, axis=1)]


models = {
    "interference": Interference,
    "knn-k5": lambda: KNeighborsClassifier(n_neighbors=5),
    "svm-rbf-C1": lambda: SVC(C=1.0, kernel="rbf", gamma="scale"),
    "logreg-C1": lambda: LogisticRegression(C=1.0, max_iter=10000),
}
data = {"iris": load_iris, "wine": load_wine, "breast-cancer": load_breast_cancer}
cv = RepeatedStratifiedKFold(n_splits=10, n_repeats=10, random_state=7)
t1 = time.perf_counter()
for dname, load in data.items():
    X, y = load(return_X_y=True)
    for mname, make in models.items():
        pipe = make_pipeline(StandardScaler(), Normalizer(), make())
        acc = cross_val_score(pipe, X, y, cv=cv)
        print(f"{dname:14s} std+l2 {mname:14s} {acc.mean():.3f}")
t_grid = time.perf_counter() - t1
print(f"imports {t_import:.2f} s, grid {t_grid:.2f} s", file=sys.stderr)
