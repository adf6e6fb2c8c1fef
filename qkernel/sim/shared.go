package sim

import (
	"context"
	"errors"
	"fmt"
	"math"
	"slices"

	"fringe/qkernel/circuit"
)

// ErrNotShared marks a circuit that a Shared cannot run: a different
// register layout, other first or last operations, or a middle that touches
// other qubits than the circuit the Shared was built from. Simulate it on
// its own.
var ErrNotShared = errors.New("circuit does not share the prepared parts")

// Shared holds what noisy density-matrix simulations of a family of circuits
// have in common, when the circuits differ only in a run of operations in
// the middle (the classifier's circuits for one training set differ only
// where the test vector is loaded):
//
//   - the state after the first operations (the prefix), simulated once;
//   - for every outcome o of the (ancilla, class) distribution, the
//     observable A_o = S^dagger(Pi_o) of the last operations (the suffix) S
//     with their noise, evolved backwards once (the Heisenberg picture:
//     Tr(Pi_o S(rho)) = Tr(S^dagger(Pi_o) rho), with S^dagger the adjoint
//     channel; Pi_o projects on the basis states of outcome o).
//
// Simulate then runs only the middle operations, from a copy of the prefix
// state, and reads P(o) = Tr(A_o rho) off the middle's state. The suffix
// acts as the identity on the qubits it does not touch and that are not
// measured (the data register of a classifier circuit), so A_o = B_o ⊗ I
// and the observables live on the suffix's own qubits; the qubits still
// idle after the middle (the class register) are |0>, so only the block of
// B_o where they are 0 is kept. A run traces the middle's state over the
// qubits the suffix ignores and takes one inner product per outcome.
//
// Adjoints: a single-qubit gate with its channels is one superoperator T;
// its adjoint is the conjugate transpose T^H (with the Hilbert-Schmidt
// inner product <A, rho> = Tr(A^dagger rho) = vec(A)^H vec(rho)). The
// two-qubit depolarizing channel is its own adjoint, and so is conjugation
// by CNOT (CNOT is Hermitian and unitary); the adjoint of the noisy CNOT
// (CNOT, depolarizing, damping of the control, damping of the target) is
// their adjoints in the reverse order. Without gate noise the circuit is
// not decomposed, and the adjoint of U is U^dagger: RY(t) -> RY(-t),
// RZ(t) -> RZ(-t), a uniformly controlled RY with negated angles; H, X and
// CNOT are their own inverses.
//
// Cost: building a Shared runs the prefix once and the suffix backwards
// 2^(1+q) times (q class qubits) on the suffix's qubits only (for a
// classifier circuit 1 + index + class qubits: 4^(data qubits) times fewer
// entries than the register); Simulate costs the middle, a partial trace
// and 2^(1+q) inner products on the suffix's qubits. A classifier
// circuit's suffix (the class register and the final Hadamard) is then
// nearly free, even for a single circuit. Memory: the prefix state and
// 2^(1+q) observables of 4^t entries, t = 1 + index qubits.
//
// The distribution agrees with Simulate's to rounding (the channels are
// the same; the sums run in another order; within 1e-12, tested), not to
// the last bit. A Shared is read-only after NewShared, so several
// goroutines may call Simulate at once.
type Shared struct {
	n      int
	regs   circuit.Layout
	opt    Options
	from   int          // prefix length (compiled operations)
	prefix []circuit.Op // c.Ops[:from], deep copies
	suffix []circuit.Op // c.Ops[to:], deep copies
	state  []complex128 // density on active after the prefix
	active []int        // qubits active after the prefix, ascending
	mid    []int        // qubits active after the middle, ascending
	// The observables live on T, the qubits of mid that the suffix touches
	// or that are measured; the others of mid (R) are traced out.
	tpos  []int       // bits of T within mid
	rpos  []int       // bits of R within mid
	obsRe [][]float64 // obsRe[o][j<<t | i] = Re C_o[i][j] (transposed), t = len(tpos)
	obsIm [][]float64 // imaginary parts; nil when every observable is real
}

