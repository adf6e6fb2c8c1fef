#!/usr/bin/python3
"""Reference values for the formulas of `fringe assess`, computed with numpy
and scipy (Debian python3-numpy 1.24.2, python3-scipy 1.10.1).

  alignment  centered kernel-target alignment (Cortes, Mohri & Rostamizadeh,
             JMLR 13:795, 2012, Definition 4) of the interference kernel
             (1 + cos)/2 and of an RBF kernel with the ideal kernel of the
             labels, on fixed small matrices:
                 H = np.eye(n) - np.ones((n, n)) / n
                 Kc, Tc = H @ K @ H, H @ T @ H
                 rho = np.sum(Kc * Tc) / (np.linalg.norm(Kc) * np.linalg.norm(Tc))
  shots      the normal-approximation budget N = z^2 (a+b-(a-b)^2)/(a-b)^2,
             z = scipy.stats.norm.ppf(conf), and the exact probability that
             N shots decide right, P(n1 > n2), from scipy.stats.binom:
                 sum_m binom.pmf(m, N, a+b) * binom.sf(floor(m/2), m, a/(a+b))
             plus the smallest N with exact probability >= conf
  noise      the two-qubit error rate p2 with (1-p2)^n2 (1-p2/r)^n1 = 1/2,
             scipy.optimize.brentq on the log
  percentile numpy.percentile(v, q) (method "linear", numpy's default)

Usage: /usr/bin/python3 scripts/ref_assess.py   (writes bench/assess/testdata/assess_reference.json)
"""

import json
import math
import os
import warnings

import numpy as np
import scipy
from scipy import optimize, stats

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
OUT = os.path.join(ROOT, "bench", "assess", "testdata", "assess_reference.json")


def alignment(K, T):
    n = K.shape[0]
    H = np.eye(n) - np.ones((n, n)) / n
    Kc, Tc = H @ K @ H, H @ T @ H
    return float(np.sum(Kc * Tc) / (np.linalg.norm(Kc) * np.linalg.norm(Tc)))


def interference(X):
    U = X / np.linalg.norm(X, axis=1, keepdims=True)
    return (1 + np.clip(U @ U.T, -1, 1)) / 2


def rbf(X, gamma):
    sq = np.sum(X * X, axis=1)
    d2 = np.maximum(sq[:, None] + sq[None, :] - 2 * X @ X.T, 0)
    return np.exp(-gamma * d2)


def exact_prob(N, a, b):
    """P(n1 > n2) for N trinomial shots with P(k1) = a, P(k2) = b."""
    if N == 0:
        return 0.0
    s = a + b
    m = np.arange(1, N + 1)
    pm = stats.binom.pmf(m, N, s)
    win = stats.binom.sf(np.floor(m / 2), m, a / s)  # P(N1 > floor(m/2)) = P(N1 > m/2)
    return float(min(np.sum(pm * win), 1.0))


def main():
    # binom.pmf(m, N, 1.0) for m < N divides by zero inside scipy's boost
    # wrapper and returns the right value 0; the warning is noise.
    warnings.filterwarnings("ignore", message="divide by zero", category=RuntimeWarning)
    rng = np.random.default_rng(20261202)
    cases = []
    for n, d, c, gamma in [(6, 2, 2, 0.5), (9, 3, 3, 0.2), (12, 4, 2, 1.0)]:
        X = np.round(rng.normal(size=(n, d)), 3)
        y = np.arange(n) % c
        X[y == 1] += 0.8  # some class structure
        X = np.round(X, 3)
        T = (y[:, None] == y[None, :]).astype(float)
        cases.append({
            "X": X.tolist(), "y": y.tolist(), "gamma": gamma,
            "interference": alignment(interference(X), T),
            "rbf": alignment(rbf(X, gamma), T),
            "interference_rbf": alignment(interference(X), rbf(X, gamma)),
        })

    conf = 0.95
    z = float(stats.norm.ppf(conf))
    shots = []
    for p_acc, q1, q2 in [(1.0, 0.6, 0.4), (1.0, 0.55, 0.45), (0.8, 0.7, 0.3), (0.5, 0.52, 0.48),
                          (0.9, 0.45, 0.35), (0.6, 0.9, 0.1), (0.75, 0.5, 0.3)]:
        a, b = p_acc * q1, p_acc * q2
        n_formula = z * z * (a + b - (a - b) ** 2) / (a - b) ** 2
        probe = sorted({1, 2, 3, 10, int(math.ceil(n_formula))})
        n_min = 1
        while exact_prob(n_min, a, b) < conf:
            n_min += 1
        shots.append({
            "p_acc": p_acc, "q1": q1, "q2": q2, "conf": conf,
            "n_formula": n_formula,
            "exact": [{"n": n, "p": exact_prob(n, a, b)} for n in probe],
            "n_exact_min": n_min,
        })

    noise = []
    for n2, n1, ratio in [(70, 73, 10.0), (2302, 2000, 10.0), (1, 0, 10.0), (0, 50, 10.0), (500, 500, 1.0)]:
        f = lambda p: n2 * math.log1p(-p) + n1 * math.log1p(-p / ratio) - math.log(0.5)
        p = float(optimize.brentq(f, 1e-15, 1 - 1e-15, xtol=1e-16, rtol=1e-14, maxiter=500))
        noise.append({"n2": n2, "n1": n1, "ratio": ratio, "p2": p})

    pct = []
    for v in [[3.0, 1.0, 2.0], [0.5, 0.9, 0.1, 0.7, 0.3, 0.2], list(np.round(rng.uniform(size=11), 4))]:
        pct.append({"v": [float(x) for x in v], "q": [0, 5, 50, 90, 100],
                    "p": [float(np.percentile(v, q)) for q in [0, 5, 50, 90, 100]]})

    out = {
        "generated_by": "scripts/ref_assess.py",
        "numpy": np.__version__, "scipy": scipy.__version__,
        "z": z, "alignment": cases, "shots": shots, "noise": noise, "percentile": pct,
    }
    with open(OUT, "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")
    for s in shots:
        print("p_acc %.2f q %.2f/%.2f: formula %.1f, exact min %d, exact P at ceil(formula) %.4f" % (
            s["p_acc"], s["q1"], s["q2"], s["n_formula"], s["n_exact_min"],
            [e["p"] for e in s["exact"] if e["n"] == math.ceil(s["n_formula"])][0]))


if __name__ == "__main__":
    main()
