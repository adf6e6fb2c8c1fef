package sim

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"math/rand/v2"

	"fringe/qkernel/circuit"
)

// Channel is a single-qubit noise channel: its Kraus operators (which the
// trajectory method samples) and its superoperator (which the density
// matrix applies). Build it with NewChannel.
type Channel struct {
	Kraus []Matrix
	S     Superop
}

// NewChannel returns the channel rho -> sum_K K rho K^dagger. It is an
// error unless the operators are trace preserving, sum_K K^dagger K = I
// within 1e-12 per entry (rounding of square roots of probabilities).
func NewChannel(ks []Matrix) (*Channel, error) {
	if len(ks) == 0 {
		return nil, fmt.Errorf("sim: channel without Kraus operators")
	}
	var sum Matrix
	for _, k := range ks {
		for r := range 2 {
			for c := range 2 {
				for j := range 2 {
					sum[r][c] += cmplx.Conj(k[j][r]) * k[j][c]
				}
			}
		}
	}
	for r := range 2 {
		for c := range 2 {
			want := complex(0, 0)
			if r == c {
				want = 1
			}
			if v := sum[r][c] - want; cmplx.IsNaN(v) || cmplx.Abs(v) > 1e-12 {
				return nil, fmt.Errorf("sim: channel not trace preserving: (sum K^dagger K)[%d][%d] = %v", r, c, sum[r][c])
			}
		}
	}
	return &Channel{Kraus: append([]Matrix(nil), ks...), S: KrausSuperop(ks)}, nil
}

// TimedOp is one operation of a NoisyCircuit with the noise around it, on
// the qubits of Op in the order of Op.Qubits (target, then the control of
// a two-qubit gate). In order: the Before channels, the gate, the
// depolarizing channel of strength Depolarizing on the gate's one or two
// qubits (rho -> (1-p) rho + p I/d, d = 2 or 4), then the After channels.
// A nil channel is none; index 1 is unused for a one-qubit gate. A Measure
// op carries no noise (measurements are deferred to the end).
type TimedOp struct {
	Op           circuit.Op
	Before       [2]*Channel
	Depolarizing float64
	After        [2]*Channel
}

// NoisyCircuit is a circuit in which every operation carries its own noise:
// the form a calibrated device's noise model takes (package qkernel/device
// builds it from a device description and a schedule).
type NoisyCircuit struct {
	NQubits int
	// Regs locates the ancilla and class qubits whose joint distribution
	// SimulateNoisy returns.
	Regs circuit.Layout
	Ops  []TimedOp
	// Final holds, per qubit (len NQubits, or nil for none), a channel
	// applied after the last operation (relaxation until measurement).
	Final []*Channel
	// Readout holds, per qubit (len NQubits, or nil for none), the
	// assignment errors p01 = P(read 1 | 0) and p10 = P(read 0 | 1) of that
	// qubit, applied to the measured ancilla and class bits.
	Readout [][2]float64
}

// validate checks the circuit and the noise parameters.
func (nc *NoisyCircuit) validate() error {
	if nc == nil {
		return fmt.Errorf("sim: nil noisy circuit")
	}
	c := &circuit.Circuit{NQubits: nc.NQubits, Regs: nc.Regs, Ops: make([]circuit.Op, len(nc.Ops))}
	for i, t := range nc.Ops {
		c.Ops[i] = t.Op
	}
	if err := c.Validate(); err != nil {
		return err
	}
	for i, t := range nc.Ops {
		if err := checkProb(fmt.Sprintf("depolarizing strength of op %d", i), t.Depolarizing); err != nil {
			return err
		}
		if t.Op.Gate == circuit.UCRY {
			return fmt.Errorf("sim: op %d: a noisy circuit takes elementary gates (decompose the circuit first)", i)
		}
		if len(t.Op.Controls) == 0 && (t.Before[1] != nil || t.After[1] != nil) {
			return fmt.Errorf("sim: op %d (%s): a channel on a second qubit of a one-qubit gate", i, t.Op.Gate)
		}
	}
	if nc.Final != nil && len(nc.Final) != nc.NQubits {
		return fmt.Errorf("sim: %d final channels for %d qubits", len(nc.Final), nc.NQubits)
	}
	if nc.Readout != nil {
		if len(nc.Readout) != nc.NQubits {
			return fmt.Errorf("sim: %d readout pairs for %d qubits", len(nc.Readout), nc.NQubits)
		}
		for q, ro := range nc.Readout {
			if err := checkProb(fmt.Sprintf("readout p01 of qubit %d", q), ro[0]); err != nil {
				return err
			}
			if err := checkProb(fmt.Sprintf("readout p10 of qubit %d", q), ro[1]); err != nil {
				return err
			}
		}
	}
	return nil
}