// NewShared prepares the shared parts of the circuits that begin with
// c.Ops[:from] and end with c.Ops[to:] under opt (noise, readout). The
// method must resolve to DensityMatrix (opt.Method Auto or DensityMatrix).
// It returns errors prefixed "sim: " for an invalid circuit or noise model,
// another method, from/to out of range, or a suffix with a gate whose
// adjoint it does not know; and ctx.Err() when cancelled.
//
// The observables are computed on the qubits the suffix touches and the
// measured ones (S), not on the whole register: the suffix acts as the
// identity on the others, so A_o = B_o ⊗ I and Tr(A_o rho) = Tr(B_o
// Tr_rest rho). Of S, the qubits still idle after the middle are |0>, so
// only the block of B_o where they are 0 is kept (C_o, on T); a run then
// traces the middle's state over its other qubits (R) and takes
// P(o) = Tr(C_o sigma), sigma = Tr_R rho.
func NewShared(ctx context.Context, c *circuit.Circuit, from, to int, opt Options) (*Shared, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	if err := opt.Noise.Validate(); err != nil {
		return nil, err
	}
	m, err := chooseMethod(c.NQubits, opt)
	if err != nil {
		return nil, err
	}
	if m != DensityMatrix {
		return nil, fmt.Errorf("sim: shared simulations need the density-matrix method, not %v", m)
	}
	if from < 0 || from > to || to > len(c.Ops) {
		return nil, fmt.Errorf("sim: shared range [%d,%d) outside the %d operations", from, to, len(c.Ops))
	}
	for _, op := range c.Ops[to:] {
		switch op.Gate {
		case circuit.H, circuit.X, circuit.RY, circuit.RZ, circuit.CNOT, circuit.Measure, circuit.UCRY:
		default:
			return nil, fmt.Errorf("sim: shared suffix: no adjoint for gate %v", op.Gate)
		}
	}
	noisy := opt.Noise.gateNoise()
	n := c.NQubits
	sh := &Shared{n: n, regs: c.Regs, opt: opt, from: from,
		prefix: cloneOps(c.Ops[:from]), suffix: cloneOps(c.Ops[to:])}
	sh.opt.Method = DensityMatrix

	// The prefix, once.
	lp := planLazy(elementary(c, c.Ops[:from], noisy), n, true)
	buf := make([]complex128, 1<<(2*len(lp.active)))
	buf[0] = 1
	v := &Density{Rho: buf[:1]}
	if err := applyDensity(ctx, v, buf, lp, opt.Noise); err != nil {
		return nil, err
	}
	sh.state, sh.active = v.Rho, lp.active
	sh.mid = planLazyFrom(elementary(c, c.Ops[from:to], noisy), n, sh.active, true).active

	// S: the qubits of the suffix and the measured ones, ascending.
	suffix := elementary(c, c.Ops[to:], noisy)
	inS := make([]bool, n)
	inS[c.Regs.Ancilla] = true
	for _, q := range c.Regs.Class {
		inS[q] = true
	}
	for _, op := range suffix {
		for _, q := range op.Qubits() {
			inS[q] = true
		}
	}
	var S []int
	spos := make([]int, n) // compact bit of a qubit of S
	for q := range n {
		if inS[q] {
			spos[q] = len(S)
			S = append(S, q)
		}
	}
	for j, q := range sh.mid {
		if inS[q] {
			sh.tpos = append(sh.tpos, j)
		} else {
			sh.rpos = append(sh.rpos, j)
		}
	}
	// The suffix renumbered to S.
	ren := make([]circuit.Op, len(suffix))
	for i, op := range suffix {
		ren[i] = op
		ren[i].Target = spos[op.Target]
		if op.Controls != nil {
			ren[i].Controls = make([]int, len(op.Controls))
			for j, q := range op.Controls {
				ren[i].Controls[j] = spos[q]
			}
		}
	}
	regs := circuit.Layout{Ancilla: spos[c.Regs.Ancilla], Class: make([]int, len(c.Regs.Class))}
	for j, q := range c.Regs.Class {
		regs.Class[j] = spos[q]
	}
	// embed[i]: the S-index of the T-index i (the idle qubits of S at 0).
	t := len(sh.tpos)
	embed := make([]int, 1<<t)
	for i := range embed {
		for j, p := range sh.tpos {
			embed[i] |= (i >> j & 1) << spos[sh.mid[p]]
		}
	}

	// The observables, backwards through the suffix.
	ns := len(S)
	a := &Density{N: ns, Rho: make([]complex128, 1<<(2*ns))}
	outcomes := 2 << len(c.Regs.Class)
	sh.obsRe = make([][]float64, outcomes)
	im := make([][]float64, outcomes)
	anyImag := false
	tk := ticker{ctx: ctx}
	D := 1 << ns
	for o := range outcomes {
		clear(a.Rho)
		for b := range D {
			if outcomeIndex(b, regs) == o {
				a.Rho[b*D+b] = 1
			}
		}
		for i := len(ren) - 1; i >= 0; i-- {
			if err := tk.add(len(a.Rho)); err != nil {
				return nil, err
			}
			adjointOp(a, ren[i], opt.Noise)
		}
		re := make([]float64, 1<<(2*t))
		imo := make([]float64, 1<<(2*t))
		for i, ei := range embed {
			for j, ej := range embed {
				x := a.Rho[ei<<ns|ej] // C_o[i][j], stored at the transposed place
				re[j<<t|i] = real(x)
				imo[j<<t|i] = imag(x)
				if imag(x) != 0 { // exact: a real observable takes the float64 path
					anyImag = true
				}
			}
		}
		sh.obsRe[o], im[o] = re, imo
	}
	if anyImag {
		sh.obsIm = im
	}
	return sh, nil
}

