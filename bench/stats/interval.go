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

// Sizes are the training and test set sizes behind a sample of resampled
// scores: the mean over the splits, not rounded. For k-fold
// cross-validation of N instances the mean test size is N/k and the mean
// training size N(k−1)/k whether or not k divides N, so the ratio
// Test/Train is exactly 1/(k−1) (Wine, 178 rows, 10 folds: 17.8/160.2,
// not 18/160).
type Sizes struct {
	Train, Test float64
}

// MeanSizes returns the mean training and test sizes of the splits, given
// per split. It returns an error when the slices differ in length, are
// empty, or hold a size below 1.
func MeanSizes(nTrain, nTest []int) (Sizes, error) {
	if len(nTrain) != len(nTest) {
		return Sizes{}, fmt.Errorf("stats: mean sizes: %w: %d training sizes, %d test sizes", ErrLength, len(nTrain), len(nTest))
	}
	if len(nTrain) == 0 {
		return Sizes{}, fmt.Errorf("stats: mean sizes: %w: no splits", ErrTooFew)
	}
	var s Sizes
	for i := range nTrain {
		if nTrain[i] < 1 || nTest[i] < 1 {
			return Sizes{}, fmt.Errorf("stats: mean sizes: %w: split %d has %d training and %d test instances (both must be ≥ 1)", ErrTooFew, i, nTrain[i], nTest[i])
		}
		s.Train += float64(nTrain[i])
		s.Test += float64(nTest[i])
	}
	n := float64(len(nTrain))
	s.Train /= n
	s.Test /= n
	return s, nil
}

func (s Sizes) check() error {
	if !(s.Train >= 1 && s.Test >= 1) || math.IsInf(s.Train, 0) || math.IsInf(s.Test, 0) {
		return fmt.Errorf("%w: training size %v, test size %v (both must be finite and ≥ 1)", ErrTooFew, s.Train, s.Test)
	}
	return nil
}

// leaveOneOut reports whether every split tests one instance.
func (s Sizes) leaveOneOut() bool { return s.Test == 1 }

// CorrectedIntervalSizes returns the corrected resampled t interval of the
// mean of scores from r repeats of k-fold cross-validation (or any
// resampling scheme) whose splits have the mean sizes s:
//
//	SE² = (1/n + s.Test/s.Train) · s²,   n = r·k = len(scores),
//
// with s² the sample variance, and the t quantile with n − 1 degrees of
// freedom (Nadeau & Bengio, Machine Learning 52:239, 2003, define the
// correction n₂/n₁ on the test and training sizes of splits of fixed
// size; the factor 1/(r·k) + n₂/n₁ is Bouckaert & Frank's, PAKDD 2004).
// Uneven folds are treated by the ratio of the mean sizes, which for
// k-fold cross-validation is exactly 1/(k − 1), the value Bouckaert and
// Frank use; see Sizes.
//
// Leave-one-out (every test size 1): the per-fold scores of an accuracy
// are 0 or 1, the interval is then a t interval on Bernoulli outcomes and
// is meaningless (zero width when every instance is right). The interval
// is still computed by the formula above — it never switches method on
// its own — and carries a warning; the caller should report
// Wilson(correct, n, alpha) on the pooled accuracy instead.
//
// Degenerate input: a single score gives Std, SE, Lo and Hi NaN with a
// warning; zero variance gives Lo = Hi = Mean with a warning. It returns
// an error for no scores, non-finite scores, sizes below 1 or not finite,
// or alpha outside (0, 1).
func CorrectedIntervalSizes(scores []float64, s Sizes, alpha float64) (Interval, error) {
	if err := s.check(); err != nil {
		return Interval{}, fmt.Errorf("stats: corrected interval: %w", err)
	}
	factor := 1/float64(len(scores)) + s.Test/s.Train
	iv, err := tInterval(scores, factor, alpha)
	if err != nil {
		return Interval{}, fmt.Errorf("stats: corrected interval: %w", err)
	}
	if s.leaveOneOut() {
		iv.warnf("one test instance per split (leave-one-out): per-fold scores are single outcomes; the corrected t interval is not meaningful, use the Wilson interval on the pooled count")
	}
	return iv, nil
}

// CorrectedInterval is CorrectedIntervalSizes with whole split sizes, for
// splits that all have nTrain training and nTest test instances. With
// uneven folds, pass the exact mean sizes to CorrectedIntervalSizes
// instead of rounding them.
func CorrectedInterval(scores []float64, nTrain, nTest int, alpha float64) (Interval, error) {
	return CorrectedIntervalSizes(scores, Sizes{Train: float64(nTrain), Test: float64(nTest)}, alpha)
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