// SimulateNoisy runs a noisy circuit and returns the joint (ancilla, class)
// distribution in the layout of Simulate (index a*2^q + k), after the
// per-qubit readout errors. opt.Noise must be zero (the noise is in the
// circuit). Method Auto picks the density matrix up to MaxDensityQubits
// qubits and trajectories above (opt.Rng required, opt.Trajectories or
// DefaultTrajectories of them); StateVector is an error.
//
// The density matrix is exact. Consecutive one-qubit operations and
// channels on a qubit are composed into one superoperator, applied when a
// two-qubit gate needs the qubit or at the end (the composition of
// channels on one qubit is associative, so this changes only rounding);
// a qubit joins the matrix only at its first two-qubit gate (before, it is
// in a product state with the rest), so the matrix holds the qubits
// entangled so far. A CNOT and its depolarizing channel take one pass.
// A trajectory applies each channel as a quantum jump: Kraus operator K
// with probability ||K psi||^2, then renormalisation; depolarizing picks
// one of the d^2 Paulis (identity included) with probability p.
func SimulateNoisy(ctx context.Context, nc *NoisyCircuit, opt Options) (Result, error) {
	if err := nc.validate(); err != nil {
		return Result{}, err
	}
	if !opt.Noise.IsZero() {
		return Result{}, fmt.Errorf("sim: a noisy circuit carries its own noise; Options.Noise must be zero")
	}
	m := opt.Method
	if m == Auto {
		m = DensityMatrix
		if nc.NQubits > MaxDensityQubits {
			m = Trajectories
		}
	}
	res := Result{Method: m, Qubits: nc.NQubits}
	switch m {
	case DensityMatrix:
		if nc.NQubits > MaxDensityQubits {
			return Result{}, fmt.Errorf("sim: %d qubits exceed the density-matrix limit of %d qubits; use the trajectories method (up to %d qubits)", nc.NQubits, MaxDensityQubits, MaxStateQubits)
		}
		p, err := nc.runDensity(ctx)
		if err != nil {
			return Result{}, err
		}
		res.P = nc.readout(p)
	case Trajectories:
		if nc.NQubits > MaxStateQubits {
			return Result{}, fmt.Errorf("sim: %d qubits exceed the trajectories (state-vector) limit of %d qubits", nc.NQubits, MaxStateQubits)
		}
		if opt.Rng == nil {
			return Result{}, fmt.Errorf("sim: the trajectories method needs Options.Rng")
		}
		if opt.Trajectories < 0 {
			return Result{}, fmt.Errorf("sim: %d trajectories, want a positive number (or 0 for %d)", opt.Trajectories, DefaultTrajectories)
		}
		var err error
		if res.P, res.StdErr, err = nc.runTrajectories(ctx, opt); err != nil {
			return Result{}, err
		}
	case StateVector:
		return Result{}, fmt.Errorf("sim: a noisy circuit needs the density-matrix or trajectories simulator, not the state vector")
	default:
		return Result{}, fmt.Errorf("sim: unknown method %d", int(m))
	}
	return res, nil
}

