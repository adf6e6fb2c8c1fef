#!/usr/bin/python3
"""Leave-one-out reference predictions on Iris for the integration check of
fringe's runner (bench), computed with scikit-learn and numpy.

Run with the Debian interpreter (python3-sklearn 1.2.1, numpy 1.24.2):

    /usr/bin/python3 scripts/ref_iris_loo.py [bench/runner/testdata/iris_loo_reference.csv]

Data: sklearn.datasets.load_iris() (the iris.csv shipped with scikit-learn,
the file fringe embeds), all 150 rows, classes setosa, versicolor, virginica.
For each row r, the model is fitted on the other 149 rows and predicts row r.

Pipelines (every fitted step fitted on the 149 training rows of the split):
  raw      no step
  std      StandardScaler()
  l2       Normalizer()            (row-wise unit L2 norm; nothing to fit)
  std+l2   StandardScaler(), then Normalizer()

Models (exact calls):
  knn-k1        KNeighborsClassifier(n_neighbors=1, algorithm='brute')
  knn-k5        KNeighborsClassifier(n_neighbors=5, algorithm='brute')
  svm-rbf       SVC(C=1, kernel='rbf', gamma='scale')
  svm-linear    SVC(C=1, kernel='linear')
  logreg        LogisticRegression(C=1, multi_class='multinomial', solver='lbfgs',
                                   max_iter=10000, tol=1e-8)
  interference  closed form of the interference classifier, in numpy (below)
  interference-balanced  the same with class-balancing weights

Interference classifier (closed form, infinite shots, no noise): the test
vector x~ and every training vector x_m are L2-normalised first (a zero
vector is an error). With weights w_m,

  score_k = sum_{m in class k} w_m (1 + <x~, x_m>)
  p_acc   = 1/2 + 1/2 sum_m w_m <x~, x_m>

plain form w_m = 1/M (M training rows), balanced form w_m = 1/(C M_k) (C
classes present in training, M_k rows of the class of m). The prediction is
argmax_k score_k scanned from class 0: a later class wins only if its score
s exceeds the best so far by more than 1e-12 relative (s > best +
1e-12 |best|), so ties go to the lowest class index.

Output: a CSV with '#' comment lines first (versions and calls), then the
columns

  pipeline,model,row,label,predicted,p_acc,ambiguous

row is the 0-based Iris row; label and predicted are class names; p_acc is
the acceptance probability of the interference models (12 decimals; empty
for the others). ambiguous is 1 where the reference answer rests on a tie or
a margin below the reference's own precision, so that another correct
implementation may answer differently:
  knn           distances within 1e-9 relative of the k-th smallest could
                fill the last places in more than one way, and some choice
                changes the vote (scikit-learn keeps whichever tied row its
                heap holds; fringe keeps the lowest training indices);
  svm-*         a one-vs-one decision value below libsvm's stopping
                tolerance 1e-3 (SVC default tol) in magnitude, and flipping
                such pairwise votes can change the predicted class;
  logreg        the lbfgs answer differs from the precise minimiser's
                (LogisticRegression(C=1, multi_class='multinomial',
                solver='newton-cg', max_iter=100, tol=1e-10)): the
                lbfgs fit stops on scipy's relative-decrease test with
                coefficients about 1e-3 off the minimiser; or the two largest
                decision values of the precise minimiser differ by < 1e-6;
  interference  the two largest scores differ by < 1e-9 relative.
The correct counts per (pipeline, model) go to stdout.
"""
import csv
import itertools
import sys
import warnings

import numpy as np
import scipy
import sklearn
from sklearn.datasets import load_iris
from sklearn.linear_model import LogisticRegression
from sklearn.neighbors import KNeighborsClassifier
from sklearn.preprocessing import Normalizer, StandardScaler
from sklearn.svm import SVC

PIPELINES = ["raw", "std", "l2", "std+l2"]
MODELS = ["knn-k1", "knn-k5", "svm-rbf", "svm-linear", "logreg",
          "interference", "interference-balanced"]
