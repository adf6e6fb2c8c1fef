package sim

import (
	"fmt"
	"math"
	"math/cmplx"

	"fringe/qkernel/circuit"
)

// Matrix is a 2x2 complex matrix acting on one qubit, row-major:
// Matrix[r][c] maps basis state |c> to |r>.
type Matrix [2][2]complex128

// GateMatrix returns the matrix of a single-qubit gate (H, X, RY, RZ) with
// the conventions of package circuit:
//
//	H     = (1/sqrt2) [[1, 1], [1, -1]]
//	X     = [[0, 1], [1, 0]]
//	RY(t) = [[cos t/2, -sin t/2], [sin t/2, cos t/2]]
//	RZ(t) = diag(exp(-i t/2), exp(i t/2))
//
// (Nielsen & Chuang 2010, section 4.2, eqs. (4.4)-(4.6) for the rotations).
// Other gates are an error.
func GateMatrix(g circuit.Gate, angle float64) (Matrix, error) {
	switch g {
	case circuit.H:
		s := complex(1/math.Sqrt2, 0)
		return Matrix{{s, s}, {s, -s}}, nil
	case circuit.X:
		return Matrix{{0, 1}, {1, 0}}, nil
	case circuit.RY:
		c, s := math.Cos(angle/2), math.Sin(angle/2)
		return Matrix{{complex(c, 0), complex(-s, 0)}, {complex(s, 0), complex(c, 0)}}, nil
	case circuit.RZ:
		return Matrix{{cmplx.Exp(complex(0, -angle/2)), 0}, {0, cmplx.Exp(complex(0, angle/2))}}, nil
	case circuit.SX, circuit.RX:
		return deviceGateMatrix(g, angle), nil
	}
	return Matrix{}, fmt.Errorf("sim: %s is not a single-qubit gate", g)
}

// isReal reports whether every entry of u has a zero imaginary part.
func (u *Matrix) isReal() bool {
	for r := range 2 {
		for c := range 2 {
			if imag(u[r][c]) != 0 { // exact: selects the real-arithmetic kernel
				return false
			}
		}
	}
	return true
}

// State is a pure state of N qubits: Amp[b] is the amplitude of the basis
// state b = sum_q bit_q << q (qubit 0 least significant).
type State struct {
	N   int
	Amp []complex128
}

// NewState returns |0...0> on n qubits. It errors if n is outside
// [1, MaxStateQubits].
func NewState(n int) (*State, error) {
	if n < 1 || n > MaxStateQubits {
		return nil, fmt.Errorf("sim: %d qubits outside the state-vector range [1,%d]", n, MaxStateQubits)
	}
	s := &State{N: n, Amp: make([]complex128, 1<<n)}
	s.Amp[0] = 1
	return s, nil
}

// Apply1 applies the 2x2 matrix u to qubit q in place, in one pass over the
// amplitudes. Real matrices (H, X, RY) use real arithmetic. It panics if q
// is outside [0, N) (an internal invariant: callers validate circuits first).
func (s *State) Apply1(q int, u Matrix) {
	if q < 0 || q >= s.N {
		panic(fmt.Sprintf("sim: qubit %d outside [0,%d)", q, s.N))
	}
	if u.isReal() {
		apply1Real(s.Amp, q, real(u[0][0]), real(u[0][1]), real(u[1][0]), real(u[1][1]))
		return
	}
	apply1(s.Amp, q, &u)
}

// apply1 is the dense complex 2x2 kernel: for every pair of amplitudes that
// differ only in bit q, (a0, a1) <- u (a0, a1).
func apply1(amp []complex128, q int, u *Matrix) {
	u00, u01, u10, u11 := u[0][0], u[0][1], u[1][0], u[1][1]
	st := 1 << q
	if st == 1 {
		for i := 0; i+1 < len(amp); i += 2 {
			p := amp[i : i+2 : i+2]
			a0, a1 := p[0], p[1]
			p[0] = u00*a0 + u01*a1
			p[1] = u10*a0 + u11*a1
		}
		return
	}
	for b := 0; b < len(amp); b += 2 * st {
		lo := amp[b : b+st : b+st]
		hi := amp[b+st : b+2*st : b+2*st]
		hi = hi[:len(lo)]
		for i, a0 := range lo {
			a1 := hi[i]
			lo[i] = u00*a0 + u01*a1
			hi[i] = u10*a0 + u11*a1
		}
	}
}

// apply1Real is apply1 for a real matrix [[r00, r01], [r10, r11]].
func apply1Real(amp []complex128, q int, r00, r01, r10, r11 float64) {
	st := 1 << q
	if st == 1 {
		for i := 0; i+1 < len(amp); i += 2 {
			p := amp[i : i+2 : i+2]
			a0, a1 := p[0], p[1]
			p[0] = complex(r00*real(a0)+r01*real(a1), r00*imag(a0)+r01*imag(a1))
			p[1] = complex(r10*real(a0)+r11*real(a1), r10*imag(a0)+r11*imag(a1))
		}
		return
	}
	for b := 0; b < len(amp); b += 2 * st {
		lo := amp[b : b+st : b+st]
		hi := amp[b+st : b+2*st : b+2*st]
		hi = hi[:len(lo)]
		for i, a0 := range lo {
			a1 := hi[i]
			lo[i] = complex(r00*real(a0)+r01*real(a1), r00*imag(a0)+r01*imag(a1))
			hi[i] = complex(r10*real(a0)+r11*real(a1), r10*imag(a0)+r11*imag(a1))
		}
	}
}

