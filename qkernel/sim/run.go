package sim

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"

	"fringe/qkernel/circuit"
)

// Method selects a simulator.
type Method uint8

const (
	// Auto picks StateVector for a circuit without gate noise, DensityMatrix
	// up to MaxDensityQubits qubits with gate noise, and Trajectories above.
	Auto Method = iota
	// StateVector is exact and noiseless (readout error still applies); up
	// to MaxStateQubits qubits. UCRY operations run in one pass each.
	StateVector
	// DensityMatrix is exact with gate noise; up to MaxDensityQubits qubits.
	DensityMatrix
	// Trajectories averages Monte Carlo state-vector trajectories with
	// stochastic Pauli and Kraus jumps; up to MaxStateQubits qubits. Each
	// trajectory contributes its exact outcome distribution, so the only
	// randomness is in the jumps; Result.StdErr gives the standard error.
	Trajectories
)

var methodNames = [...]string{Auto: "auto", StateVector: "state-vector", DensityMatrix: "density-matrix", Trajectories: "trajectories"}

// String returns "auto", "state-vector", "density-matrix" or
// "trajectories": the values of an interference model's simulator key.
func (m Method) String() string {
	if int(m) < len(methodNames) {
		return methodNames[m]
	}
	return fmt.Sprintf("method(%d)", int(m))
}

// ParseMethod is the inverse of Method.String.
func ParseMethod(s string) (Method, error) {
	for m, name := range methodNames {
		if s == name {
			return Method(m), nil
		}
	}
	return 0, fmt.Errorf("sim: unknown simulator %q (want auto, state-vector, density-matrix or trajectories)", s)
}

// DefaultTrajectories is the number of trajectories when
// Options.Trajectories is zero.
const DefaultTrajectories = 1000

// Options configures Simulate. The zero value runs a noiseless exact
// simulation with the automatic method choice.
type Options struct {
	Noise  NoiseModel
	Method Method
	// Trajectories is the number of Monte Carlo trajectories (Trajectories
	// method only); zero means DefaultTrajectories.
	Trajectories int
	// Rng drives the trajectory jumps; required when trajectories run.
	Rng *rand.Rand
}

// Result is the outcome distribution of a simulation.
type Result struct {
	// P is the joint distribution of the ancilla bit a and the class
	// register value k at index a*2^q + k, q = len(Regs.Class), after
	// readout error. len(P) = 2^(1+q).
	P []float64
	// StdErr is the standard error of each entry of P over the trajectories
	// (Trajectories only; nil for exact methods; zero when a single
	// trajectory ran, as it does without gate noise).
	StdErr []float64
	// Method is the simulator that ran.
	Method Method
	// Qubits is the number of qubits simulated.
	Qubits int
}

// Outcomes returns the joint (ancilla, class) distribution of the circuit,
// indexed a*2^q + k, after noise and readout error (see Simulate).
func Outcomes(c *circuit.Circuit, opt Options) ([]float64, error) {
	r, err := Simulate(context.Background(), c, opt)
	if err != nil {
		return nil, err
	}
	return r.P, nil
}

// chooseMethod applies the automatic choice and the qubit limits.
func chooseMethod(n int, opt Options) (Method, error) {
	noisy := opt.Noise.gateNoise()
	m := opt.Method
	if m == Auto {
		switch {
		case !noisy:
			m = StateVector
		case n <= MaxDensityQubits:
			m = DensityMatrix
		default:
			m = Trajectories
		}
	}
	switch m {
	case StateVector:
		if noisy {
			return 0, fmt.Errorf("sim: the state-vector simulator is noiseless; use the density-matrix or trajectories simulator for gate noise")
		}
		if n > MaxStateQubits {
			return 0, fmt.Errorf("sim: %d qubits exceed the state-vector limit of %d qubits; no method simulates this circuit (use fewer training vectors or features)", n, MaxStateQubits)
		}
	case DensityMatrix:
		if n > MaxDensityQubits {
			return 0, fmt.Errorf("sim: %d qubits exceed the density-matrix limit of %d qubits; use the trajectories method (up to %d qubits)", n, MaxDensityQubits, MaxStateQubits)
		}
	case Trajectories:
		if n > MaxStateQubits {
			return 0, fmt.Errorf("sim: %d qubits exceed the trajectories (state-vector) limit of %d qubits; no method simulates this circuit (use fewer training vectors or features)", n, MaxStateQubits)
		}
		if opt.Rng == nil && noisy {
			return 0, fmt.Errorf("sim: the trajectories method needs Options.Rng")
		}
		if opt.Trajectories < 0 {
			return 0, fmt.Errorf("sim: %d trajectories, want a positive number (or 0 for %d)", opt.Trajectories, DefaultTrajectories)
		}
	default:
		return 0, fmt.Errorf("sim: unknown method %d", int(m))
	}
	return m, nil
}

