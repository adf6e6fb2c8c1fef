#!/usr/bin/python3
"""Reference values for bench/report/compare.go (WelchT, TwoProportions).

Writes bench/report/testdata/ref_compare.json. Run with Debian's /usr/bin/python3
(scipy 1.10.1):  /usr/bin/python3 scripts/ref_compare.py

- Welch: scipy.stats.ttest_ind_from_stats(m1, se1*sqrt(n1), n1, m2,
  se2*sqrt(n2), n2, equal_var=False) gives t and p for standard errors se
  with n-1 degrees of freedom; df is the Welch-Satterthwaite formula written
  out here; the interval uses scipy.stats.t.ppf(1 - alpha/2, df).
- Two proportions: scipy.stats.chi2_contingency([[k1, n1-k1], [k2, n2-k2]],
  correction=False) gives chi2 = z^2 and the two-sided p of the pooled
  z-test; the Newcombe (1998, method 10) interval is built from
  scipy.stats.binomtest(k, n).proportion_ci(1 - alpha, method='wilson').
"""
import json
import math
import os

import numpy as np
import scipy
from scipy import stats

rng = np.random.default_rng(20261201)
welch = []
for i in range(12):
    n1, n2 = int(rng.integers(3, 40)), int(rng.integers(3, 40))
    m1, m2 = float(rng.uniform(0.5, 1.0)), float(rng.uniform(0.5, 1.0))
    se1, se2 = float(rng.uniform(0.005, 0.08)), float(rng.uniform(0.005, 0.08))
    alpha = [0.05, 0.10, 0.01][i % 3]
    res = stats.ttest_ind_from_stats(m1, se1 * math.sqrt(n1), n1, m2, se2 * math.sqrt(n2), n2, equal_var=False)
    v1, v2 = se1 ** 2, se2 ** 2
    df = (v1 + v2) ** 2 / (v1 ** 2 / (n1 - 1) + v2 ** 2 / (n2 - 1))
    q = stats.t.ppf(1 - alpha / 2, df)
    se = math.sqrt(v1 + v2)
    welch.append(dict(m1=m1, se1=se1, df1=n1 - 1, m2=m2, se2=se2, df2=n2 - 1, alpha=alpha,
                      t=float(res.statistic), p=float(res.pvalue), df=df,
                      lo=(m1 - m2) - q * se, hi=(m1 - m2) + q * se))

props = []
cases = [(56, 70, 48, 80, 0.05), (9, 10, 3, 10, 0.05), (140, 150, 128, 150, 0.05),
         (45, 50, 45, 50, 0.10), (1, 30, 6, 30, 0.05), (97, 100, 88, 100, 0.01)]
for k1, n1, k2, n2, alpha in cases:
    chi2, p, _, _ = stats.chi2_contingency([[k1, n1 - k1], [k2, n2 - k2]], correction=False)
    c1 = stats.binomtest(k1, n1).proportion_ci(1 - alpha, method='wilson')
    c2 = stats.binomtest(k2, n2).proportion_ci(1 - alpha, method='wilson')
    p1, p2 = k1 / n1, k2 / n2
    d = p1 - p2
    lo = d - math.sqrt((p1 - c1.low) ** 2 + (c2.high - p2) ** 2)
    hi = d + math.sqrt((c1.high - p1) ** 2 + (p2 - c2.low) ** 2)
    props.append(dict(k1=k1, n1=n1, k2=k2, n2=n2, alpha=alpha, z2=float(chi2), p=float(p), lo=lo, hi=hi))

out = dict(source="scripts/ref_compare.py with scipy %s, numpy %s" % (scipy.__version__, np.__version__),
           welch=welch, two_proportions=props)
path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "bench", "report", "testdata", "ref_compare.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", os.path.normpath(path))