// pending is the composed one-qubit superoperator waiting on each qubit.
type pending struct {
	s   []Superop
	set []bool
}

func (p *pending) then(q int, s Superop) {
	if p.set[q] {
		p.s[q] = p.s[q].Then(s)
		return
	}
	p.s[q], p.set[q] = s, true
}

func (p *pending) flush(d *Density, q int) {
	if p.set[q] {
		d.ApplySuperop1(q, p.s[q])
		p.set[q] = false
	}
}

// runDensity returns the (ancilla, class) distribution before readout.
//
// Qubits join the density matrix lazily: a qubit that has seen only
// one-qubit operations is in a product state with the rest, kept as its
// pending superoperator applied to |0><0|, and joins (as the new most
// significant compact qubit, rho -> rho_q ⊗ rho) at its first two-qubit
// gate or, if measured, at the end. Unmeasured qubits that never meet a
// two-qubit gate are traced out. So the matrix has 4^k entries for the k
// qubits entangled so far.
func (nc *NoisyCircuit) runDensity(ctx context.Context) ([]float64, error) {
	n := nc.NQubits
	if n > MaxDensityQubits {
		return nil, fmt.Errorf("sim: %d qubits outside the density-matrix range [1,%d]", n, MaxDensityQubits)
	}
	buf := make([]complex128, 1<<(2*n))
	buf[0] = 1
	d := &Density{N: 0, Rho: buf[:1]}
	pos := make([]int, n) // compact qubit of each qubit, -1 while idle
	for i := range pos {
		pos[i] = -1
	}
	pd := &pending{s: make([]Superop, n), set: make([]bool, n)}
	// join adds qubit q, in the state of its pending superoperator applied
	// to |0><0| (column 0 of the superoperator: rho_ab = S[2a+b][0]).
	join := func(q int) {
		if pos[q] >= 0 {
			return
		}
		rq := [2][2]complex128{{1, 0}, {0, 0}}
		if pd.set[q] {
			s := &pd.s[q]
			rq = [2][2]complex128{{s[0][0], s[1][0]}, {s[2][0], s[3][0]}}
			pd.set[q] = false
		}
		k := d.N
		D := 1 << k
		next := buf[:1<<(2*(k+1))]
		// New index (a<<k | r) << (k+1) | (b<<k | c) from old r<<k | c,
		// written from the end so that no old entry is overwritten early.
		for r := D - 1; r >= 0; r-- {
			for c := D - 1; c >= 0; c-- {
				v := next[r<<k|c]
				for a := 1; a >= 0; a-- {
					for b := 1; b >= 0; b-- {
						next[(a<<k|r)<<(k+1)|(b<<k|c)] = rq[a][b] * v
					}
				}
			}
		}
		d.N, d.Rho = k+1, next
		pos[q] = k
	}
	var cq [2]int
	for i, t := range nc.Ops {
		if i%16 == 0 && ctx.Err() != nil {
			return nil, ctx.Err()
		}
		op := t.Op
		if op.Gate == circuit.Measure {
			continue
		}
		qs := op.Qubits()
		for j, q := range qs {
			if ch := t.Before[j]; ch != nil {
				pd.then(q, ch.S)
			}
		}
		if len(qs) == 1 {
			u, err := GateMatrix(op.Gate, op.Angle)
			if err != nil {
				panic(err) // validate admits only elementary gates
			}
			pd.then(op.Target, KrausSuperop([]Matrix{u}))
			if p := t.Depolarizing; p != 0 {
				pd.then(op.Target, DepolarizingSuperop(p))
			}
		} else if op.Gate != circuit.SWAP && pos[qs[0]] >= 0 && pos[qs[1]] >= 0 {
			// Both qubits joined: their pending superoperators, the gate
			// and its depolarizing in one pass (the arithmetic of the
			// branch below).
			var pre [2]*Superop
			for j, q := range qs {
				if pd.set[q] {
					s := pd.s[q]
					pre[j] = &s
					pd.set[q] = false
				}
			}
			d.fusedGate2(pos[qs[0]], pos[qs[1]], pre[0], pre[1], op.Gate, t.Depolarizing)
		} else {
			for j, q := range qs {
				if pos[q] < 0 {
					join(q)
				} else if pd.set[q] {
					d.ApplySuperop1(pos[q], pd.s[q])
					pd.set[q] = false
				}
				cq[j] = pos[q]
			}
			tgt, ctl := cq[0], cq[1]
			switch op.Gate {
			case circuit.CNOT:
				d.applyCNOTNoise(ctl, tgt, t.Depolarizing, nil) // CNOT and depolarizing in one pass
			default:
				d.ApplyOp(circuit.Op{Gate: op.Gate, Target: tgt, Controls: cq[1:2]})
				if p := t.Depolarizing; p != 0 {
					d.Depolarize2(tgt, ctl, p)
				}
			}
		}
		for j, q := range qs {
			if ch := t.After[j]; ch != nil {
				pd.then(q, ch.S)
			}
		}
	}
	measured := append([]int{nc.Regs.Ancilla}, nc.Regs.Class...)
	for q := range n {
		if nc.Final != nil && nc.Final[q] != nil {
			pd.then(q, nc.Final[q].S)
		}
		if pos[q] >= 0 && pd.set[q] {
			d.ApplySuperop1(pos[q], pd.s[q])
			pd.set[q] = false
		}
	}
	for _, q := range measured {
		join(q)
	}
	regs := circuit.Layout{Ancilla: pos[nc.Regs.Ancilla], Class: make([]int, len(nc.Regs.Class))}
	for j, q := range nc.Regs.Class {
		regs.Class[j] = pos[q]
	}
	return jointOutcomes(d.Diag(), regs), nil
}

