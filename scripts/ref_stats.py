#!/usr/bin/python3
"""Reference values for the fringe statistics package (bench/stats).

Computes, with numpy and scipy, the quantities that bench/stats computes in
Go, on fixed inputs, and writes them to bench/stats/testdata/ref_stats.json
together with the library versions and the exact call behind every number.
The Go tests read that fixture; they never run Python.

Run from the repository root with the Debian interpreter (numpy 1.24.2,
scipy 1.10.1, scikit-learn 1.2.1 for the Wine folds):

    /usr/bin/python3 scripts/ref_stats.py

Inputs are drawn from numpy's PCG64 generator with fixed seeds and rounded
to four decimals, then stored in the fixture, so the Go side uses exactly
the values scipy saw.
"""

import json
import platform
import sys
from pathlib import Path

import numpy as np
import scipy
import sklearn
from scipy import stats
from sklearn.datasets import load_wine
from sklearn.model_selection import StratifiedKFold
from sklearn.naive_bayes import GaussianNB
from sklearn.neighbors import KNeighborsClassifier
from sklearn.pipeline import make_pipeline
from sklearn.preprocessing import StandardScaler

OUT = Path(__file__).resolve().parent.parent / "bench" / "stats" / "testdata" / "ref_stats.json"


def r4(x):
    return [round(float(v), 4) for v in x]


def corrected_interval_case(scores, n_train, n_test, alpha):
    s = np.asarray(scores)
    n = s.size
    mean = s.mean()
    var = s.var(ddof=1)
    tq = stats.t.ppf(1 - alpha / 2, n - 1)
    se_c = np.sqrt((1 / n + n_test / n_train) * var)
    se_n = np.sqrt(var / n)
    return {
        "scores": scores, "n_train": n_train, "n_test": n_test, "alpha": alpha,
        "call": "mean = s.mean(); var = s.var(ddof=1); tq = scipy.stats.t.ppf(1 - alpha/2, n - 1); "
                "corrected: mean -/+ tq*sqrt((1/n + n_test/n_train)*var); naive: mean -/+ tq*sqrt(var/n)",
        "mean": mean, "std": np.sqrt(var), "df": n - 1, "t_quantile": tq,
        "corrected": {"se": se_c, "lo": mean - tq * se_c, "hi": mean + tq * se_c},
        "naive": {"se": se_n, "lo": mean - tq * se_n, "hi": mean + tq * se_n},
    }


def corrected_t_case(a, b, n_train, n_test):
    d = np.asarray(a) - np.asarray(b)
    n = d.size
    t = d.mean() / np.sqrt((1 / n + n_test / n_train) * d.var(ddof=1))
    return {
        "a": a, "b": b, "n_train": n_train, "n_test": n_test,
        "call": "d = a - b; t = d.mean()/sqrt((1/n + n_test/n_train)*d.var(ddof=1)); "
                "p = 2*scipy.stats.t.sf(abs(t), n - 1)",
        "t": t, "df": n - 1, "p": 2 * stats.t.sf(abs(t), n - 1),
    }