// ApplyCNOT flips qubit t where qubit c is 1 (swaps the amplitudes of
// |c=1, t=0> and |c=1, t=1>). It panics on out-of-range or equal qubits.
func (s *State) ApplyCNOT(c, t int) {
	if c < 0 || c >= s.N || t < 0 || t >= s.N || c == t {
		panic(fmt.Sprintf("sim: cnot %d -> %d on %d qubits", c, t, s.N))
	}
	applyCNOT(s.Amp, c, t)
}

func applyCNOT(amp []complex128, c, t int) {
	cm, tm := 1<<c, 1<<t
	lo, hi := min(c, t), max(c, t)
	// Enumerate the indices with bits c and t both clear by inserting two
	// zero bits into a counter, then swap |c=1,t=0> with |c=1,t=1>.
	n := len(amp) >> 2
	for k := 0; k < n; k++ {
		i := insertZero(insertZero(k, lo), hi) | cm
		amp[i], amp[i|tm] = amp[i|tm], amp[i]
	}
}

// insertZero inserts a zero bit at position p of k.
func insertZero(k, p int) int {
	low := k & (1<<p - 1)
	return (k-low)<<1 | low
}

// ApplyControlled applies u to qubit target on the basis states where every
// control qubit is 1 (a multi-controlled single-qubit gate; with one control
// and u = X it is CNOT). It panics on out-of-range or repeated qubits.
func (s *State) ApplyControlled(controls []int, target int, u Matrix) {
	cmask := 0
	for _, q := range append([]int{target}, controls...) {
		if q < 0 || q >= s.N || cmask&(1<<q) != 0 {
			panic(fmt.Sprintf("sim: controlled gate on qubits %v -> %d of %d", controls, target, s.N))
		}
		if q != target {
			cmask |= 1 << q
		}
	}
	if cmask&(1<<target) != 0 {
		panic(fmt.Sprintf("sim: target %d among the controls %v", target, controls))
	}
	tm := 1 << target
	u00, u01, u10, u11 := u[0][0], u[0][1], u[1][0], u[1][1]
	n := len(s.Amp) >> 1
	for k := 0; k < n; k++ {
		i := insertZero(k, target)
		if i&cmask != cmask {
			continue
		}
		a0, a1 := s.Amp[i], s.Amp[i|tm]
		s.Amp[i] = u00*a0 + u01*a1
		s.Amp[i|tm] = u10*a0 + u11*a1
	}
}

// ApplyUCRY applies a uniformly controlled RY in one pass: where the
// controls (least significant first) read j, RY(angles[j]) acts on target.
// It panics if len(angles) != 1 << len(controls) or a qubit is out of range.
func (s *State) ApplyUCRY(target int, controls []int, angles []float64) {
	if len(angles) != 1<<len(controls) {
		panic(fmt.Sprintf("sim: %d angles for %d controls", len(angles), len(controls)))
	}
	applyUCRY(s.Amp, target, controls, angles)
}

// applyUCRY is the one-pass multiplexed rotation. The control value of
// every pair is gathered bit by bit; cos and sin are computed once per angle.
func applyUCRY(amp []complex128, target int, controls []int, angles []float64) {
	cs := make([]float64, 2*len(angles))
	for j, a := range angles {
		cs[2*j], cs[2*j+1] = math.Cos(a/2), math.Sin(a/2)
	}
	tm := 1 << target
	n := len(amp) >> 1
	for k := 0; k < n; k++ {
		i := insertZero(k, target)
		j := 0
		for b, q := range controls {
			j |= (i >> q & 1) << b
		}
		c, sn := cs[2*j], cs[2*j+1]
		a0, a1 := amp[i], amp[i|tm]
		amp[i] = complex(c*real(a0)-sn*real(a1), c*imag(a0)-sn*imag(a1))
		amp[i|tm] = complex(sn*real(a0)+c*real(a1), sn*imag(a0)+c*imag(a1))
	}
}

// ApplyOp applies one operation of a circuit; Measure is ignored (every
// measurement is deferred to the end). It panics on an invalid op; run
// Circuit.Validate first.
func (s *State) ApplyOp(op circuit.Op) {
	switch op.Gate {
	case circuit.Measure:
	case circuit.CNOT:
		s.ApplyCNOT(op.Controls[0], op.Target)
	case circuit.CZ:
		s.ApplyCZ(op.Controls[0], op.Target)
	case circuit.SWAP:
		s.ApplySWAP(op.Controls[0], op.Target)
	case circuit.UCRY:
		s.ApplyUCRY(op.Target, op.Controls, op.Angles)
	default:
		u, err := GateMatrix(op.Gate, op.Angle)
		if err != nil {
			panic(err)
		}
		s.Apply1(op.Target, u)
	}
}

// Norm2 returns the squared norm sum |Amp[b]|^2.
func (s *State) Norm2() float64 {
	t := 0.0
	for _, a := range s.Amp {
		t += real(a)*real(a) + imag(a)*imag(a)
	}
	return t
}

// prob1 returns the probability that qubit q reads 1.
func (s *State) prob1(q int) float64 {
	st := 1 << q
	p := 0.0
	for b := st; b < len(s.Amp); b += 2 * st {
		for _, a := range s.Amp[b : b+st] {
			p += real(a)*real(a) + imag(a)*imag(a)
		}
	}
	return p
}
