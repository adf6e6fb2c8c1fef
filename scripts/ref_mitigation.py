#!/usr/bin/python3
"""Reference values for fringe/qkernel readout mitigation (MitigateReadout).

Writes qkernel/testdata/ref_mitigation.json, read by qkernel's Go tests.
Each case has n measured bits (1 to 3), one column-stochastic confusion
matrix per bit, C_b = [[1-p01, p10], [p01, 1-p10]] with C_b[i][j] =
P(read i | prepared j), bit b of the outcome index being bit b's reading,
and:

  * "true": a distribution drawn from a flat Dirichlet;
  * "observed": the distribution a device would report, computed with the
    full 2^n x 2^n matrix np.kron(C_{n-1}, ..., C_0) (the Go code never forms
    it: it applies the inverse of each C_b to the pairs of entries that
    differ in bit b);
  * "measured": counts drawn from "observed" with a multinomial of "shots"
    trials (shot noise, so that the inverse can leave the simplex);
  * "inverse": np.linalg.solve(kron, measured / shots) (the unbiased
    estimate, possibly with negative entries);
  * "projected": the Euclidean projection of "inverse" onto the probability
    simplex, by scipy.optimize.minimize(method="SLSQP") on
    ||x - inverse||^2 with sum(x) = 1 and 0 <= x <= 1 (ftol 1e-15; accurate
    to about 1e-9), a solver independent of the sorting algorithm in Go.

Usage: /usr/bin/python3 scripts/ref_mitigation.py   (from the repository root)
"""

import json
import sys
from functools import reduce

import numpy as np
import scipy
from scipy.optimize import minimize

SEED = 20240917
OUT = "qkernel/testdata/ref_mitigation.json"


def project(y):
    n = len(y)
    res = minimize(
        lambda x: float(np.sum((x - y) ** 2)),
        np.full(n, 1.0 / n),
        jac=lambda x: 2 * (x - y),
        method="SLSQP",
        bounds=[(0.0, 1.0)] * n,
        constraints=[{"type": "eq", "fun": lambda x: float(np.sum(x) - 1), "jac": lambda x: np.ones(n)}],
        options={"ftol": 1e-15, "maxiter": 1000},
    )
    if not res.success:
        raise SystemExit(f"SLSQP failed: {res.message}")
    return np.clip(res.x, 0.0, None)


def main():
    rng = np.random.default_rng(SEED)
    cases = []
    for n, shots in [(1, 50), (2, 40), (2, 2000), (3, 60), (3, 100000)]:
        conf = []
        for _ in range(n):
            p01, p10 = rng.uniform(0, 0.2, size=2)
            conf.append([[1 - p01, p10], [p01, 1 - p10]])
        full = reduce(np.kron, [np.array(c) for c in reversed(conf)])
        true = rng.dirichlet(np.ones(2 ** n))
        observed = full @ true
        measured = rng.multinomial(shots, observed / observed.sum())
        inverse = np.linalg.solve(full, measured / shots)
        cases.append({
            "bits": n,
            "confusion": conf,
            "true": true.tolist(),
            "observed": observed.tolist(),
            "shots": shots,
            "measured": measured.tolist(),
            "inverse": inverse.tolist(),
            "projected": project(inverse).tolist(),
        })
    doc = {
        "generator": "scripts/ref_mitigation.py",
        "python": sys.version.split()[0],
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "seed": SEED,
        "cases": cases,
    }
    with open(OUT, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