// Simulate runs the circuit and returns the joint (ancilla, class) outcome
// distribution. Every Measure is deferred to the end; the distribution is
// that of the ancilla and class registers of c.Regs, whatever is measured.
// Gate noise needs the density or trajectories method; readout error is
// applied to the distribution afterwards with every method. A circuit
// beyond a method's qubit limit is an error naming the limit and the
// alternative. Simulate checks ctx between operations.
func Simulate(ctx context.Context, c *circuit.Circuit, opt Options) (Result, error) {
	if err := c.Validate(); err != nil {
		return Result{}, err
	}
	if err := opt.Noise.Validate(); err != nil {
		return Result{}, err
	}
	m, err := chooseMethod(c.NQubits, opt)
	if err != nil {
		return Result{}, err
	}
	if err := ctx.Err(); err != nil {
		return Result{}, err
	}
	res := Result{Method: m, Qubits: c.NQubits}
	switch m {
	case StateVector:
		s, err := NewState(c.NQubits)
		if err != nil {
			return Result{}, err
		}
		if err := runState(ctx, s, c.Ops); err != nil {
			return Result{}, err
		}
		res.P = stateOutcomes(s, c.Regs)
	case DensityMatrix:
		d, err := NewDensity(c.NQubits)
		if err != nil {
			return Result{}, err
		}
		if err := runDensity(ctx, d, c, opt.Noise); err != nil {
			return Result{}, err
		}
		res.P = marginal(d.Diag(), c.Regs)
	case Trajectories:
		if res.P, res.StdErr, err = runTrajectories(ctx, c, opt); err != nil {
			return Result{}, err
		}
	}
	if m != Trajectories && opt.Noise.Readout != [2]float64{} {
		if res.P, err = Readout(res.P, opt.Noise.Readout[0], opt.Noise.Readout[1]); err != nil {
			return Result{}, err
		}
	}
	return res, nil
}

// runDensity applies the circuit to d, which must be |0...0> as NewDensity
// returns it, with gate noise (decomposing UCRY when the model has gate
// noise, so that every elementary gate is noisy). Idle qubits are left out
// until an operation touches them (see lazy.go); on return d holds the
// state in the circuit's layout. It checks ctx between operations.
func runDensity(ctx context.Context, d *Density, c *circuit.Circuit, m NoiseModel) error {
	ops := c.Ops
	if m.gateNoise() {
		ops = c.Decompose().Ops
	}
	lp := planLazy(ops, d.N, true)
	v := &Density{Rho: d.Rho[:1]}
	if err := applyDensity(ctx, v, d.Rho, lp, m); err != nil {
		return err
	}
	lp.finishDensity(v, d.Rho)
	return nil
}

// enterDensity inserts the qubits that operation i of lp touches first into
// the compact density v, whose entries live at the start of full.
func (lp *lazyPlan) enterDensity(v *Density, full []complex128, i int) {
	for _, b := range lp.grow[i] {
		growDensity(full, v.N, b)
		v.N++
		v.Rho = full[:1<<(2*v.N)]
	}
}

// finishDensity inserts the qubits no operation touched; full then holds
// the state in the circuit's layout.
func (lp *lazyPlan) finishDensity(v *Density, full []complex128) {
	for _, b := range lp.tail {
		growDensity(full, v.N, b)
		v.N++
		v.Rho = full[:1<<(2*v.N)]
	}
}