CALLS = {
    "knn-k1": "KNeighborsClassifier(n_neighbors=1, algorithm='brute')",
    "knn-k5": "KNeighborsClassifier(n_neighbors=5, algorithm='brute')",
    "svm-rbf": "SVC(C=1, kernel='rbf', gamma='scale')",
    "svm-linear": "SVC(C=1, kernel='linear')",
    "logreg": ("LogisticRegression(C=1, multi_class='multinomial', solver='lbfgs', "
               "max_iter=10000, tol=1e-8)"),
    "std": "StandardScaler()",
    "l2": "Normalizer()",
}


def transform(pipeline, x_train, x_test):
    steps = [] if pipeline == "raw" else pipeline.split("+")
    for step in steps:
        if step == "std":
            scaler = StandardScaler().fit(x_train)
        elif step == "l2":
            scaler = Normalizer().fit(x_train)
        else:
            raise ValueError(step)
        x_train, x_test = scaler.transform(x_train), scaler.transform(x_test)
    return x_train, x_test


def first_argmax(v):
    best = 0
    for k in range(1, len(v)):
        if v[k] > v[best]:
            best = k
    return best


def knn_ambiguous(x_train, y_train, x, k, n_class):
    dist = np.sqrt(((x_train - x) ** 2).sum(axis=1))
    dk = np.sort(dist)[k - 1]
    window = 1e-9 * dk + 1e-12
    sure = dist < dk - window
    tied = np.abs(dist - dk) <= window
    need = k - int(sure.sum())
    base = np.bincount(y_train[sure], minlength=n_class)
    avail = np.bincount(y_train[tied], minlength=n_class)
    preds = set()
    for take in itertools.product(*[range(a + 1) for a in avail]):
        if sum(take) == need:
            preds.add(first_argmax(base + np.array(take)))
    return len(preds) > 1


def svm_ambiguous(model, x, n_class):
    model.decision_function_shape = "ovo"  # does not change predict
    f = model.decision_function(x[None, :])[0]
    pairs = list(itertools.combinations(range(n_class), 2))
    near = [i for i, v in enumerate(f) if abs(v) < 1e-3]
    preds = set()
    for flips in itertools.product([False, True], repeat=len(near)):
        votes = np.zeros(n_class, int)
        for i, (a, b) in enumerate(pairs):
            wins_a = f[i] > 0
            if i in near and flips[near.index(i)]:
                wins_a = not wins_a
            votes[a if wins_a else b] += 1
        preds.add(first_argmax(votes))
    return len(preds) > 1


def interference(x_train, y_train, x, n_class, balanced):
    norms = np.linalg.norm(x_train, axis=1)
    if np.any(norms == 0) or np.linalg.norm(x) == 0:
        raise ValueError("zero vector: amplitude encoding undefined")
    xt = x_train / norms[:, None]
    xq = x / np.linalg.norm(x)
    dots = xt @ xq
    m = len(y_train)
    counts = np.bincount(y_train, minlength=n_class)
    if balanced:
        present = int((counts > 0).sum())
        w = 1.0 / (present * counts[y_train])
    else:
        w = np.full(m, 1.0 / m)
    scores = np.array([np.sum(w[y_train == k] * (1 + dots[y_train == k]))
                       for k in range(n_class)])
    best, pred = scores[0], 0
    for k in range(1, n_class):
        if scores[k] > best + 1e-12 * abs(best):
            best, pred = scores[k], k
    p_acc = 0.5 + 0.5 * np.sum(w * dots)
    top = np.sort(scores)[::-1]
    ambiguous = top[0] - top[1] < 1e-9 * abs(top[0])
    return pred, p_acc, ambiguous


