#!/usr/bin/python3
"""The tuned-SVM grid of the speed comparison, written the way a researcher
would write it with scikit-learn: Breast Cancer z-scored over all rows,
10-fold stratified outer cross-validation, and in each outer fold
GridSearchCV(SVC(), {"C": [0.1, 1, 10, 100], "gamma": [0.001, 0.01, 0.1, 1]},
cv=StratifiedKFold(5)) refitted on the outer training rows and scored on the
outer test rows. Prints the chosen parameters and accuracy of every outer
fold and the mean accuracy (the lines scripts/speed/svmgrid prints for
fringe), and the times on standard error.

scripts/speed/svm_grid.sh times both in one run. Run with Debian's python3
(python3-sklearn 1.2.1).
"""
import sys
import time

t0 = time.perf_counter()
import numpy as np
from sklearn.datasets import load_breast_cancer
from sklearn.model_selection import GridSearchCV, StratifiedKFold
from sklearn.svm import SVC
t_import = time.perf_counter() - t0

t1 = time.perf_counter()
X, y = load_breast_cancer(return_X_y=True)
X = (X - X.mean(axis=0)) / X.std(axis=0)
grid = {"C": [0.1, 1, 10, 100], "gamma": [0.001, 0.01, 0.1, 1]}
accs = []
for f, (train, test) in enumerate(StratifiedKFold(n_splits=10).split(X, y)):
    search = GridSearchCV(SVC(), grid, cv=StratifiedKFold(5))
    search.fit(X[train], y[train])
    acc = float(np.mean(search.predict(X[test]) == y[test]))
    accs.append(acc)
    print("fold %d C=%g gamma=%g accuracy %.6f"
          % (f, search.best_params_["C"], search.best_params_["gamma"], acc))
print("mean accuracy %.6f" % np.mean(accs))
t_grid = time.perf_counter() - t1
print(f"imports {t_import:.2f} s, grid {t_grid:.2f} s", file=sys.stderr)