// applyDensity runs the scheduled operations of lp on the compact density v
// (a prefix of full, grown as the schedule says) with the gate noise of m.
// A CNOT and its channels (two-qubit depolarizing, then damping of both
// qubits) take one pass over the matrix, as does a single-qubit gate with
// its channels (one fused superoperator). It checks ctx about every
// tickWork entries of work and returns ctx.Err() when cancelled.
func applyDensity(ctx context.Context, v *Density, full []complex128, lp *lazyPlan, m NoiseModel) error {
	tk := ticker{ctx: ctx}
	if !m.gateNoise() {
		for i, op := range lp.ops {
			lp.enterDensity(v, full, i)
			if err := tk.add(lp.work[i]); err != nil {
				return err
			}
			v.ApplyOp(op)
		}
		return nil
	}
	d := v
	after1 := m.after1()
	damp, dampOn := m.dampingSuperop()
	var damp2 *[4][4]float64 // damping of both CNOT qubits, fused into the CNOT's pass
	if dampOn {
		r, _ := realSuperop(&damp) // damping superoperators are real
		damp2 = &r
	}
	for i, op := range lp.ops {
		lp.enterDensity(d, full, i)
		if err := tk.add(lp.work[i]); err != nil {
			return err
		}
		switch op.Gate {
		case circuit.Measure:
		case circuit.CNOT:
			d.applyCNOTNoise(op.Controls[0], op.Target, m.Depolarizing[1], damp2)
		case circuit.CZ, circuit.SWAP:
			// Device gates: the noise of a CNOT.
			ctl := op.Controls[0]
			d.ApplyOp(op)
			if p := m.Depolarizing[1]; p != 0 {
				d.Depolarize2(ctl, op.Target, p)
			}
			if dampOn {
				d.ApplySuperop1(ctl, damp)
				d.ApplySuperop1(op.Target, damp)
			}
		default:
			u, err := GateMatrix(op.Gate, op.Angle)
			if err != nil {
				panic(err) // Decompose leaves only elementary gates
			}
			d.ApplySuperop1(op.Target, KrausSuperop([]Matrix{u}).Then(after1))
		}
	}
	return nil
}

// marginal sums basis-state probabilities into the (ancilla, class) layout.
func marginal(probs []float64, regs circuit.Layout) []float64 {
	q := len(regs.Class)
	out := make([]float64, 2<<q)
	for b, p := range probs {
		out[outcomeIndex(b, regs)] += p
	}
	for i, v := range out {
		if v < 0 { // rounding can leave tiny negative populations in a density matrix
			out[i] = 0
		}
	}
	return out
}

func outcomeIndex(b int, regs circuit.Layout) int {
	k := 0
	for j, cq := range regs.Class {
		k |= (b >> cq & 1) << j
	}
	return (b>>regs.Ancilla&1)<<len(regs.Class) | k
}

// stateOutcomes returns the (ancilla, class) distribution of a pure state.
func stateOutcomes(s *State, regs circuit.Layout) []float64 {
	q := len(regs.Class)
	out := make([]float64, 2<<q)
	for b, a := range s.Amp {
		out[outcomeIndex(b, regs)] += real(a)*real(a) + imag(a)*imag(a)
	}
	return out
}

// runState applies the noiseless operations ops to s, which must be
// |0...0> as NewState returns it, leaving idle qubits out until an
// operation touches them (see lazy.go). It checks ctx about every tickWork
// amplitudes of work.
func runState(ctx context.Context, s *State, ops []circuit.Op) error {
	lp := planLazy(ops, s.N, false)
	v := &State{Amp: s.Amp[:1]}
	tk := ticker{ctx: ctx}
	for i, op := range lp.ops {
		lp.enterState(v, s.Amp, i)
		if err := tk.add(lp.work[i]); err != nil {
			return err
		}
		v.ApplyOp(op)
	}
	lp.finishState(v, s.Amp)
	return nil
}

// enterState inserts the qubits that operation i of lp touches first into
// the compact state v, whose amplitudes live at the start of full.
func (lp *lazyPlan) enterState(v *State, full []complex128, i int) {
	for _, b := range lp.grow[i] {
		growState(full, v.N, b)
		v.N++
		v.Amp = full[:1<<v.N]
	}
}

// finishState inserts the qubits no operation touched; full then holds the
// state in the circuit's layout.
func (lp *lazyPlan) finishState(v *State, full []complex128) {
	for _, b := range lp.tail {
		growState(full, v.N, b)
		v.N++
		v.Amp = full[:1<<v.N]
	}
}

