package qkernel

import (
	"context"
	"errors"
	"fmt"
	"math/rand/v2"

	"gonum.org/v1/gonum/mat"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// This file connects the classifier with circuits run elsewhere: RowCircuit
// gives the circuit of one test row exactly as the gate-level modes build it
// (so it can be exported and run on a device), RowRand gives the row's
// random stream where ModeShots draws its shots, and PredictCounts turns
// outcome counts measured on a device into predictions by the rule of
// ModeShots.

// ErrCounts marks outcome counts that cannot be the measurements of a row's
// circuit: a count vector of the wrong length, a negative count, or no shot
// at all.
var ErrCounts = errors.New("invalid outcome counts")

// exactTwin returns a copy of c in ModeExact with every option that ModeExact
// ignores cleared, and its plan. The copy shares c's fitted data (read
// only), so its rows draw the same training subsets as c's.
func (c *Classifier) exactTwin() (*Classifier, *plan, error) {
	if !c.fitted {
		return nil, nil, fmt.Errorf("qkernel: %w", ErrNotFitted)
	}
	e := *c
	e.Mode, e.Shots, e.Mitigate = ModeExact, 0, Mitigation{}
	e.Noise, e.Channels = sim.NoiseModel{}, Channels{}
	e.Method, e.Trajectories = sim.Auto, 0
	e.Device = nil
	p, err := e.makePlan()
	if err != nil {
		return nil, nil, fmt.Errorf("qkernel: %w", err)
	}
	return &e, p, nil
}

// RowCircuit compiles the circuit that classifies the test vector x when it
// is row pos of the matrix passed to Predict: the training set of that row
// (with TrainSubset, the subset drawn from the row's generator exactly as
// every mode draws it; else the whole training set) with the weights of
// Balance, as ModeCircuit and gate-level ModeNoisy compile it. It also
// returns the positions, ascending, of the encoded training rows in the
// matrix passed to Fit. The circuit does not depend on Mode, Shots or the
// noise options.
//
// The class register holds the class index k in binary, its first qubit
// (Layout.Class[0], bit 0 of the bit register class_out in the OpenQASM 3
// export) the least significant bit.
//
// Errors: ErrNotFitted before Fit; ErrDim when len(x) differs from the
// fitted feature count; a *VectorError (Set "test", Pos pos) for a zero or
// non-finite x.
func (c *Classifier) RowCircuit(x []float64, pos int) (*circuit.Circuit, []int, error) {
	e, p, err := c.exactTwin()
	if err != nil {
		return nil, nil, err
	}
	if len(x) != e.d {
		return nil, nil, fmt.Errorf("qkernel: row circuit: %d features, fitted with %d: %w", len(x), e.d, ErrDim)
	}
	s := e.newScratch(p)
	if f := unitInto(s.x, x); f != vectorOK {
		return nil, nil, &VectorError{Set: "test", Pos: pos, Reason: f.String()}
	}
	var train [][]float64
	var ysub, idx []int
	if e.TrainSubset > 0 {
		s.pcg.Seed(rowSeeds(e.Seed, pos))
		e.drawSubset(s, p.alloc, s.rng)
		train, ysub = s.train, s.ysub
		idx = append([]int(nil), s.idx...)
	} else {
		train, ysub = e.rows(s), e.y
		idx = make([]int, e.n)
		for i := range idx {
			idx[i] = i
		}
	}
	circ, err := circuit.Compile(s.x, train, ysub, e.nClass, Weights(ysub, e.nClass, e.Balance))
	if err != nil {
		return nil, nil, fmt.Errorf("qkernel: row circuit: test row %d: %w", pos, err)
	}
	return circ, idx, nil
}

// RowRand returns the generator of row pos of a Predict call positioned
// after the draw of its training subset (if any): the stream from which
// ModeShots draws the row's shots with sim.SampleCounts, over the accepted
// outcomes (a = 0, k) followed by one merged "rejected" outcome. (Gate-level
// ModeNoisy with trajectories draws its jumps from the same stream first.)
// It returns ErrNotFitted before Fit.
func (c *Classifier) RowRand(pos int) (*rand.Rand, error) {
	e, p, err := c.exactTwin()
	if err != nil {
		return nil, err
	}
	rng := rowRand(e.Seed, pos)
	if e.TrainSubset > 0 {
		s := e.newScratch(p)
		e.drawSubset(s, p.alloc, rng)
	}
	return rng, nil
}

// PredictCounts classifies the rows of X from outcome counts measured on
// their circuits (see RowCircuit) instead of shots drawn in software.
// counts[i] belongs to row i: 2^(1+q) non-negative counts, q the number of
// class qubits (circuit.RegisterSizes), the count of ancilla value a and
// class-register value k at index a*2^q + k. Every row needs at least one
// shot.
//
// The decision is that of ModeShots on sampled counts: only a = 0 shots
// count; Detail.Shots = N_acc (the a = 0 shots), Detail.PAcc = N_acc / N
// (N all shots of the row), Detail.Probs[k] = count(0, k) / N_acc for every
// class; register values k >= the number of classes count in N_acc but for
// no class. The prediction is the present class with the most accepted
// shots, an exact tie going to the earlier class; with N_acc = 0 it is the
// first present class, with PAcc 0 and NaN for the present classes' Probs.
// Detail.Exact is the closed-form decision on the row's training set or
// subset (the same as ModeExact's), so that decisions changed by a device
// can be counted. The options Mode, Shots and noise are ignored; Seed,
// Balance and TrainSubset must be those the circuits were built with.
//
// Detail.Unused is the share of the accepted shots on register values
// k >= the number of classes.
//
// With Mitigate.Readout the counts are mitigated by MitigateReadout with
// Mitigate.Confusion (per measured bit; see ConfusionFromCounts) or, with
// Mitigate.Device, with the matrices of the physical qubits that measured
// each row's bits (Mitigate.Physical, or the device's own readout
// errors): the row's circuit is compiled to the device again to find
// them, as fringe circuit -export -device compiled it; the decision is taken on the
// mitigated distribution as on exact probabilities (P(a=0) and P(k | acc)
// from it; nothing accepted when the mitigated P(a=0) is 0), and
// Detail.Raw holds the decision on the raw counts.
//
// Errors: ErrNotFitted before Fit; ErrDim for a feature count other than
// Fit's or len(counts) != rows of X; ErrCounts for a count vector of the
// wrong length, a negative count or a row without shots; a *VectorError for
// a zero or non-finite row; an *OptionError (key "mitigate") for
// mitigation without confusion matrices or with the wrong number.
func (c *Classifier) PredictCounts(X *mat.Dense, counts [][]int) ([]int, []Detail, error) {
	e, p, err := c.exactTwin()
	if err != nil {
		return nil, nil, err
	}
	r := 0
	if X != nil && !X.IsEmpty() {
		var d int
		r, d = X.Dims()
		if d != e.d {
			return nil, nil, fmt.Errorf("qkernel: predict counts: %d features, fitted with %d: %w", d, e.d, ErrDim)
		}
	}
	if len(counts) != r {
		return nil, nil, fmt.Errorf("qkernel: predict counts: %d count vectors for %d rows: %w", len(counts), r, ErrDim)
	}
	h := 1 << p.qClass
	for i, cnt := range counts {
		if len(cnt) != 2*h {
			return nil, nil, fmt.Errorf("qkernel: predict counts: row %d: %d counts, want 2^(1+%d) = %d: %w", i, len(cnt), p.qClass, 2*h, ErrCounts)
		}
		total := 0
		for j, n := range cnt {
			if n < 0 {
				return nil, nil, fmt.Errorf("qkernel: predict counts: row %d: negative count %d for outcome %d: %w", i, n, j, ErrCounts)
			}
			total += n
		}
		if total == 0 {
			return nil, nil, fmt.Errorf("qkernel: predict counts: row %d: no shots: %w", i, ErrCounts)
		}
	}
	if err := c.validateMitigation(); err != nil {
		return nil, nil, err
	}
	var conf []Confusion
	mit := c.Mitigate.Readout
	dev := c.Mitigate.Device
	if mit {
		if c.Mitigate.Confusion == nil && dev == nil {
			return nil, nil, optErr("mitigate", "imported counts need the confusion matrices of their device, or the device they were compiled for")
		}
		if c.Mitigate.Confusion != nil {
			if conf, err = c.confusion(p.qClass); err != nil {
				return nil, nil, err
			}
		}
	}
	pred := make([]int, r)
	details := make([]Detail, r)
	backing := make([]float64, r*e.nClass)
	var rawBacking []float64
	if mit {
		rawBacking = make([]float64, r*e.nClass)
	}
	scratchProbs := make([]float64, e.nClass)
	s := e.newScratch(p)
	for i := range r {
		if f := unitInto(s.x, X.RawRowView(i)); f != vectorOK {
			return nil, nil, &VectorError{Set: "test", Pos: i, Reason: f.String()}
		}
		ex, err := e.row(context.Background(), p, s, i, scratchProbs, nil)
		if err != nil {
			return nil, nil, fmt.Errorf("qkernel: predict counts: test row %d: %w", i, err)
		}
		total := 0
		for _, n := range counts[i] {
			total += n
		}
		probs := backing[i*e.nClass : (i+1)*e.nClass : (i+1)*e.nClass]
		dst := probs
		if mit {
			dst = rawBacking[i*e.nClass : (i+1)*e.nClass : (i+1)*e.nClass]
		}
		pr, nacc := decideCounts(dst, counts[i][:h], e.present)
		out := outcome{pred: pr, pacc: float64(nacc) / float64(total), shots: nacc, unused: unusedCounts(counts[i][:h], e.nClass, nacc)}
		if mit {
			rowConf := conf
			if rowConf == nil {
				// The physical qubits that measured this row's bits: its
				// circuit compiled to the device again (deterministic).
				circ, _, err := c.RowCircuit(X.RawRowView(i), i)
				if err != nil {
					return nil, nil, fmt.Errorf("qkernel: predict counts: test row %d: %w", i, err)
				}
				prog, err := device.Compile(circ, dev, device.Options{})
				if err != nil {
					return nil, nil, fmt.Errorf("qkernel: predict counts: test row %d: %w", i, err)
				}
				rowConf = c.physicalConfusion(dev, prog, circ.Regs)
			}
			joint := make([]float64, len(counts[i]))
			for j, n := range counts[i] {
				joint[j] = float64(n)
			}
			pm, err := MitigateReadout(joint, rowConf)
			if err != nil {
				return nil, nil, fmt.Errorf("qkernel: predict counts: test row %d: %w", i, err)
			}
			out.raw = &RawDetail{Pred: out.pred, PAcc: out.pacc, Probs: dst, Unused: out.unused}
			var acc float64
			for _, v := range pm[:h] {
				acc += v
			}
			out.pred = decideProbs(probs, pm, acc, 0, e.present)
			out.pacc = acc
			out.unused = unusedShare(pm[e.nClass:h], e.nClass, acc, 0)
		}
		pred[i] = out.pred
		details[i] = Detail{PAcc: out.pacc, Probs: probs, Shots: nacc, Exact: ex.exact, Unused: out.unused, Raw: out.raw}
	}
	return pred, details, nil
}
