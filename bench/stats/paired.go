package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// CorrectedPairedTSizes is the corrected resampled t test (Nadeau &
// Bengio, Machine Learning 52:239, 2003) of two models scored on the same
// splits, whose mean sizes are s: with d_i = a_i − b_i over the n = r·k
// splits,
//
//	t = mean(d) / sqrt((1/n + s.Test/s.Train) · s_d²),   n − 1 degrees of freedom,
//
// and a two-sided p-value. The interval of the mean difference is
// CorrectedIntervalSizes(d, s, alpha). Uneven folds are treated as in
// CorrectedIntervalSizes (the ratio of the mean sizes).
//
// Degenerate input: a single pair gives Statistic and P NaN (Reject false)
// with a warning. When every d_i is equal (zero variance) the statistic is
// ±Inf with P = 0 if the common difference is non-zero, and 0 with P = 1
// if it is zero; both carry a warning. Leave-one-out (test size 1)
// carries a warning as in CorrectedIntervalSizes. It returns an error for
// samples of different lengths, none, non-finite values, sizes below 1 or
// not finite, or alpha outside (0, 1).
func CorrectedPairedTSizes(a, b []float64, s Sizes, alpha float64) (TestResult, error) {
	if err := checkAlpha(alpha); err != nil {
		return TestResult{}, fmt.Errorf("stats: corrected paired t: %w", err)
	}
	if err := checkPaired(a, b); err != nil {
		return TestResult{}, fmt.Errorf("stats: corrected paired t: %w", err)
	}
	if len(a) == 0 {
		return TestResult{}, fmt.Errorf("stats: corrected paired t: %w: no pairs", ErrTooFew)
	}
	if err := s.check(); err != nil {
		return TestResult{}, fmt.Errorf("stats: corrected paired t: %w", err)
	}
	d := make([]float64, len(a))
	for i := range a {
		d[i] = a[i] - b[i]
	}
	n := len(d)
	var r TestResult
	r.DF = n - 1
	if n < 2 {
		r.Statistic = math.NaN()
		r.warnf("too few samples: %d pair, no variance estimate", n)
		r.decide(math.NaN(), alpha)
		return r, nil
	}
	mean, v := meanVar(d)
	factor := 1/float64(n) + s.Test/s.Train
	r.Statistic, r.P = tTwoSided(&r, mean, factor*v, n-1, maxAbs(a)+maxAbs(b))
	r.decide(r.P, alpha)
	if s.leaveOneOut() {
		r.warnf("one test instance per split (leave-one-out): per-fold scores are single outcomes; prefer McNemar's test on the pooled predictions")
	}
	return r, nil
}

// CorrectedPairedT is CorrectedPairedTSizes with whole split sizes, for
// splits that all have nTrain training and nTest test instances. With
// uneven folds, pass the exact mean sizes to CorrectedPairedTSizes instead
// of rounding them.
func CorrectedPairedT(a, b []float64, nTrain, nTest int, alpha float64) (TestResult, error) {
	return CorrectedPairedTSizes(a, b, Sizes{Train: float64(nTrain), Test: float64(nTest)}, alpha)
}

// tTwoSided returns t = mean/sqrt(v2) and its two-sided p-value with df
// degrees of freedom, handling zero variance as documented on
// CorrectedPairedT. scale is the magnitude of the data, to decide whether
// the mean is zero up to rounding.
func tTwoSided(r *TestResult, mean, v2 float64, df int, scale float64) (t, p float64) {
	if v2 == 0 {
		if math.Abs(mean) <= TieTolerance*scale {
			r.warnf("zero variance and zero mean difference: t set to 0, p to 1")
			return 0, 1
		}
		r.warnf("zero variance: the differences do not vary (mean %g); t is infinite", mean)
		return math.Copysign(math.Inf(1), mean), 0
	}
	t = mean / math.Sqrt(v2)
	p = 2 * distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(df)}.Survival(math.Abs(t))
	return t, min(p, 1)
}