def corrected_t_uneven_case():
    """Corrected paired t on the uneven folds of Wine (178 rows, 10 folds).

    Fold scores of two scikit-learn classifiers on the splits of
    StratifiedKFold; the test sizes are 17 or 18, so the mean sizes 17.8
    and 160.2 are not whole numbers. The statistic uses their exact ratio
    (Nadeau & Bengio define n2/n1 on the sizes); the rounded sizes 18/160
    are recorded for contrast.
    """
    X, y = load_wine(return_X_y=True)
    cv = StratifiedKFold(n_splits=10, shuffle=True, random_state=178)
    a, b, n_train, n_test = [], [], [], []
    for tr, te in cv.split(X, y):
        m1 = make_pipeline(StandardScaler(), KNeighborsClassifier(n_neighbors=5)).fit(X[tr], y[tr])
        m2 = GaussianNB().fit(X[tr], y[tr])
        a.append(float(np.mean(m1.predict(X[te]) == y[te])))
        b.append(float(np.mean(m2.predict(X[te]) == y[te])))
        n_train.append(len(tr))
        n_test.append(len(te))
    d = np.asarray(a) - np.asarray(b)
    n = d.size
    mtr, mte = float(np.mean(n_train)), float(np.mean(n_test))
    tq = stats.t.ppf(0.975, n - 1)

    def t_of(ratio):
        se = np.sqrt((1 / n + ratio) * d.var(ddof=1))
        return d.mean() / se, se

    t, se = t_of(mte / mtr)
    tr_, _ = t_of(round(mte) / round(mtr))
    return {
        "dataset": "wine: sklearn.datasets.load_wine(return_X_y=True), 178 rows",
        "splits": "sklearn.model_selection.StratifiedKFold(n_splits=10, shuffle=True, random_state=178)",
        "models": "a: make_pipeline(StandardScaler(), KNeighborsClassifier(n_neighbors=5)); b: GaussianNB(); "
                  "fold accuracy mean(predict(X[test]) == y[test])",
        "n_train": n_train, "n_test": n_test, "a": a, "b": b,
        "mean_train": mtr, "mean_test": mte,
        "call": "d = a - b; t = d.mean()/sqrt((1/n + mean(n_test)/mean(n_train))*d.var(ddof=1)); "
                "p = 2*scipy.stats.t.sf(abs(t), n - 1); interval d.mean() -/+ scipy.stats.t.ppf(0.975, n - 1)*se",
        "t": t, "df": n - 1, "p": 2 * stats.t.sf(abs(t), n - 1),
        "lo": d.mean() - tq * se, "hi": d.mean() + tq * se,
        "t_rounded": tr_, "p_rounded": 2 * stats.t.sf(abs(tr_), n - 1),
    }


def five_by_two_case(diff):
    d = np.asarray(diff)
    pbar = d.mean(axis=1)
    s2 = ((d - pbar[:, None]) ** 2).sum(axis=1)
    t = d[0, 0] / np.sqrt(s2.sum() / 5)
    return {
        "diff": diff,
        "call": "s2_i = sum_j (d[i,j] - d[i].mean())**2; t = d[0,0]/sqrt(s2.sum()/5); "
                "p = 2*scipy.stats.t.sf(abs(t), 5)",
        "t": t, "p": 2 * stats.t.sf(abs(t), 5),
    }


def mcnemar_case(b, c):
    n = b + c
    stat = max(abs(b - c) - 1, 0) ** 2 / n
    return {
        "b": b, "c": c,
        "call": "chi2 = max(|b-c| - 1, 0)**2/(b+c); p = scipy.stats.chi2.sf(chi2, 1); "
                "p_exact = scipy.stats.binomtest(min(b, c), b + c, 0.5).pvalue",
        "chi2": stat, "p": stats.chi2.sf(stat, 1),
        "p_exact": stats.binomtest(min(b, c), n, 0.5).pvalue,
    }


def untied_pairs(rng, n):
    """Pairs whose differences are non-zero with distinct magnitudes."""
    while True:
        a = r4(0.80 + 0.05 * rng.standard_normal(n))
        b = r4(np.asarray(a) - 0.01 - 0.03 * rng.standard_normal(n))
        d = np.abs(np.round(np.asarray(a) - np.asarray(b), 4))
        if np.all(d > 0) and np.unique(d).size == n:
            return a, b


def wilcoxon_case(a, b):
    ex = stats.wilcoxon(a, b, method="exact")
    ap = stats.wilcoxon(a, b, method="approx", correction=False)
    return {
        "a": a, "b": b,
        "call": "scipy.stats.wilcoxon(a, b, method='exact') and "
                "scipy.stats.wilcoxon(a, b, method='approx', correction=False)",
        "T": ex.statistic, "p_exact": ex.pvalue, "z": ap.zstatistic, "p_normal": ap.pvalue,
    }


