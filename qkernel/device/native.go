package device

import (
	"math"
	"math/cmplx"

	"fringe/qkernel/circuit"
)

// mat2 is a 2x2 complex matrix, row-major.
type mat2 [2][2]complex128

var ident2 = mat2{{1, 0}, {0, 1}}

func mul2(a, b mat2) mat2 {
	return mat2{
		{a[0][0]*b[0][0] + a[0][1]*b[1][0], a[0][0]*b[0][1] + a[0][1]*b[1][1]},
		{a[1][0]*b[0][0] + a[1][1]*b[1][0], a[1][0]*b[0][1] + a[1][1]*b[1][1]},
	}
}

// gateMat2 returns the matrix of a one-qubit gate with the conventions of
// package circuit (the same as sim.GateMatrix).
func gateMat2(g circuit.Gate, a float64) mat2 {
	switch g {
	case circuit.H:
		s := complex(1/math.Sqrt2, 0)
		return mat2{{s, s}, {s, -s}}
	case circuit.X:
		return mat2{{0, 1}, {1, 0}}
	case circuit.SX:
		return mat2{{(1 + 1i) / 2, (1 - 1i) / 2}, {(1 - 1i) / 2, (1 + 1i) / 2}}
	case circuit.RX:
		c, s := math.Cos(a/2), math.Sin(a/2)
		return mat2{{complex(c, 0), complex(0, -s)}, {complex(0, -s), complex(c, 0)}}
	case circuit.RY:
		c, s := math.Cos(a/2), math.Sin(a/2)
		return mat2{{complex(c, 0), complex(-s, 0)}, {complex(s, 0), complex(c, 0)}}
	case circuit.RZ:
		return mat2{{cmplx.Exp(complex(0, -a/2)), 0}, {0, cmplx.Exp(complex(0, a/2))}}
	}
	panic("device: not a one-qubit gate: " + g.String()) // callers pass one-qubit gates only
}

// zyz returns Euler angles with u = exp(i phase) RZ(beta) RY(gamma)
// RZ(delta), gamma in [0, pi]. Writing u / sqrt(det u) = [[a, -b*], [b, a*]],
// RZ(beta) RY(gamma) RZ(delta) = [[e^{-i(beta+delta)/2} cos(gamma/2), ...],
// [e^{i(beta-delta)/2} sin(gamma/2), ...]] (derived by hand from the
// matrices of Nielsen & Chuang 2010, eqs. (4.5)-(4.6)); so gamma =
// 2 atan2(|b|, |a|), beta = arg b - arg a and delta = -arg a - arg b. When
// gamma is 0 or pi only beta + delta or beta - delta is defined; the other
// angle is set to 0.
func zyz(u mat2) (beta, gamma, delta float64) {
	det := u[0][0]*u[1][1] - u[0][1]*u[1][0]
	// 1/sqrt(det) for |det| = 1: the conjugate of the principal square root.
	half := math.Atan2(imag(det), real(det)) / 2
	sn, cs := math.Sincos(-half)
	inv := complex(cs, sn)
	a, b := u[0][0]*inv, u[1][0]*inv
	ra, rb := math.Hypot(real(a), imag(a)), math.Hypot(real(b), imag(b))
	gamma = 2 * math.Atan2(rb, ra)
	switch {
	case circuit.Dead(gamma):
		return -2 * math.Atan2(imag(a), real(a)), 0, 0
	case circuit.Dead(gamma - math.Pi):
		return 2 * math.Atan2(imag(b), real(b)), math.Pi, 0
	}
	pa, pb := math.Atan2(imag(a), real(a)), math.Atan2(imag(b), real(b))
	return pb - pa, gamma, -pa - pb
}

