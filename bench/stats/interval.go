package stats

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/stat/distuv"
)

// Interval is a two-sided confidence interval of a mean score.
type Interval struct {
	// Mean is the mean of the scores.
	Mean float64
	// Std is the sample standard deviation of the scores (n − 1
	// denominator); NaN for a single score.
	Std float64
	// SE is the standard error of Mean used for the interval.
	SE float64
	// Lo and Hi are the bounds, Mean ∓ t(1 − Alpha/2; DF)·SE. They are not
	// clipped to the range of the score.
	Lo, Hi float64
	// DF is the degrees of freedom of the t quantile, n − 1.
	DF int
	// Alpha is the significance level: the interval has nominal coverage
	// 1 − Alpha.
	Alpha float64
	// Warnings lists doubtful conditions, in a fixed order.
	Warnings []string
}

func (iv *Interval) warnf(format string, args ...any) {
	iv.Warnings = append(iv.Warnings, fmt.Sprintf(format, args...))
}

// CorrectedInterval returns the corrected resampled t interval of the
// mean of scores from r repeats of k-fold cross-validation (or any
// resampling with nTrain training and nTest test instances per split):
//
//	SE² = (1/n + nTest/nTrain) · s²,   n = r·k = len(scores),
//
// with s² the sample variance, and the t quantile with n − 1 degrees of
// freedom (Nadeau & Bengio, Machine Learning 52:239, 2003; the factor
// 1/(r·k) + n_test/n_train as in Bouckaert & Frank, PAKDD 2004). For
// k-fold cross-validation nTest/nTrain ≈ 1/(k−1); with uneven folds pass
// the typical sizes.
//
// Leave-one-out (nTest = 1): the per-fold scores of an accuracy are 0 or
// 1, the interval is then a t interval on Bernoulli outcomes and is
// meaningless (zero width when every instance is right). The interval is
// still computed by the formula above — it never switches method on its
// own — and carries a warning; the caller should report
// Wilson(correct, n, alpha) on the pooled accuracy instead.
//
// Degenerate input: a single score gives Std, SE, Lo and Hi NaN with a
// warning; zero variance gives Lo = Hi = Mean with a warning. It returns
// an error for no scores, non-finite scores, nTrain or nTest < 1, or alpha
// outside (0, 1).
func CorrectedInterval(scores []float64, nTrain, nTest int, alpha float64) (Interval, error) {
	if nTrain < 1 || nTest < 1 {
		return Interval{}, fmt.Errorf("stats: corrected interval: %w: nTrain = %d, nTest = %d (both must be ≥ 1)", ErrTooFew, nTrain, nTest)
	}
	factor := 1/float64(len(scores)) + float64(nTest)/float64(nTrain)
	iv, err := tInterval(scores, factor, alpha)
	if err != nil {
		return Interval{}, fmt.Errorf("stats: corrected interval: %w", err)
	}
	if nTest == 1 {
		iv.warnf("n_test = 1 (leave-one-out): per-fold scores are single outcomes; the corrected t interval is not meaningful, use Wilson on the pooled count")
	}
	return iv, nil
}

// NaiveInterval returns the textbook t interval of the mean of scores,
// SE² = s²/n with n − 1 degrees of freedom. On cross-validation scores it
// ignores the overlap of the training sets and is too narrow; it is here
// to show how much the correction of CorrectedInterval matters. Degenerate
// input and errors are handled as in CorrectedInterval.
func NaiveInterval(scores []float64, alpha float64) (Interval, error) {
	iv, err := tInterval(scores, 1/float64(len(scores)), alpha)
	if err != nil {
		return Interval{}, fmt.Errorf("stats: naive interval: %w", err)
	}
	return iv, nil
}

// tInterval computes Mean ∓ t·sqrt(factor·s²).
func tInterval(scores []float64, factor, alpha float64) (Interval, error) {
	if err := checkAlpha(alpha); err != nil {
		return Interval{}, err
	}
	if len(scores) == 0 {
		return Interval{}, fmt.Errorf("%w: no scores", ErrTooFew)
	}
	if err := checkFinite("scores", scores); err != nil {
		return Interval{}, err
	}
	n := len(scores)
	mean, v := meanVar(scores)
	iv := Interval{Mean: mean, Std: math.Sqrt(v), DF: n - 1, Alpha: alpha}
	if n < 2 {
		iv.SE, iv.Lo, iv.Hi = math.NaN(), math.NaN(), math.NaN()
		iv.warnf("too few samples: %d score, no variance estimate", n)
		return iv, nil
	}
	if v == 0 {
		iv.warnf("zero variance: all %d scores equal; the interval has zero width", n)
	}
	iv.SE = math.Sqrt(factor * v)
	t := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(n - 1)}.Quantile(1 - alpha/2)
	iv.Lo = mean - t*iv.SE
	iv.Hi = mean + t*iv.SE
	return iv, nil
}

// Wilson returns the Wilson score interval (Wilson, JASA 22:209, 1927),
// without continuity correction, for k successes in n trials at nominal
// coverage 1 − alpha:
//
//	(k + z²/2 ∓ z·sqrt(k(n−k)/n + z²/4)) / (n + z²),   z = Φ⁻¹(1 − alpha/2).
//
// The bounds lie in [0, 1]; lo = 0 when k = 0 and hi = 1 when k = n. It
// returns NaN, NaN when n < 1, k < 0, k > n or alpha is outside (0, 1).
func Wilson(k, n int, alpha float64) (lo, hi float64) {
	if n < 1 || k < 0 || k > n || !(alpha > 0 && alpha < 1) {
		return math.NaN(), math.NaN()
	}
	z := distuv.UnitNormal.Quantile(1 - alpha/2)
	z2 := z * z
	fk, fn := float64(k), float64(n)
	center := (fk + z2/2) / (fn + z2)
	half := z * math.Sqrt(fk*(fn-fk)/fn+z2/4) / (fn + z2)
	lo, hi = center-half, center+half
	// Exact endpoints at the boundary (the formula gives them up to rounding).
	if k == 0 {
		lo = 0
	}
	if k == n {
		hi = 1
	}
	return max(lo, 0), min(hi, 1)
}