def friedman_case(name, table, alphas=(0.05, 0.10)):
    data = np.asarray(table)
    n, k = data.shape
    res = stats.friedmanchisquare(*data.T)
    ranks = np.array([stats.rankdata(-row) for row in data])  # rank 1 = highest, ties averaged
    avg = ranks.mean(axis=0)
    chi2 = 12 * n / (k * (k + 1)) * (np.sum(avg ** 2) - k * (k + 1) ** 2 / 4)
    chi2c = res.statistic
    F = (n - 1) * chi2c / (n * (k - 1) - chi2c)
    # Two-way analysis of variance on the (average) ranks: models are the
    # treatments, data sets the blocks (whose rank sums are all equal).
    centred = ranks - (k + 1) / 2
    ss_models = n * np.sum((avg - (k + 1) / 2) ** 2)
    ss_total = np.sum(centred ** 2)
    F_anova = (n - 1) * ss_models / (ss_total - ss_models)
    return {
        "name": name, "scores": table,
        "call": "res = scipy.stats.friedmanchisquare(*np.asarray(scores).T); "
                "ranks = [scipy.stats.rankdata(-row) for row in scores]; avg = ranks.mean(axis=0); "
                "chi2 = 12n/(k(k+1))*(sum(avg**2) - k(k+1)**2/4); "
                "F = (n-1)*res.statistic/(n(k-1) - res.statistic); "
                "p = scipy.stats.f.sf(F, k-1, (k-1)(n-1)); "
                "F_anova_ranks = (n-1)*SS_models/(SS_total - SS_models) on the centred ranks; "
                "cd = scipy.stats.studentized_range.ppf(1-alpha, k, np.inf)/np.sqrt(2)*np.sqrt(k(k+1)/(6n))",
        "chi2_tie_corrected": chi2c, "p_chi2_tie_corrected": res.pvalue,
        "avg_ranks": avg.tolist(), "chi2": chi2, "p_chi2": stats.chi2.sf(chi2, k - 1),
        "F": F, "p": stats.f.sf(F, k - 1, (k - 1) * (n - 1)), "F_anova_ranks": F_anova,
        "cd": [{"alpha": al, "cd": stats.studentized_range.ppf(1 - al, k, np.inf) / np.sqrt(2)
                * np.sqrt(k * (k + 1) / (6 * n))} for al in alphas],
    }