// FiveByTwoCV is Dietterich's 5×2cv paired t test (Neural Computation
// 10:1895, 1998). diff[i][j] is the difference of the two models' scores
// on fold j of replication i of 2-fold cross-validation (the same sign
// convention throughout). With p̄_i = (diff[i][0] + diff[i][1])/2 and
// s_i² = (diff[i][0] − p̄_i)² + (diff[i][1] − p̄_i)²,
//
//	t = diff[0][0] / sqrt(Σ s_i² / 5),   5 degrees of freedom,
//
// and a two-sided p-value. Zero variance (every replication has equal
// fold differences) is handled as in CorrectedPairedT, judged on
// diff[0][0]. It returns an error for non-finite values or alpha outside
// (0, 1).
func FiveByTwoCV(diff [5][2]float64, alpha float64) (TestResult, error) {
	if err := checkAlpha(alpha); err != nil {
		return TestResult{}, fmt.Errorf("stats: 5x2cv t: %w", err)
	}
	var flat [10]float64
	for i := range diff {
		for j, v := range diff[i] {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return TestResult{}, fmt.Errorf("stats: 5x2cv t: %w: diff[%d][%d] = %v", ErrNotFinite, i, j, v)
			}
			flat[2*i+j] = v
		}
	}
	var sum float64
	for _, row := range diff {
		m := (row[0] + row[1]) / 2
		sum += (row[0]-m)*(row[0]-m) + (row[1]-m)*(row[1]-m)
	}
	r := TestResult{DF: 5}
	r.Statistic, r.P = tTwoSided(&r, diff[0][0], sum/5, 5, maxAbs(flat[:]))
	r.decide(r.P, alpha)
	return r, nil
}

// McNemarSmall is the number of discordant pairs b + c below which McNemar
// warns that the chi-square approximation is poor and PExact should be
// preferred (common practice: the rule of thumb b + c ≥ 25).
const McNemarSmall = 25

// McNemarResult is the outcome of McNemar's test.
type McNemarResult struct {
	// TestResult holds the continuity-corrected chi-square statistic,
	// 1 degree of freedom, its p-value and the decision taken on it.
	TestResult
	// B and C are the discordant counts: instances only the first model
	// got right, and instances only the second model got right.
	B, C int
	// PExact is the exact two-sided binomial p-value,
	// min(1, 2·P(X ≤ min(b, c))) with X ~ Binomial(b + c, 1/2).
	PExact float64
}

// McNemar is McNemar's test of two classifiers on the same test
// instances, from the discordant counts b and c, with the continuity
// correction
//
//	chi² = (max(|b − c| − 1, 0))² / (b + c),   1 degree of freedom.
//
// The max(·, 0) keeps the correction from pushing the statistic past zero
// when b = c (as scipy's Yates correction in chi2_contingency does); the
// unclamped form would give chi² = 1/(b+c) > 0 there. Reject is taken on
// the chi-square p-value; the exact binomial p-value is always returned in
// PExact, and a warning recommends it when b + c < McNemarSmall.
// b + c = 0 gives Statistic 0, P = PExact = 1 and a warning. It returns an
// error for negative counts or alpha outside (0, 1).
func McNemar(b, c int, alpha float64) (McNemarResult, error) {
	if err := checkAlpha(alpha); err != nil {
		return McNemarResult{}, fmt.Errorf("stats: mcnemar: %w", err)
	}
	if b < 0 || c < 0 {
		return McNemarResult{}, fmt.Errorf("stats: mcnemar: %w: negative count b = %d, c = %d", ErrTooFew, b, c)
	}
	r := McNemarResult{B: b, C: c}
	r.DF = 1
	n := b + c
	if n == 0 {
		r.warnf("no discordant pairs (b + c = 0): the models agree on every instance; p set to 1")
		r.PExact = 1
		r.decide(1, alpha)
		return r, nil
	}
	diff := max(math.Abs(float64(b-c))-1, 0)
	r.Statistic = diff * diff / float64(n)
	r.decide(distuv.ChiSquared{K: 1}.Survival(r.Statistic), alpha)
	r.PExact = min(1, 2*distuv.Binomial{N: float64(n), P: 0.5}.CDF(float64(min(b, c))))
	if n < McNemarSmall {
		r.warnf("few discordant pairs (b + c = %d < %d): the chi-square approximation is poor; prefer the exact binomial p-value, %.4g", n, McNemarSmall, r.PExact)
	}
	return r, nil
}