// jointOutcomes sums basis-state probabilities into the (ancilla, class)
// layout, clamping the rounding negatives of a density matrix at 0.
func jointOutcomes(probs []float64, regs circuit.Layout) []float64 {
	q := len(regs.Class)
	out := make([]float64, 2<<q)
	for b, p := range probs {
		k := 0
		for j, cq := range regs.Class {
			k |= (b >> cq & 1) << j
		}
		out[(b>>regs.Ancilla&1)<<q|k] += p
	}
	for i, v := range out {
		out[i] = max(v, 0)
	}
	return out
}

// readout applies the per-qubit assignment errors to the bits of the
// (ancilla, class) index: bit q (the top bit) is the ancilla, bit j < q
// the class qubit Regs.Class[j].
func (nc *NoisyCircuit) readout(p []float64) []float64 {
	if nc.Readout == nil {
		return p
	}
	q := len(nc.Regs.Class)
	out := append([]float64(nil), p...)
	for b := 0; b <= q; b++ {
		qubit := nc.Regs.Ancilla
		if b < q {
			qubit = nc.Regs.Class[b]
		}
		p01, p10 := nc.Readout[qubit][0], nc.Readout[qubit][1]
		if p01 == 0 && p10 == 0 {
			continue
		}
		m := 1 << b
		for i := range out {
			if i&m != 0 {
				continue
			}
			v0, v1 := out[i], out[i|m]
			out[i] = (1-p01)*v0 + p10*v1
			out[i|m] = p01*v0 + (1-p10)*v1
		}
	}
	return out
}