// elementary returns ops as the density-matrix runner applies them:
// decomposed into elementary gates when the model has gate noise.
func elementary(c *circuit.Circuit, ops []circuit.Op, noisy bool) []circuit.Op {
	if !noisy {
		return ops
	}
	return (&circuit.Circuit{NQubits: c.NQubits, Regs: c.Regs, Ops: ops}).Decompose().Ops
}

func cloneOps(ops []circuit.Op) []circuit.Op {
	out := make([]circuit.Op, len(ops))
	for i, op := range ops {
		out[i] = op
		out[i].Controls = slices.Clone(op.Controls)
		out[i].Angles = slices.Clone(op.Angles)
	}
	return out
}

// sameOp reports whether two operations are identical (angles bit for bit).
func sameOp(a, b circuit.Op) bool {
	if a.Gate != b.Gate || a.Target != b.Target || !slices.Equal(a.Controls, b.Controls) ||
		math.Float64bits(a.Angle) != math.Float64bits(b.Angle) || len(a.Angles) != len(b.Angles) {
		return false
	}
	for i, x := range a.Angles {
		if math.Float64bits(x) != math.Float64bits(b.Angles[i]) {
			return false
		}
	}
	return true
}

// adjointOp applies the adjoint of the noisy (or, without gate noise,
// noiseless) operation op to the observable a; see Shared.
func adjointOp(a *Density, op circuit.Op, m NoiseModel) {
	if !m.gateNoise() {
		switch op.Gate {
		case circuit.Measure:
		case circuit.RY, circuit.RZ:
			inv := op
			inv.Angle = -op.Angle
			a.ApplyOp(inv)
		case circuit.UCRY:
			inv := op
			inv.Angles = make([]float64, len(op.Angles))
			for i, t := range op.Angles {
				inv.Angles[i] = -t
			}
			a.ApplyOp(inv)
		default: // H, X, CNOT: their own inverses
			a.ApplyOp(op)
		}
		return
	}
	damp, dampOn := m.dampingSuperop()
	switch op.Gate {
	case circuit.Measure:
	case circuit.CNOT:
		ctl := op.Controls[0]
		if dampOn {
			dh := damp.adjoint()
			a.ApplySuperop1(op.Target, dh)
			a.ApplySuperop1(ctl, dh)
		}
		if p := m.Depolarizing[1]; p != 0 {
			a.Depolarize2(ctl, op.Target, p)
		}
		a.ApplyCNOT(ctl, op.Target)
	default:
		u, err := GateMatrix(op.Gate, op.Angle)
		if err != nil {
			panic(err) // Decompose leaves only elementary gates; NewShared checked the kinds
		}
		a.ApplySuperop1(op.Target, KrausSuperop([]Matrix{u}).Then(m.after1()).adjoint())
	}
}

