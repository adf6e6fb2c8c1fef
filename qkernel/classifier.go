package qkernel

import (
	"context"
	"errors"
	"fmt"
	"math"

	"gonum.org/v1/gonum/floats"
	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
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
	// ErrOption marks an invalid or contradictory option (see Validate);
	// the error is an *OptionError naming the option's key.
	ErrOption = errors.New("invalid option")
	// ErrSubset marks a TrainSubset that the training data cannot supply:
	// larger than the training set, or smaller than the number of classes
	// present.
	ErrSubset = errors.New("invalid training subset size")
	// ErrTooLarge marks a circuit with more qubits than the chosen
	// simulator holds.
	ErrTooLarge = errors.New("circuit too large for the simulator")
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

// Classifier is the interference classifier. Set the options, then Fit and
// Predict. The zero value is the published classifier in exact mode.
//
// A fitted Classifier is read-only during Predict and PredictDetail, so
// several goroutines may predict with it at once; Fit must not run
// concurrently with anything else on the same value. Options are read
// again by every Predict call (and checked as in Fit), so changing them
// between Fit and Predict takes effect.
type Classifier struct {
	// Mode selects the way the classifier is run; the zero value is
	// ModeExact.
	Mode Mode
	// Balance chooses the index-register weights: false gives every
	// training row 1/M as published; true gives a row of class k the weight
	// 1/(C * M_k) (C classes present in training, M_k rows in class k),
	// which removes the bias toward large classes. See Weights. With
	// TrainSubset the weights are those of the subset.
	Balance bool
	// Shots is the number of measurement shots per test row: required
	// (> 0) in ModeShots, optional in ModeNoisy (0 reports the noisy
	// probabilities exactly), not allowed in the other modes.
	Shots int
	// Noise is the gate-level noise model of ModeNoisy (see sim.NoiseModel:
	// depolarizing [p1, p2] after each single-qubit gate / CNOT, amplitude
	// and phase damping after every gate, readout [p01, p10]).
	Noise sim.NoiseModel
	// Channels are the closed-form noise models of ModeNoisy, applied to
	// the outcome distribution after the gate-level simulation (or to the
	// closed form when there is none).
	Channels Channels
	// TrainSubset K > 0 gives every test row its own class-balanced random
	// subset of K training rows; 0 uses the whole training set.
	TrainSubset int
	// Method is the simulator of a gate-level run in ModeNoisy; sim.Auto
	// (the zero value) simulates gate by gate only when Noise has gate
	// noise and then picks the density matrix up to sim.MaxDensityQubits
	// qubits, trajectories above. An explicit method always runs the
	// gate-level simulation.
	Method sim.Method
	// Trajectories is the number of Monte Carlo trajectories of the
	// trajectory method; 0 means sim.DefaultTrajectories.
	Trajectories int
	// Device, in ModeNoisy, runs every row's circuit on a described
	// device: compiled to it (device.Compile: placement, SABRE routing,
	// native gates) and simulated under its calibrated noise
	// (device.Program.Simulate) with Method and Trajectories. It replaces
	// Noise and Channels (Validate rejects both together); with Mitigate
	// the confusion matrices default to the readout errors of the physical
	// qubits each row is measured on. Nil (the default) changes nothing.
	Device *device.Device
	// Mitigate configures readout-error mitigation: in ModeNoisy the
	// decision is taken on the mitigated outcome distribution (see
	// MitigateReadout and Mitigation) and Detail.Raw keeps the unmitigated
	// one; PredictCounts mitigates imported counts with the given
	// confusion matrices. The zero value mitigates nothing.
	Mitigate Mitigation
	// Seed is the task seed. Every test row gets its own generator derived
	// from Seed and the row's position in the matrix passed to Predict; it
	// draws, in this order, the training subset, the trajectory jumps and
	// the shots.
	Seed uint64

	fitted  bool
	n, d    int
	nClass  int
	present []int     // classes present in training, in class order (len >= 2)
	count   []int     // rows per class
	members [][]int   // members[k]: training positions of class k, ascending
	y       []int     // training labels
	unit    []float64 // n x d row-major: the unit training vectors
	mass    []float64 // mass[k] = sum of w_m over class k (whole training set)
	centre  []float64 // nClass x d row-major: centre_k = sum_{m in k} w_m x_m (x_m unit)

	noShare bool // tests and benchmarks: simulate whole circuits forwards (share.go)
}

// Detail is the classifier's output for one test row.
type Detail struct {
	// PAcc is the post-selection probability P(a = 0), estimated as
	// accepted/total shots with finite shots.
	PAcc float64
	// Probs holds P(k | a = 0) per class in class order (estimated as
	// counts_k / N_acc with finite shots). Classes absent from training
	// have probability 0 without noise; noise can give them (and the
	// class-register values >= the number of classes, which belong to no
	// class; see Unused) some probability, so under noise Probs may sum to
	// less than 1: they are not renormalised over the valid codes. When
	// nothing is accepted, present classes get NaN and absent ones 0 (see
	// the package documentation).
	Probs []float64
	// Shots is the number of accepted shots N_acc behind the estimate; 0
	// with exact probabilities (ModeExact, ModeCircuit, ModeNoisy without
	// shots).
	Shots int
	// Exact is the exact-mode decision (closed form, noiseless, infinite
	// shots) on the same training set or subset, so that a harness can
	// count decisions that shots and noise changed. In ModeExact it equals
	// the prediction.
	Exact int
	// Unused is the share of the accepted probability (or accepted shots)
	// that fell on class-register values k >= the number of classes,
	// which name no class: P(a=0, k >= C) / P(a=0). So sum(Probs) + Unused
	// = 1 whenever something is accepted; Unused is 0 without noise (and
	// whenever C is a power of two) and NaN when nothing is accepted.
	Unused float64
	// Raw is the decision before readout mitigation when Mitigate is set
	// (the fields above are then the mitigated decision's; Shots stays the
	// raw N_acc); nil without mitigation.
	Raw *RawDetail
}

// RawDetail is the unmitigated decision of a row under readout mitigation:
// what Detail would hold without Mitigate.
type RawDetail struct {
	Pred   int
	PAcc   float64
	Probs  []float64
	Unused float64
}

// reset forgets any fitted state.
func (c *Classifier) reset() {
	c.fitted = false
	c.n, c.d, c.nClass = 0, 0, 0
	c.present, c.count, c.members, c.y, c.unit = nil, nil, nil, nil, nil
	c.mass, c.centre = nil, nil
}

// Fit stores the training set: the rows of X with class indices y in
// [0, nClass). Every row is L2-normalised (into a copy; X is not modified).
// Fit checks the options (Validate) and the limits that depend on the data:
// TrainSubset against the training set (ErrSubset) and the circuit's qubit
// count against the simulator (ErrTooLarge). It returns an error wrapping
// ErrOption, ErrMode, ErrSubset, ErrTooLarge, ErrDim, ErrLabel, ErrOneClass
// or ErrZeroVector (a *VectorError with Set "training") on bad input; a
// failed Fit leaves the classifier unfitted.
func (c *Classifier) Fit(X *mat.Dense, y []int, nClass int) error {
	c.reset()
	if err := c.Validate(); err != nil {
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
	unit := make([]float64, n*d)
	members := make([][]int, nClass)
	for i, k := range y {
		x := unit[i*d : (i+1)*d : (i+1)*d]
		if f := unitInto(x, X.RawRowView(i)); f != vectorOK {
			return &VectorError{Set: "training", Pos: i, Reason: f.String()}
		}
		mass[k] += w[i]
		floats.AddScaled(centre[k*d:(k+1)*d], w[i], x)
		members[k] = append(members[k], i)
	}

	c.n, c.d, c.nClass = n, d, nClass
	c.present, c.count, c.members = present, count, members
	c.y = append([]int(nil), y...)
	c.unit = unit
	c.mass = mass
	c.centre = centre
	if _, err := c.makePlan(); err != nil {
		c.reset()
		return fmt.Errorf("qkernel: fit: %w", err)
	}
	c.fitted = true
	return nil
}

// plan is what a Predict call needs beyond the fitted data: the options
// resolved against the training set.
type plan struct {
	m      int        // training vectors per prediction (n or TrainSubset)
	alloc  []int      // subset rows per class (TrainSubset > 0)
	qClass int        // class qubits q; outcome distributions have 2^(1+q) entries
	qubits int        // qubits of the compiled circuit
	gate   bool       // the compiled circuit is simulated (ModeCircuit, gate-level ModeNoisy)
	method sim.Method // the simulator when gate is true
}

// makePlan checks the options and their data-dependent limits. Errors carry
// no "qkernel: " prefix (callers add context); option errors are returned
// as they are.
func (c *Classifier) makePlan() (*plan, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	p := &plan{m: c.n}
	if K := c.TrainSubset; K > 0 {
		switch {
		case K > c.n:
			return nil, fmt.Errorf("train_subset %d exceeds the %d training rows: %w", K, c.n, ErrSubset)
		case K < len(c.present):
			return nil, fmt.Errorf("train_subset %d is below the %d classes present in training (every class needs a row): %w", K, len(c.present), ErrSubset)
		}
		p.m = K
		p.alloc = subsetAlloc(K, c.count, c.present)
	}
	nm, nd, nq := circuit.RegisterSizes(p.m, c.d, c.nClass)
	p.qClass = nq
	p.qubits = 1 + nm + nd + nq
	if err := c.devicePlan(p); err != nil {
		return nil, err
	}
	if c.Mitigate.Readout {
		if _, err := c.confusion(nq); err != nil {
			return nil, err
		}
	}
	switch {
	case c.Mode == ModeCircuit:
		p.gate, p.method = true, sim.StateVector
	case c.gateLevel():
		p.gate, p.method = true, c.Method
		if p.method == sim.Auto {
			p.method = sim.DensityMatrix
			if p.qubits > sim.MaxDensityQubits {
				p.method = sim.Trajectories
			}
		}
	}
	if !p.gate {
		return p, nil
	}
	switch {
	case p.method == sim.DensityMatrix && p.qubits > sim.MaxDensityQubits:
		return nil, fmt.Errorf("circuit needs %d qubits; the density-matrix simulator holds at most %d; set train_subset or simulator = %q: %w",
			p.qubits, sim.MaxDensityQubits, sim.Trajectories.String(), ErrTooLarge)
	case p.qubits > sim.MaxStateQubits:
		name := "state-vector"
		if p.method == sim.Trajectories {
			name = "trajectory"
		}
		return nil, fmt.Errorf("circuit needs %d qubits; the %s simulator holds at most %d; set train_subset or use fewer features: %w",
			p.qubits, name, sim.MaxStateQubits, ErrTooLarge)
	}
	return p, nil
}

// Predict returns the predicted class index of every row of X: the present
// class with the largest (estimated) P(k | a = 0), ties to the earlier
// class (see the package documentation). Rows are L2-normalised into
// scratch space; X is not modified. An X with no rows gives an empty
// result. The random draws of row i depend only on Seed and i, its position
// in X.
func (c *Classifier) Predict(X *mat.Dense) ([]int, error) {
	pred, _, err := c.predict(context.Background(), X, false)
	return pred, err
}

// PredictDetail is Predict that also returns, per row, the post-selection
// probability, the class probabilities, the accepted shots and the
// exact-mode decision behind the prediction.
func (c *Classifier) PredictDetail(X *mat.Dense) ([]int, []Detail, error) {
	return c.predict(context.Background(), X, true)
}

// PredictContext is Predict that stops when ctx is cancelled: it checks ctx
// between rows and, in the gate-level modes, between the gates of every
// simulation (about every 10^5 amplitudes of work), and returns ctx.Err()
// (context.Canceled or context.DeadlineExceeded, unwrapped) and no
// predictions. A run that is not cancelled gives exactly Predict's result.
func (c *Classifier) PredictContext(ctx context.Context, X *mat.Dense) ([]int, error) {
	pred, _, err := c.predict(ctx, X, false)
	return pred, err
}

// PredictDetailContext is PredictDetail that stops when ctx is cancelled,
// as PredictContext does.
func (c *Classifier) PredictDetailContext(ctx context.Context, X *mat.Dense) ([]int, []Detail, error) {
	return c.predict(ctx, X, true)
}

func (c *Classifier) predict(ctx context.Context, X *mat.Dense, detail bool) ([]int, []Detail, error) {
	if err := c.Validate(); err != nil {
		return nil, nil, err
	}
	if !c.fitted {
		return nil, nil, fmt.Errorf("qkernel: predict: %w", ErrNotFitted)
	}
	p, err := c.makePlan()
	if err != nil {
		var oe *OptionError
		if errors.As(err, &oe) {
			return nil, nil, err
		}
		return nil, nil, fmt.Errorf("qkernel: predict: %w", err)
	}
	if err := ctx.Err(); err != nil {
		return nil, nil, err
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
	var backing, rawBacking []float64
	mit := c.mitigates()
	if detail {
		details = make([]Detail, r)
		backing = make([]float64, r*c.nClass)
		if mit {
			rawBacking = make([]float64, r*c.nClass)
		}
	}
	s := c.newScratch(p)
	s.share = c.newShareCache(p)
	probs := make([]float64, c.nClass)
	var rawProbs []float64
	if mit {
		rawProbs = make([]float64, c.nClass)
	}
	for i := range r {
		// Rows without a simulation cost microseconds: check every 64th.
		if (p.gate || i%64 == 0) && ctx.Err() != nil {
			return nil, nil, ctx.Err()
		}
		if f := unitInto(s.x, X.RawRowView(i)); f != vectorOK {
			return nil, nil, &VectorError{Set: "test", Pos: i, Reason: f.String()}
		}
		if detail {
			probs = backing[i*c.nClass : (i+1)*c.nClass : (i+1)*c.nClass]
			if mit {
				rawProbs = rawBacking[i*c.nClass : (i+1)*c.nClass : (i+1)*c.nClass]
			}
		}
		det, err := c.row(ctx, p, s, i, probs, rawProbs)
		if err != nil {
			if ctx.Err() != nil && errors.Is(err, ctx.Err()) {
				return nil, nil, ctx.Err()
			}
			return nil, nil, fmt.Errorf("qkernel: predict: test row %d: %w", i, err)
		}
		pred[i] = det.pred
		if detail {
			details[i] = Detail{PAcc: det.pacc, Probs: probs, Shots: det.shots, Exact: det.exact, Unused: det.unused, Raw: det.raw}
		}
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