// runTrajectories averages the outcome distributions of T trajectories.
func (nc *NoisyCircuit) runTrajectories(ctx context.Context, opt Options) (mean, stderr []float64, err error) {
	T := opt.Trajectories
	if T == 0 {
		T = DefaultTrajectories
	}
	rng := opt.Rng
	q := len(nc.Regs.Class)
	mean = make([]float64, 2<<q)
	m2 := make([]float64, 2<<q)
	s, err := NewState(nc.NQubits)
	if err != nil {
		return nil, nil, err
	}
	for tr := 1; tr <= T; tr++ {
		if ctx.Err() != nil {
			return nil, nil, ctx.Err()
		}
		clear(s.Amp)
		s.Amp[0] = 1
		for _, t := range nc.Ops {
			op := t.Op
			if op.Gate == circuit.Measure {
				continue
			}
			qs := op.Qubits()
			for j, qb := range qs {
				if ch := t.Before[j]; ch != nil {
					s.jump(qb, ch.Kraus, rng)
				}
			}
			s.ApplyOp(op)
			if p := t.Depolarizing; p != 0 && rng.Float64() < p {
				if len(qs) == 1 {
					if k := rng.IntN(4); k != 0 {
						s.Apply1(qs[0], pauli[k])
					}
				} else {
					k := rng.IntN(16) // one of the 16 two-qubit Paulis, identity included
					if k&3 != 0 {
						s.Apply1(qs[0], pauli[k&3])
					}
					if k>>2 != 0 {
						s.Apply1(qs[1], pauli[k>>2])
					}
				}
			}
			for j, qb := range qs {
				if ch := t.After[j]; ch != nil {
					s.jump(qb, ch.Kraus, rng)
				}
			}
		}
		if nc.Final != nil {
			for qb, ch := range nc.Final {
				if ch != nil {
					s.jump(qb, ch.Kraus, rng)
				}
			}
		}
		probs := make([]float64, len(s.Amp))
		for b, a := range s.Amp {
			probs[b] = real(a)*real(a) + imag(a)*imag(a)
		}
		p := nc.readout(jointOutcomes(probs, nc.Regs))
		// Welford's running mean and sum of squared deviations (common practice).
		for i, v := range p {
			dv := v - mean[i]
			mean[i] += dv / float64(tr)
			m2[i] += dv * (v - mean[i])
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

// jump applies one quantum-jump step of the channel with Kraus operators
// ks to qubit q: operator K_i is chosen with probability
// p_i = ||K_i psi||^2 = Tr(K_i r K_i^dagger), r the reduced density matrix
// of q, and psi becomes K_i psi / sqrt(p_i).
func (s *State) jump(q int, ks []Matrix, rng *rand.Rand) {
	var r Matrix // reduced density matrix of qubit q
	st := 1 << q
	for b := 0; b < len(s.Amp); b += 2 * st {
		lo := s.Amp[b : b+st]
		hi := s.Amp[b+st : b+2*st]
		for i, a0 := range lo {
			a1 := hi[i]
			r[0][0] += complex(real(a0)*real(a0)+imag(a0)*imag(a0), 0)
			r[1][1] += complex(real(a1)*real(a1)+imag(a1)*imag(a1), 0)
			r[0][1] += a0 * cmplx.Conj(a1)
		}
	}
	r[1][0] = cmplx.Conj(r[0][1])
	u := rng.Float64()
	chosen, pc := len(ks)-1, 0.0
	acc := 0.0
	for i, k := range ks {
		// Tr(K r K^dagger) = sum_{a,b,c} K[a][b] r[b][c] conj(K[a][c]).
		var p float64
		for a := range 2 {
			for b := range 2 {
				for c := range 2 {
					p += real(k[a][b] * r[b][c] * cmplx.Conj(k[a][c]))
				}
			}
		}
		if p <= 0 {
			continue
		}
		chosen, pc = i, p
		acc += p
		if u < acc {
			break
		}
	}
	if pc <= 0 {
		return // unreachable for a trace-preserving channel on a normalised state
	}
	k := ks[chosen]
	f := complex(1/math.Sqrt(pc), 0)
	for a := range 2 {
		for b := range 2 {
			k[a][b] *= f
		}
	}
	s.Apply1(q, k)
}
