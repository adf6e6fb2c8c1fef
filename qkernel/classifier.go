package qkernel

import (
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"
)

// Sentinel errors. Errors returned by this package wrap one of them (test
// with errors.Is). They wrap nothing themselves; a caller that speaks another
// vocabulary (the baselines package's ErrData, ErrParam, ErrNotFitted, say)
// maps them itself.
var (
	// ErrZeroVector marks a zero or non-finite feature vector, which has no
	// amplitude encoding. The error is a *VectorError naming the row.
	ErrZeroVector = errors.New("cannot be amplitude-encoded")
	// ErrOneClass marks training data with fewer than two classes present
	// (no rows at all included).
	ErrOneClass = errors.New("fewer than two classes in training data")
	// ErrDim marks a shape mismatch: labels versus rows in Fit, or feature
	// count in Predict versus Fit.
	ErrDim = errors.New("dimension mismatch")
	// ErrLabel marks a class label outside [0, nClass) or nClass < 1.
	ErrLabel = errors.New("invalid class label")
	// ErrMode marks a Mode that is unknown or not implemented.
	ErrMode = errors.New("mode not available")
	// ErrNotFitted is returned by Predict and PredictDetail before a
	// successful Fit (and after a failed one).
	ErrNotFitted = errors.New("classifier not fitted")
)

// VectorError reports a row whose feature vector has no amplitude encoding.
// Pos is the 0-based position of the row in the matrix passed to Fit
// (Set "training") or Predict (Set "test"); the caller maps positions to
// dataset rows. It unwraps to ErrZeroVector.
type VectorError struct {
	Set    string // "training" or "test"
	Pos    int    // 0-based row position in the matrix passed in
	Reason string // "zero vector" or "non-finite value"
}

func (e *VectorError) Error() string {
	return fmt.Sprintf("qkernel: %s row %d: %s: %v", e.Set, e.Pos, e.Reason, ErrZeroVector)
}

// Unwrap returns ErrZeroVector.
func (e *VectorError) Unwrap() error { return ErrZeroVector }

// Mode selects how the classifier is run.
type Mode int

const (
	// ModeExact evaluates the closed form: infinite shots, no noise. It is
	// the zero value.
	ModeExact Mode = iota
)

// String returns the mode's name as written in experiment specs.
func (m Mode) String() string {
	switch m {
	case ModeExact:
		return "exact"
	}
	return fmt.Sprintf("Mode(%d)", int(m))
}

// ParseMode returns the Mode named s ("exact"). An unknown or not yet
// implemented name is an error wrapping ErrMode.
func ParseMode(s string) (Mode, error) {
	switch s {
	case "exact":
		return ModeExact, nil
	}
	return 0, fmt.Errorf("qkernel: mode %q: %w (known: exact)", s, ErrMode)
}

// Classifier is the interference classifier. Set the options, then Fit and
// Predict. The zero value is the published classifier in exact mode.
//
// A fitted Classifier is read-only during Predict and PredictDetail, so
// several goroutines may predict with it at once; Fit must not run
// concurrently with anything else on the same value.
type Classifier struct {
	// Mode selects the way the classifier is run; the zero value is
	// ModeExact.
	Mode Mode
	// Balance chooses the index-register weights: false gives every
	// training row 1/M as published; true gives a row of class k the weight
	// 1/(C * M_k) (C classes present in training, M_k rows in class k),
	// which removes the bias toward large classes. See Weights.
	Balance bool

	// Later modes add their options here (shot count, noise model, training
	// subset size, seed); their zero values keep the behaviour above.

	fitted  bool
	n, d    int
	nClass  int
	present []int     // classes present in training, in class order (len >= 2)
	mass    []float64 // mass[k] = sum of w_m over class k
	centre  []float64 // nClass x d row-major: centre_k = sum_{m in k} w_m x_m (x_m unit)
}

// Detail is the classifier's output for one test row.
type Detail struct {
	// PAcc is the post-selection probability P(a = 0).
	PAcc float64
	// Probs holds P(k | a = 0) per class in class order; 0 for classes
	// absent from training, NaN for present classes when PAcc is zero
	// (see the package documentation).
	Probs []float64
	// Shots is the number of accepted shots behind the estimate; 0 in
	// exact mode.
	Shots int
}

func (c *Classifier) checkMode() error {
	switch c.Mode {
	case ModeExact:
		return nil
	}
	return fmt.Errorf("qkernel: %v: %w", c.Mode, ErrMode)
}

// reset forgets any fitted state.
func (c *Classifier) reset() {
	c.fitted = false
	c.n, c.d, c.nClass = 0, 0, 0
	c.present, c.mass, c.centre = nil, nil, nil
}