// runTrajectories averages the outcome distributions of noisy trajectories.
// Each trajectory starts in |0...0> and leaves idle qubits out until an
// operation touches them (see lazy.go), which changes neither the jumps
// drawn nor their probabilities. It checks ctx about every tickWork
// amplitudes of work.
func runTrajectories(ctx context.Context, c *circuit.Circuit, opt Options) (mean, stderr []float64, err error) {
	T := opt.Trajectories
	if T == 0 {
		T = DefaultTrajectories
	}
	ops := c.Decompose().Ops
	m := opt.Noise
	if !m.gateNoise() {
		T = 1 // every trajectory is the same pure state
		ops = c.Ops
	}
	q := len(c.Regs.Class)
	mean = make([]float64, 2<<q)
	m2 := make([]float64, 2<<q)
	full, err := NewState(c.NQubits)
	if err != nil {
		return nil, nil, err
	}
	lp := planLazy(ops, c.NQubits, false)
	tk := ticker{ctx: ctx}
	s := &State{}
	for t := 1; t <= T; t++ {
		if ctx.Err() != nil {
			return nil, nil, ctx.Err()
		}
		clear(full.Amp)
		full.Amp[0] = 1
		s.N, s.Amp = 0, full.Amp[:1]
		for i, op := range lp.ops {
			lp.enterState(s, full.Amp, i)
			if err := tk.add(lp.work[i]); err != nil {
				return nil, nil, err
			}
			s.ApplyOp(op)
			if !m.gateNoise() {
				continue
			}
			switch op.Gate {
			case circuit.Measure:
			case circuit.CNOT, circuit.CZ, circuit.SWAP:
				s.noisy2(op.Controls[0], op.Target, m, opt.Rng)
			default:
				s.noisy1(op.Target, m, opt.Rng)
			}
		}
		lp.finishState(s, full.Amp)
		p := stateOutcomes(full, c.Regs)
		if m.Readout != [2]float64{} {
			if p, err = Readout(p, m.Readout[0], m.Readout[1]); err != nil {
				return nil, nil, err
			}
		}
		// Welford's running mean and sum of squared deviations (common practice).
		for i, v := range p {
			d := v - mean[i]
			mean[i] += d / float64(t)
			m2[i] += d * (v - mean[i])
		}
	}
	stderr = make([]float64, len(mean))
	if T > 1 {
		for i := range stderr {
			stderr[i] = math.Sqrt(m2[i] / float64(T-1) / float64(T))
		}
	}
	return mean, stderr, nil
}

// noisy1 applies the stochastic single-qubit noise after a gate on q.
func (s *State) noisy1(q int, m NoiseModel, rng *rand.Rand) {
	if p := m.Depolarizing[0]; p != 0 && rng.Float64() < p {
		if k := rng.IntN(4); k != 0 {
			s.Apply1(q, pauli[k])
		}
	}
	s.damp(q, m, rng)
}

// noisy2 applies the stochastic noise after a CNOT on (c, t).
func (s *State) noisy2(c, t int, m NoiseModel, rng *rand.Rand) {
	if p := m.Depolarizing[1]; p != 0 && rng.Float64() < p {
		k := rng.IntN(16) // uniformly one of the 16 two-qubit Paulis, identity included
		if k&3 != 0 {
			s.Apply1(c, pauli[k&3])
		}
		if k>>2 != 0 {
			s.Apply1(t, pauli[k>>2])
		}
	}
	s.damp(c, m, rng)
	s.damp(t, m, rng)
}

// damp applies one quantum-jump step of amplitude damping and then of phase
// damping on qubit q: a jump with probability ||K1 psi||^2, else K0, and
// renormalisation.
func (s *State) damp(q int, m NoiseModel, rng *rand.Rand) {
	if g := m.AmplitudeDamping; g != 0 {
		p1 := s.prob1(q)
		if pj := g * p1; rng.Float64() < pj {
			apply1Real(s.Amp, q, 0, 1/math.Sqrt(p1), 0, 0) // |1> -> |0>
		} else {
			r := 1 / math.Sqrt(1-pj)
			apply1Real(s.Amp, q, r, 0, 0, math.Sqrt(1-g)*r)
		}
	}
	if l := m.PhaseDamping; l != 0 {
		p1 := s.prob1(q)
		if pj := l * p1; rng.Float64() < pj {
			apply1Real(s.Amp, q, 0, 0, 0, 1/math.Sqrt(p1)) // project onto |1>
		} else {
			r := 1 / math.Sqrt(1-pj)
			apply1Real(s.Amp, q, r, 0, 0, math.Sqrt(1-l)*r)
		}
	}
}