def main():
    out_path = sys.argv[1] if len(sys.argv) > 1 else "bench/runner/testdata/iris_loo_reference.csv"
    iris = load_iris()
    x_all, y_all, names = iris.data, iris.target, list(iris.target_names)
    n, n_class = len(y_all), len(names)
    rows = {(p, m): [] for p in PIPELINES for m in MODELS}
    for pipeline in PIPELINES:
        for r in range(n):
            train = np.arange(n) != r
            x_train, x_test = transform(pipeline, x_all[train], x_all[r:r + 1])
            y_train, x = y_all[train], x_test[0]
            for k in (1, 5):
                model = KNeighborsClassifier(n_neighbors=k, algorithm="brute").fit(x_train, y_train)
                pred = int(model.predict(x_test)[0])
                amb = knn_ambiguous(x_train, y_train, x, k, n_class)
                rows[(pipeline, "knn-k%d" % k)].append((r, pred, "", amb))
            for name, model in (("svm-rbf", SVC(C=1, kernel="rbf", gamma="scale")),
                                ("svm-linear", SVC(C=1, kernel="linear"))):
                model.fit(x_train, y_train)
                pred = int(model.predict(x_test)[0])
                rows[(pipeline, name)].append((r, pred, "", svm_ambiguous(model, x, n_class)))
            model = LogisticRegression(C=1, multi_class="multinomial", solver="lbfgs",
                                       max_iter=10000, tol=1e-8).fit(x_train, y_train)
            pred = int(model.predict(x_test)[0])
            with warnings.catch_warnings():
                # newton-cg may warn, and run to max_iter, once its gradient
                # is at rounding level (it converges in about 10 steps).
                warnings.simplefilter("ignore")
                precise = LogisticRegression(C=1, multi_class="multinomial", solver="newton-cg",
                                             max_iter=100, tol=1e-10).fit(x_train, y_train)
            z = np.sort(precise.decision_function(x_test)[0])[::-1]
            amb = int(precise.predict(x_test)[0]) != pred or z[0] - z[1] < 1e-6
            rows[(pipeline, "logreg")].append((r, pred, "", amb))
            for name, balanced in (("interference", False), ("interference-balanced", True)):
                pred, p_acc, amb = interference(x_train, y_train, x, n_class, balanced)
                rows[(pipeline, name)].append((r, pred, "%.12f" % p_acc, amb))

    with open(out_path, "w", newline="") as fh:
        fh.write("# scripts/ref_iris_loo.py: scikit-learn %s, numpy %s, scipy %s, python %s; "
                 "leave-one-out on sklearn.datasets.load_iris() (150 rows); pipelines raw, "
                 "std=%s, l2=%s, std+l2 (fitted on the 149 training rows); models %s; "
                 "interference and interference-balanced: numpy closed form (see the script)\n"
                 % (sklearn.__version__, np.__version__, scipy.__version__,
                    sys.version.split()[0], CALLS["std"], CALLS["l2"],
                    "; ".join("%s=%s" % (m, CALLS[m]) for m in MODELS if m in CALLS)))
        fh.write("# p_acc: acceptance probability (interference models only); ambiguous=1: "
                 "the reference rests on a tie or a margin below its own precision (see the script)\n")
        w = csv.writer(fh, lineterminator="\n")
        w.writerow(["pipeline", "model", "row", "label", "predicted", "p_acc", "ambiguous"])
        for pipeline in PIPELINES:
            for model in MODELS:
                for r, pred, p_acc, amb in rows[(pipeline, model)]:
                    w.writerow([pipeline, model, r, names[y_all[r]], names[pred], p_acc, int(amb)])

    print("pipeline  model                  correct  ambiguous")
    for pipeline in PIPELINES:
        for model in MODELS:
            res = rows[(pipeline, model)]
            correct = sum(1 for r, pred, _, _ in res if pred == y_all[r])
            amb = sum(1 for _, _, _, a in res if a)
            print("%-9s %-22s %3d/%d  %d" % (pipeline, model, correct, n, amb))


if __name__ == "__main__":
    main()