def main():
    out = {
        "generator": "scripts/ref_stats.py",
        "versions": {
            "python": platform.python_version(),
            "numpy": np.__version__,
            "scipy": scipy.__version__,
            "sklearn": sklearn.__version__,
        },
    }

    # Interval of a cell: 10 repeats x 10 folds of an accuracy-like score,
    # iris-sized folds (n_train 135, n_test 15).
    rng = np.random.default_rng(20060101)
    scores = r4(np.clip(0.93 + 0.05 * rng.standard_normal(100), 0, 1))
    out["interval"] = [
        corrected_interval_case(scores, 135, 15, 0.05),
        corrected_interval_case(scores, 135, 15, 0.10),
        corrected_interval_case(scores[:10], 90, 10, 0.05),
    ]

    # Corrected paired t on correlated fold scores.
    rng = np.random.default_rng(20030052)
    base = 0.85 + 0.04 * rng.standard_normal(50)
    a = r4(base + 0.02 * rng.standard_normal(50))
    b = r4(base - 0.012 + 0.02 * rng.standard_normal(50))
    out["corrected_t"] = [
        corrected_t_case(a, b, 180, 20),
        corrected_t_case(a[:10], b[:10], 180, 20),
    ]
    out["corrected_t_uneven"] = corrected_t_uneven_case()

    # 5x2cv.
    rng = np.random.default_rng(19981895)
    out["five_by_two"] = [
        five_by_two_case([r4(0.02 + 0.015 * rng.standard_normal(2)) for _ in range(5)]),
        five_by_two_case([r4(-0.005 + 0.02 * rng.standard_normal(2)) for _ in range(5)]),
    ]

    out["mcnemar"] = [mcnemar_case(b, c) for b, c in
                      [(10, 2), (3, 3), (30, 12), (1, 0), (40, 45), (7, 19), (100, 70)]]

    # Wilcoxon without ties or zeros (where scipy 1.10.1's exact mode is valid).
    rng = np.random.default_rng(20060007)
    out["wilcoxon"] = [wilcoxon_case(*untied_pairs(rng, n)) for n in (8, 14, 20, 25, 40)]

    # Demsar (2006), Table 2 pair, with its zero and tied differences:
    # scipy's zsplit rule splits the zero ranks as Demsar does (two zeros,
    # an even number, so none is ignored).
    c45 = [0.763, 0.599, 0.954, 0.628, 0.882, 0.936, 0.661, 0.583, 0.775, 1.000, 0.940, 0.619, 0.972, 0.957]
    c45m = [0.768, 0.591, 0.971, 0.661, 0.888, 0.931, 0.668, 0.583, 0.838, 1.000, 0.962, 0.666, 0.981, 0.978]
    z = stats.wilcoxon(c45m, c45, zero_method="zsplit", method="approx", correction=False)
    out["wilcoxon_demsar"] = {
        "a": c45m, "b": c45,
        "call": "scipy.stats.wilcoxon(a, b, zero_method='zsplit', method='approx', correction=False)",
        "T": z.statistic,
    }

    # Friedman: Demsar (2006) Table 6 inputs, as printed (one tied pair in
    # 'voting') and with that tie broken as the paper's ranks imply; and a
    # tie-free table, where the tie correction is 1.
    table6 = [
        [0.763, 0.768, 0.771, 0.798], [0.599, 0.591, 0.590, 0.569], [0.954, 0.971, 0.968, 0.967],
        [0.628, 0.661, 0.654, 0.657], [0.882, 0.888, 0.886, 0.898], [0.936, 0.931, 0.916, 0.931],
        [0.661, 0.668, 0.609, 0.685], [0.583, 0.583, 0.563, 0.625], [0.775, 0.838, 0.866, 0.875],
        [1.000, 1.000, 1.000, 1.000], [0.940, 0.962, 0.965, 0.962], [0.619, 0.666, 0.614, 0.669],
        [0.972, 0.981, 0.975, 0.975], [0.957, 0.978, 0.946, 0.970],
    ]
    broken = [row[:] for row in table6]
    broken[12][2] = 0.9751
    rng = np.random.default_rng(20061)
    free = [r4(0.7 + 0.1 * rng.standard_normal(5)) for _ in range(9)]
    assert all(len(set(row)) == len(row) for row in free)
    out["friedman"] = [
        friedman_case("demsar-table6", table6),
        friedman_case("demsar-table6-tie-broken", broken),
        friedman_case("tie-free", free),
    ]

    # Studentized range, infinite df.
    out["studentized_range"] = {
        "ppf_call": "scipy.stats.studentized_range.ppf(1 - alpha, k, np.inf) / np.sqrt(2)",
        "nemenyi_q": [{"alpha": al, "k": k,
                       "q": stats.studentized_range.ppf(1 - al, k, np.inf) / np.sqrt(2)}
                      for al in (0.05, 0.10) for k in range(2, 11)],
        "cdf_call": "scipy.stats.studentized_range.cdf(q, k, np.inf)",
        "cdf": [{"q": q, "k": k, "p": stats.studentized_range.cdf(q, k, np.inf)}
                for k in (2, 3, 5, 10, 20) for q in (0.5, 2.0, 3.5, 5.0)],
    }

    out["wilson"] = {
        "call": "scipy.stats.binomtest(k, n).proportion_ci(confidence_level=1 - alpha, method='wilson')",
        "cases": [],
    }
    for k, n, al in [(81, 263, 0.05), (15, 148, 0.05), (0, 10, 0.05), (10, 10, 0.05), (1, 29, 0.10), (143, 150, 0.01)]:
        ci = stats.binomtest(k, n).proportion_ci(confidence_level=1 - al, method="wilson")
        out["wilson"]["cases"].append({"k": k, "n": n, "alpha": al, "lo": ci.low, "hi": ci.high})

    OUT.parent.mkdir(parents=True, exist_ok=True)
    text = json.dumps(out, indent=1, default=float)
    OUT.write_text(text + "\n")
    print(f"wrote {OUT}", file=sys.stderr)


if __name__ == "__main__":
    main()