// Fit stores the training set: the rows of X with class indices y in
// [0, nClass). Every row is L2-normalised (into a copy; X is not modified).
// Fit returns an error wrapping ErrMode, ErrDim, ErrLabel, ErrOneClass or
// ErrZeroVector (a *VectorError with Set "training") on bad input; a failed
// Fit leaves the classifier unfitted.
func (c *Classifier) Fit(X *mat.Dense, y []int, nClass int) error {
	c.reset()
	if err := c.checkMode(); err != nil {
		return err
	}
	if X == nil || X.IsEmpty() {
		return fmt.Errorf("qkernel: fit: no training rows: %w", ErrOneClass)
	}
	n, d := X.Dims()
	if len(y) != n {
		return fmt.Errorf("qkernel: fit: %d labels for %d rows: %w", len(y), n, ErrDim)
	}
	if nClass < 1 {
		return fmt.Errorf("qkernel: fit: %d classes: %w", nClass, ErrLabel)
	}
	count := make([]int, nClass)
	for i, k := range y {
		if k < 0 || k >= nClass {
			return fmt.Errorf("qkernel: fit: training row %d: class %d outside [0, %d): %w", i, k, nClass, ErrLabel)
		}
		count[k]++
	}
	var present []int
	for k, m := range count {
		if m > 0 {
			present = append(present, k)
		}
	}
	if len(present) < 2 {
		return fmt.Errorf("qkernel: fit: %d class(es) present among %d rows: %w", len(present), n, ErrOneClass)
	}

	w := Weights(y, nClass, c.Balance)
	mass := make([]float64, nClass)
	centre := make([]float64, nClass*d)
	x := make([]float64, d)
	for i, k := range y {
		if f := unitInto(x, X.RawRowView(i)); f != vectorOK {
			return &VectorError{Set: "training", Pos: i, Reason: f.String()}
		}
		mass[k] += w[i]
		floats.AddScaled(centre[k*d:(k+1)*d], w[i], x)
	}

	c.fitted = true
	c.n, c.d, c.nClass = n, d, nClass
	c.present = present
	c.mass = mass
	c.centre = centre
	return nil
}

// Predict returns the predicted class index of every row of X: the present
// class with the largest P(k | a = 0), ties to the earlier class (see the
// package documentation). Rows are L2-normalised into scratch space; X is not
// modified. An X with no rows gives an empty result.
func (c *Classifier) Predict(X *mat.Dense) ([]int, error) {
	pred, _, err := c.predict(X, false)
	return pred, err
}

// PredictDetail is Predict that also returns, per row, the post-selection
// probability and the class probabilities behind the prediction.
func (c *Classifier) PredictDetail(X *mat.Dense) ([]int, []Detail, error) {
	return c.predict(X, true)
}

func (c *Classifier) predict(X *mat.Dense, detail bool) ([]int, []Detail, error) {
	if err := c.checkMode(); err != nil {
		return nil, nil, err
	}
	if !c.fitted {
		return nil, nil, fmt.Errorf("qkernel: predict: %w", ErrNotFitted)
	}
	if X == nil || X.IsEmpty() {
		if detail {
			return []int{}, []Detail{}, nil
		}
		return []int{}, nil, nil
	}
	r, d := X.Dims()
	if d != c.d {
		return nil, nil, fmt.Errorf("qkernel: predict: %d features, fitted with %d: %w", d, c.d, ErrDim)
	}
	pred := make([]int, r)
	var details []Detail
	var backing []float64
	if detail {
		details = make([]Detail, r)
		backing = make([]float64, r*c.nClass)
	}
	x := make([]float64, d)
	joint := make([]float64, c.nClass)
	floor := c.paccFloor()
	for i := range r {
		if f := unitInto(x, X.RawRowView(i)); f != vectorOK {
			return nil, nil, &VectorError{Set: "test", Pos: i, Reason: f.String()}
		}
		pacc := c.jointInto(joint, x)
		var probs []float64
		if detail {
			probs = backing[i*c.nClass : (i+1)*c.nClass : (i+1)*c.nClass]
			details[i] = Detail{PAcc: pacc, Probs: probs}
		} else {
			probs = joint // conditional probabilities overwrite the joint ones
		}
		if pacc <= floor {
			// Every training vector is (numerically) antipodal to x:
			// nothing is accepted and P(k | a = 0) is undefined.
			for _, k := range c.present {
				probs[k] = math.NaN()
			}
			pred[i] = c.present[0]
			continue
		}
		for _, k := range c.present {
			probs[k] = joint[k] / pacc
		}
		pred[i] = argmax(probs, c.present)
	}
	return pred, details, nil
}

// jointInto writes P(a = 0, c = k) for every class into dst (len nClass) for
// the unit test vector x and returns their sum, P(a = 0). With
// sum_m w_m = 1,
//
//	P(a=0, c=k) = sum_{m in k} w_m ||x + x_m||^2 / 4
//	            = sum_{m in k} w_m (1 + <x, x_m>) / 2
//	            = (mass_k + <x, centre_k>) / 2,
//
// so the cost is O(C d) per test row, whatever the training-set size.
// Absent classes get 0; a present class's value is clamped at 0 (it is
// non-negative in exact arithmetic since |<x, centre_k>| <= mass_k).
func (c *Classifier) jointInto(dst, x []float64) float64 {
	for k := range dst {
		dst[k] = 0
	}
	var sum float64
	for _, k := range c.present {
		p := (c.mass[k] + floats.Dot(x, c.centre[k*c.d:(k+1)*c.d])) / 2
		p = math.Max(0, p)
		dst[k] = p
		sum += p
	}
	return sum
}

// paccFloor is the rounding-error bound on a computed P(a = 0): it is a sum of
// terms in [0, 1] built from n weighted additions and d-term inner products of
// unit vectors, so its absolute error is below about (n + d + 2) machine
// epsilons. A computed P(a = 0) at or below this bound carries no correct
// digit and is treated as zero.
func (c *Classifier) paccFloor() float64 {
	const eps = 0x1p-52
	return float64(c.n+c.d+2) * eps
}

// tieRel is the relative margin by which a later class must beat the best
// score so far.
const tieRel = 1e-12

// argmax returns the class in present (class order, non-empty) with the
// largest score. A later class wins only if its score exceeds the best so far
// by more than tieRel relative, so near-ties go to the earlier class.
func argmax(score []float64, present []int) int {
	best := present[0]
	bs := score[best]
	for _, k := range present[1:] {
		if s := score[k]; s > bs+tieRel*math.Abs(bs) {
			best, bs = k, s
		}
	}
	return best
}