// synth appends to dst a native sequence (in circuit order) for the
// one-qubit unitary u on qubit q, exact up to a global phase, with dead
// rotations dropped (circuit.Dead). With u = RZ(beta) RY(gamma) RZ(delta)
// (zyz) the sequences are, all derived by hand and checked as unitaries up
// to phase in the tests:
//
// rz-sx-x-cx:
//
//	gamma = 0:     rz(beta+delta)
//	gamma = pi:    rz(pi+delta-beta), x        RY(pi) = X Z and RZ(b) X = X RZ(-b)
//	gamma = pi/2:  rz(delta-pi/2), sx, rz(beta+pi/2)
//	               RY(pi/2) = RZ(pi/2) RX(pi/2) RZ(-pi/2), SX ~ RX(pi/2)
//	otherwise:     rz(delta), sx, rz(gamma+pi), sx, rz(beta+pi)
//	               RY(g) ~ RZ(pi) SX RZ(g+pi) SX, from RY(g) = S RX(g) S^dagger,
//	               RX(g) = H RZ(g) H and H ~ RZ(pi/2) SX RZ(pi/2)
//
// rz-rx-ry-cz: the shorter (after dropping dead rotations) of
//
//	rz(delta), ry(gamma), rz(beta)                   (the ZYZ form)
//	rz(delta-pi/2), rx(gamma), rz(beta+pi/2)         RY(g) = RZ(pi/2) RX(g) RZ(-pi/2)
//
// the ZYZ form on a tie; gamma = 0 gives rz(beta+delta) and gamma = pi
// ry(pi), rz(beta-delta) (RY(pi) RZ(d) = RZ(-d) RY(pi)), or rx(pi) alone
// when beta - delta + pi is dead.
func synth(dst []gate, fam Family, u mat2, q int16) []gate {
	beta, gamma, delta := zyz(u)
	rz := func(a float64) { dst = appendRot(dst, circuit.RZ, q, a) }
	switch {
	case gamma == 0: // exact: zyz returns 0 for a dead gamma
		rz(beta + delta)
		return dst
	case fam == FamilyCX && gamma == math.Pi: // exact: zyz returns pi for gamma = pi
		rz(math.Pi + delta - beta)
		return append(dst, gate{kind: circuit.X, t: q, c: -1})
	case fam == FamilyCZ && gamma == math.Pi:
		// RY(pi) RZ(d) = RZ(-d) RY(pi), and RZ(a) RY(pi) ~ RZ(a+pi) RX(pi)
		// (RY(pi) = -iY = X Z ~ RX(pi) RZ(pi)): one gate when a rotation
		// is dead.
		if !circuit.Dead(beta-delta) && circuit.Dead(beta-delta+math.Pi) {
			return append(dst, gate{kind: circuit.RX, t: q, c: -1, angle: math.Pi})
		}
		dst = append(dst, gate{kind: circuit.RY, t: q, c: -1, angle: math.Pi})
		rz(beta - delta)
		return dst
	case fam == FamilyCX && circuit.Dead(gamma-math.Pi/2):
		rz(delta - math.Pi/2)
		dst = append(dst, gate{kind: circuit.SX, t: q, c: -1})
		rz(beta + math.Pi/2)
		return dst
	case fam == FamilyCX:
		rz(delta)
		dst = append(dst, gate{kind: circuit.SX, t: q, c: -1})
		rz(gamma + math.Pi)
		dst = append(dst, gate{kind: circuit.SX, t: q, c: -1})
		rz(beta + math.Pi)
		return dst
	}
	// FamilyCZ: count the live rotations of both forms.
	live := func(as ...float64) int {
		n := 0
		for _, a := range as {
			if !circuit.Dead(a) {
				n++
			}
		}
		return n
	}
	if live(delta-math.Pi/2, gamma, beta+math.Pi/2) < live(delta, gamma, beta) {
		rz(delta - math.Pi/2)
		dst = appendRot(dst, circuit.RX, q, gamma)
		rz(beta + math.Pi/2)
		return dst
	}
	rz(delta)
	dst = appendRot(dst, circuit.RY, q, gamma)
	rz(beta)
	return dst
}

// appendRot appends a rotation unless it is dead, with the angle reduced
// into (-pi, pi] by a multiple of 2 pi (a global phase of -1 at most: see
// circuit.Simplify on why no measured probability changes).
func appendRot(dst []gate, g circuit.Gate, q int16, a float64) []gate {
	r := a - 2*math.Pi*math.Round(a/(2*math.Pi)) // in [-pi, pi]
	if math.Abs(r) <= circuit.AngleTol {         // circuit.Dead(a)
		return dst
	}
	if r <= -math.Pi {
		r += 2 * math.Pi
	}
	return append(dst, gate{kind: g, t: q, c: -1, angle: r})
}

// merger collects the one-qubit gates on each qubit into one unitary and
// writes it out, synthesised in the native family, when a two-qubit gate
// or a measurement needs the qubit.
type merger struct {
	fam     Family
	pend    []mat2
	has     []bool
	out     []gate   // the current chunk
	full    [][]gate // full chunks, in order
	size    int      // gates in full
	flushed int      // runs synthesised
	// konst[q] is the index in constMats of q's pending unitary while it
	// is one of them alone (no other gate merged in), else -1; such a run
	// is written from constSeq, synth's output computed once.
	konst    []int8
	constSeq [][]gate
	// emptied reports that some run synthesised to nothing (the
	// identity): only then can native two-qubit gates meet that the
	// routed form did not cancel (see Compile).
	emptied bool
	// sched, when set, counts the gates as they are written.
	sched *schedule
}