// adjoint returns the conjugate transpose of s, the superoperator of the
// adjoint channel.
func (s Superop) adjoint() Superop {
	var t Superop
	for i := range 4 {
		for j := range 4 {
			t[i][j] = complex(real(s[j][i]), -imag(s[j][i]))
		}
	}
	return t
}

// Simulate returns the outcome distribution of c, which must have the
// Shared's qubits and registers, its first and last operations (compared
// exactly) and a middle that touches the same qubits; otherwise it returns
// an error wrapping ErrNotShared. The readout error of the Shared's noise
// model is applied as in the package-level Simulate. It checks ctx as the
// simulators do.
func (sh *Shared) Simulate(ctx context.Context, c *circuit.Circuit) (Result, error) {
	if err := c.Validate(); err != nil {
		return Result{}, err
	}
	if err := ctx.Err(); err != nil {
		return Result{}, err
	}
	to := len(c.Ops) - len(sh.suffix)
	if c.NQubits != sh.n || !sameLayout(c.Regs, sh.regs) || to < sh.from {
		return Result{}, fmt.Errorf("sim: shared run: %w", ErrNotShared)
	}
	for i, op := range sh.prefix {
		if !sameOp(op, c.Ops[i]) {
			return Result{}, fmt.Errorf("sim: shared run: operation %d differs: %w", i, ErrNotShared)
		}
	}
	for i, op := range sh.suffix {
		if !sameOp(op, c.Ops[to+i]) {
			return Result{}, fmt.Errorf("sim: shared run: operation %d differs: %w", to+i, ErrNotShared)
		}
	}
	noisy := sh.opt.Noise.gateNoise()
	mp := planLazyFrom(elementary(c, c.Ops[sh.from:to], noisy), sh.n, sh.active, true)
	if !slices.Equal(mp.active, sh.mid) {
		return Result{}, fmt.Errorf("sim: shared run: the middle touches qubits %v, prepared for %v: %w", mp.active, sh.mid, ErrNotShared)
	}
	buf := make([]complex128, 1<<(2*len(sh.mid)))
	copy(buf, sh.state)
	v := &Density{N: len(sh.active), Rho: buf[:len(sh.state)]}
	if err := applyDensity(ctx, v, buf, mp, sh.opt.Noise); err != nil {
		return Result{}, err
	}
	sigma := sh.trace(v)
	res := Result{Method: DensityMatrix, Qubits: sh.n, P: make([]float64, len(sh.obsRe))}
	for o, re := range sh.obsRe {
		re = re[:len(sigma)]
		var p float64
		if sh.obsIm == nil {
			for i, x := range sigma {
				p += re[i] * real(x)
			}
		} else {
			im := sh.obsIm[o][:len(sigma)]
			for i, x := range sigma {
				p += re[i]*real(x) - im[i]*imag(x)
			}
		}
		res.P[o] = max(p, 0) // rounding can leave a tiny negative probability, as in marginal
	}
	if r := sh.opt.Noise.Readout; r != [2]float64{} {
		var err error
		if res.P, err = Readout(res.P, r[0], r[1]); err != nil {
			return Result{}, err
		}
	}
	return res, nil
}

// trace returns sigma = Tr_R rho of the middle's state v (on mid), indexed
// i<<t | j over the T-indices, the traced bits summed in ascending order.
func (sh *Shared) trace(v *Density) []complex128 {
	t, k := len(sh.tpos), len(sh.mid)
	spread := func(pos []int, i int) int {
		x := 0
		for j, p := range pos {
			x |= (i >> j & 1) << p
		}
		return x
	}
	et := make([]int, 1<<t)
	for i := range et {
		et[i] = spread(sh.tpos, i)
	}
	er := make([]int, 1<<len(sh.rpos))
	for i := range er {
		er[i] = spread(sh.rpos, i)
	}
	sigma := make([]complex128, 1<<(2*t))
	for i, ei := range et {
		for j, ej := range et {
			var x complex128
			for _, r := range er {
				x += v.Rho[(ei|r)<<k|ej|r]
			}
			sigma[i<<t|j] = x
		}
	}
	return sigma
}

func sameLayout(a, b circuit.Layout) bool {
	return a.Ancilla == b.Ancilla && slices.Equal(a.Index, b.Index) && slices.Equal(a.Data, b.Data) && slices.Equal(a.Class, b.Class)
}
