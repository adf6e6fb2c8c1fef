package stats

import (
	"cmp"
	"errors"
	"fmt"
	"math"
	"slices"
)

// Sentinel errors wrapped by the errors of this package; test with
// errors.Is. Every returned error reads "stats: <function>: <sentinel>: <detail>".
var (
	// ErrLength: paired samples differ in length, or a table is ragged.
	ErrLength = errors.New("lengths differ")
	// ErrNotFinite: an input value is NaN or infinite.
	ErrNotFinite = errors.New("value is not finite")
	// ErrTooFew: fewer values than the formula needs at all, or a
	// non-positive count or set size.
	ErrTooFew = errors.New("too few values")
	// ErrAlpha: a significance level outside the open interval (0, 1).
	ErrAlpha = errors.New("alpha outside (0, 1)")
	// ErrProbability: a p-value outside [0, 1] or NaN.
	ErrProbability = errors.New("p-value outside [0, 1]")
)

// TieTolerance is the relative tolerance under which two values count as
// tied: |x − y| ≤ TieTolerance · S, with S the largest |score| in the
// input (for Wilcoxon the scores a and b, not their differences, since
// the rounding of a difference is relative to its operands). It absorbs
// the rounding of differences of scores printed to a few digits; a
// genuine difference of one part in 10⁹ of the largest score is below
// anything a benchmark can resolve.
const TieTolerance = 1e-9

// TestResult is the outcome of a hypothesis test.
type TestResult struct {
	// Statistic is the test statistic (t, chi-square, T, ...).
	Statistic float64
	// DF is the degrees of freedom of the reference distribution, 0 where
	// the statistic has none (normal or exact reference distributions).
	DF int
	// P is the two-sided p-value.
	P float64
	// Alpha is the significance level the decision was taken at.
	Alpha float64
	// Reject is the decision: P ≤ Alpha. It is false when P is NaN.
	Reject bool
	// Warnings lists conditions that make the result doubtful (too few
	// samples, ties, zero variance, poor approximation), in a fixed order.
	Warnings []string
}

func (r *TestResult) warnf(format string, args ...any) {
	r.Warnings = append(r.Warnings, fmt.Sprintf(format, args...))
}

// decide sets P, Alpha and Reject.
func (r *TestResult) decide(p, alpha float64) {
	r.P = p
	r.Alpha = alpha
	r.Reject = p <= alpha // false for NaN
}

func checkAlpha(alpha float64) error {
	if !(alpha > 0 && alpha < 1) {
		return fmt.Errorf("%w: alpha = %v", ErrAlpha, alpha)
	}
	return nil
}

func checkFinite(name string, x []float64) error {
	for i, v := range x {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%w: %s[%d] = %v", ErrNotFinite, name, i, v)
		}
	}
	return nil
}

func checkPaired(a, b []float64) error {
	if len(a) != len(b) {
		return fmt.Errorf("%w: len(a) = %d, len(b) = %d", ErrLength, len(a), len(b))
	}
	if err := checkFinite("a", a); err != nil {
		return err
	}
	return checkFinite("b", b)
}

// meanVar returns the mean and the sample variance (n − 1 denominator) of
// x by a two-pass algorithm. The variance is NaN for len(x) < 2.
func meanVar(x []float64) (mean, variance float64) {
	n := float64(len(x))
	for _, v := range x {
		mean += v
	}
	mean /= n
	if len(x) < 2 {
		return mean, math.NaN()
	}
	var ss, comp float64
	for _, v := range x {
		d := v - mean
		ss += d * d
		comp += d
	}
	// Corrected two-pass formula (Chan, Golub & LeVeque, 1983).
	variance = (ss - comp*comp/n) / (n - 1)
	return mean, max(variance, 0)
}

// maxAbs returns max |x_i|, 0 for an empty slice.
func maxAbs(x []float64) float64 {
	var m float64
	for _, v := range x {
		m = max(m, math.Abs(v))
	}
	return m
}

// rankAverage writes into dst the 1-based ranks of x in ascending order;
// values within tol of their sorted neighbour form one tie group and share
// the average of the group's ranks. It returns the sizes of tie groups of
// two or more, in ascending order of value. dst must have len(x).
func rankAverage(dst, x []float64, tol float64) (ties []int) {
	if len(dst) != len(x) {
		panic("stats: internal: rank destination of wrong length")
	}
	idx := make([]int, len(x))
	for i := range idx {
		idx[i] = i
	}
	slices.SortStableFunc(idx, func(i, j int) int { return cmp.Compare(x[i], x[j]) })
	for start := 0; start < len(idx); {
		end := start + 1
		for end < len(idx) && x[idx[end]]-x[idx[end-1]] <= tol {
			end++
		}
		// Positions start..end-1 hold ranks start+1..end; their mean:
		r := float64(start+1+end) / 2
		for _, i := range idx[start:end] {
			dst[i] = r
		}
		if end-start > 1 {
			ties = append(ties, end-start)
		}
		start = end
	}
	return ties
}