// constMats are the one-qubit gates the two-qubit translations insert
// (cnot): runs that hold one of them alone are common on SWAP-heavy
// programs, so their synthesis is computed once per merger.
var constMats = []mat2{hMat, ryMinusPi, ryPlusPi}

const (
	constH int8 = iota
	constRYMinus
	constRYPlus
)

// mergeChunk is the size of the output chunks: large outputs grow by
// chunks and are joined once, instead of being copied at every growth.
const mergeChunk = 1 << 20

// newMerger returns a merger for n qubits whose output is expected to hold
// about capacity gates (it grows by chunks beyond).
func newMerger(fam Family, n, capacity int) *merger {
	m := &merger{fam: fam, pend: make([]mat2, n), has: make([]bool, n), out: make([]gate, 0, max(capacity, 1024)), konst: make([]int8, n)}
	for _, u := range constMats {
		m.constSeq = append(m.constSeq, synth(nil, fam, u, 0))
	}
	return m
}

// room starts a new chunk when the current one cannot take k more gates.
func (m *merger) room(k int) {
	if len(m.out)+k <= cap(m.out) {
		return
	}
	if len(m.full) == 0 && cap(m.out) < mergeChunk {
		m.out = append(make([]gate, 0, min(mergeChunk, 4*cap(m.out))), m.out...)
		if len(m.out)+k <= cap(m.out) {
			return
		}
	}
	m.full = append(m.full, m.out)
	m.size += len(m.out)
	m.out = make([]gate, 0, mergeChunk)
}

func (m *merger) one(q int16, u mat2) {
	m.konst[q] = -1
	if m.has[q] {
		m.pend[q] = mul2(u, m.pend[q])
		return
	}
	m.pend[q], m.has[q] = u, true
}

// oneConst is one with the gate constMats[k].
func (m *merger) oneConst(q int16, k int8) {
	if m.has[q] {
		m.one(q, constMats[k])
		return
	}
	m.pend[q], m.has[q], m.konst[q] = constMats[k], true, k
}

func (m *merger) flush(q int16) {
	if m.has[q] {
		m.room(5) // synth writes at most five gates
		before := len(m.out)
		if k := m.konst[q]; k >= 0 {
			for _, g := range m.constSeq[k] {
				g.t = q
				m.out = append(m.out, g)
			}
		} else {
			m.out = synth(m.out, m.fam, m.pend[q], q)
		}
		m.emptied = m.emptied || len(m.out) == before
		if m.sched != nil {
			for _, g := range m.out[before:] {
				m.sched.add(g)
			}
		}
		m.has[q] = false
		m.flushed++
	}
}

func (m *merger) emit(g gate) {
	m.flush(g.t)
	if g.c >= 0 {
		m.flush(g.c)
	}
	m.room(1)
	m.out = append(m.out, g)
	if m.sched != nil {
		m.sched.add(g)
	}
}

func (m *merger) finish() []gate {
	for q := range m.has {
		m.flush(int16(q))
	}
	if len(m.full) == 0 {
		return m.out
	}
	all := make([]gate, 0, m.size+len(m.out))
	for _, c := range m.full {
		all = append(all, c...)
	}
	return append(all, m.out...)
}

var (
	hMat      = gateMat2(circuit.H, 0)
	ryMinusPi = gateMat2(circuit.RY, -math.Pi/2)
	ryPlusPi  = gateMat2(circuit.RY, math.Pi/2)
)

// cnot writes CNOT(c, t) in the native family:
//
//	rz-sx-x-cx, native orientation:   cx c, t
//	rz-sx-x-cx, reverse orientation:  h c, h t, cx t, c, h c, h t
//	    (H⊗H CNOT(t,c) H⊗H = CNOT(c,t): Nielsen & Chuang 2010, exercise
//	    4.20, recalled from memory; checked as a unitary in the tests)
//	rz-rx-ry-cz:                      ry(-pi/2) t, cz c, t, ry(pi/2) t
//	    (RY(pi/2) Z RY(-pi/2) = X, so (I⊗RY(pi/2)) CZ (I⊗RY(-pi/2)) = CNOT
//	    exactly; derived by hand)
//
// with the one-qubit gates merged into the neighbouring runs.
func (m *merger) cnot(c, t int16, native bool) {
	switch {
	case m.fam == FamilyCZ:
		m.oneConst(t, constRYMinus)
		m.emit(gate{kind: circuit.CZ, t: t, c: c})
		m.oneConst(t, constRYPlus)
	case native:
		m.emit(gate{kind: circuit.CNOT, t: t, c: c})
	default:
		m.oneConst(c, constH)
		m.oneConst(t, constH)
		m.emit(gate{kind: circuit.CNOT, t: c, c: t})
		m.oneConst(c, constH)
		m.oneConst(t, constH)
	}
}
