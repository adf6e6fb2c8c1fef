package sim

import (
	"fmt"
	"math/cmplx"

	"fringe/qkernel/circuit"
)

// Density is a mixed state of N qubits: Rho[r<<N | c] is the entry
// <r|rho|c>, with basis indices ordered as in State. Viewed as a vector of
// 2N qubits, the column index occupies bits 0..N-1 and the row index bits
// N..2N-1, so U rho U^dagger applies U to "qubit" N+q and conj(U) to "qubit" q.
type Density struct {
	N   int
	Rho []complex128
}

// NewDensity returns |0...0><0...0| on n qubits. It errors if n is outside
// [1, MaxDensityQubits].
func NewDensity(n int) (*Density, error) {
	if n < 1 || n > MaxDensityQubits {
		return nil, fmt.Errorf("sim: %d qubits outside the density-matrix range [1,%d]", n, MaxDensityQubits)
	}
	d := &Density{N: n, Rho: make([]complex128, 1<<(2*n))}
	d.Rho[0] = 1
	return d, nil
}

// At returns the entry <r|rho|c>.
func (d *Density) At(r, c int) complex128 { return d.Rho[r<<d.N|c] }

// Trace returns the trace of rho.
func (d *Density) Trace() complex128 {
	var t complex128
	D := 1 << d.N
	for b := 0; b < D; b++ {
		t += d.Rho[b*D+b]
	}
	return t
}

func (d *Density) check(qs ...int) {
	for i, q := range qs {
		if q < 0 || q >= d.N {
			panic(fmt.Sprintf("sim: qubit %d outside [0,%d)", q, d.N))
		}
		for _, r := range qs[:i] {
			if q == r {
				panic(fmt.Sprintf("sim: qubit %d repeated", q))
			}
		}
	}
}

// Superop is a single-qubit channel as a 4x4 matrix acting on the vector
// (rho00, rho01, rho10, rho11) of a 2x2 block: entry [2r+c][2r'+c'] is the
// weight of rho[r',c'] in rho'[r,c].
type Superop [4][4]complex128

// KrausSuperop returns the superoperator of the channel
// rho -> sum_K K rho K^dagger: S[2r+c][2r'+c'] = sum_K K[r][r'] conj(K[c][c']).
func KrausSuperop(ks []Matrix) Superop {
	var s Superop
	for _, k := range ks {
		for r := range 2 {
			for c := range 2 {
				for rp := range 2 {
					for cp := range 2 {
						s[2*r+c][2*rp+cp] += k[r][rp] * cmplx.Conj(k[c][cp])
					}
				}
			}
		}
	}
	return s
}

// Then returns the superoperator of applying s first and t second (t·s).
func (s Superop) Then(t Superop) Superop {
	var out Superop
	for i := range 4 {
		for j := range 4 {
			var v complex128
			for k := range 4 {
				v += t[i][k] * s[k][j]
			}
			out[i][j] = v
		}
	}
	return out
}

// ApplySuperop1 applies a single-qubit superoperator to qubit q in one pass.
// Real superoperators (every channel here and every real gate) use real
// arithmetic. It panics if q is out of range.
func (d *Density) ApplySuperop1(q int, s Superop) {
	d.check(q)
	D := 1 << d.N
	cm := 1 << q
	real4 := true
	var r [4][4]float64
	for i := range 4 {
		for j := range 4 {
			if imag(s[i][j]) != 0 { // exact: selects the real kernel
				real4 = false
			}
			r[i][j] = real(s[i][j])
		}
	}
	// Rows come in pairs (row, row | 1<<q); within the two rows the columns
	// come in runs of cm with column bit q clear followed by cm with it set.
	for row := 0; row < D; row++ {
		if row&cm != 0 {
			continue
		}
		row0 := d.Rho[row*D : row*D+D : row*D+D]
		row1 := d.Rho[(row|cm)*D : (row|cm)*D+D : (row|cm)*D+D]
		for b := 0; b < D; b += 2 * cm {
			lo0 := row0[b : b+cm : b+cm]
			hi0 := row0[b+cm : b+2*cm : b+2*cm]
			lo1 := row1[b : b+cm : b+cm]
			hi1 := row1[b+cm : b+2*cm : b+2*cm]
			hi0, lo1, hi1 = hi0[:len(lo0)], lo1[:len(lo0)], hi1[:len(lo0)]
			if real4 {
				superReal(lo0, hi0, lo1, hi1, &r)
			} else {
				superComplex(lo0, hi0, lo1, hi1, &s)
			}
		}
	}
}

func superReal(lo0, hi0, lo1, hi1 []complex128, s *[4][4]float64) {
	hi0, lo1, hi1 = hi0[:len(lo0)], lo1[:len(lo0)], hi1[:len(lo0)]
	for j, v0 := range lo0 {
		v1, v2, v3 := hi0[j], lo1[j], hi1[j]
		r0, r1, r2, r3 := real(v0), real(v1), real(v2), real(v3)
		i0, i1, i2, i3 := imag(v0), imag(v1), imag(v2), imag(v3)
		lo0[j] = complex(s[0][0]*r0+s[0][1]*r1+s[0][2]*r2+s[0][3]*r3, s[0][0]*i0+s[0][1]*i1+s[0][2]*i2+s[0][3]*i3)
		hi0[j] = complex(s[1][0]*r0+s[1][1]*r1+s[1][2]*r2+s[1][3]*r3, s[1][0]*i0+s[1][1]*i1+s[1][2]*i2+s[1][3]*i3)
		lo1[j] = complex(s[2][0]*r0+s[2][1]*r1+s[2][2]*r2+s[2][3]*r3, s[2][0]*i0+s[2][1]*i1+s[2][2]*i2+s[2][3]*i3)
		hi1[j] = complex(s[3][0]*r0+s[3][1]*r1+s[3][2]*r2+s[3][3]*r3, s[3][0]*i0+s[3][1]*i1+s[3][2]*i2+s[3][3]*i3)
	}
}

func superComplex(lo0, hi0, lo1, hi1 []complex128, s *Superop) {
	hi0, lo1, hi1 = hi0[:len(lo0)], lo1[:len(lo0)], hi1[:len(lo0)]
	for j, v0 := range lo0 {
		v1, v2, v3 := hi0[j], lo1[j], hi1[j]
		lo0[j] = s[0][0]*v0 + s[0][1]*v1 + s[0][2]*v2 + s[0][3]*v3
		hi0[j] = s[1][0]*v0 + s[1][1]*v1 + s[1][2]*v2 + s[1][3]*v3
		lo1[j] = s[2][0]*v0 + s[2][1]*v1 + s[2][2]*v2 + s[2][3]*v3
		hi1[j] = s[3][0]*v0 + s[3][1]*v1 + s[3][2]*v2 + s[3][3]*v3
	}
}

// Apply1 applies rho -> U rho U^dagger for a single-qubit matrix on qubit q.
func (d *Density) Apply1(q int, u Matrix) {
	d.check(q)
	var uc Matrix
	for r := range 2 {
		for c := range 2 {
			uc[r][c] = cmplx.Conj(u[r][c])
		}
	}
	if u.isReal() {
		apply1Real(d.Rho, d.N+q, real(u[0][0]), real(u[0][1]), real(u[1][0]), real(u[1][1]))
		apply1Real(d.Rho, q, real(u[0][0]), real(u[0][1]), real(u[1][0]), real(u[1][1]))
		return
	}
	apply1(d.Rho, d.N+q, &u)
	apply1(d.Rho, q, &uc)
}

// ApplyCNOT applies CNOT (control c, target t) to rows and columns.
func (d *Density) ApplyCNOT(c, t int) {
	d.check(c, t)
	d.block2(c, t, true, 0)
}

// applyCNOTDepolarize2 is ApplyCNOT followed by Depolarize2(c, t, p), in one pass.
func (d *Density) applyCNOTDepolarize2(c, t int, p float64) {
	d.check(c, t)
	d.block2(c, t, true, p)
}

// ApplyUCRY applies a uniformly controlled RY (see State.ApplyUCRY) to rows
// and columns; RY is real, so the column pass uses the same angles.
func (d *Density) ApplyUCRY(target int, controls []int, angles []float64) {
	d.check(append([]int{target}, controls...)...)
	if len(angles) != 1<<len(controls) {
		panic(fmt.Sprintf("sim: %d angles for %d controls", len(angles), len(controls)))
	}
	rc := make([]int, len(controls))
	for i, q := range controls {
		rc[i] = q + d.N
	}
	applyUCRY(d.Rho, target+d.N, rc, angles)
	applyUCRY(d.Rho, target, controls, angles)
}

// ApplyOp applies one noiseless operation; Measure is ignored (deferred).
// It panics on an invalid op; run Circuit.Validate first.
func (d *Density) ApplyOp(op circuit.Op) {
	switch op.Gate {
	case circuit.Measure:
	case circuit.CNOT:
		d.ApplyCNOT(op.Controls[0], op.Target)
	case circuit.CZ:
		d.ApplyCZ(op.Controls[0], op.Target)
	case circuit.SWAP:
		d.ApplySWAP(op.Controls[0], op.Target)
	case circuit.UCRY:
		d.ApplyUCRY(op.Target, op.Controls, op.Angles)
	default:
		u, err := GateMatrix(op.Gate, op.Angle)
		if err != nil {
			panic(err)
		}
		d.Apply1(op.Target, u)
	}
}

// ApplyKraus1 applies rho -> sum_K K rho K^dagger on qubit q.
func (d *Density) ApplyKraus1(q int, ks []Matrix) { d.ApplySuperop1(q, KrausSuperop(ks)) }

// Depolarize1 applies the single-qubit depolarizing channel
// rho -> (1-p) rho + p (I/2) ⊗ Tr_q rho to qubit q.
func (d *Density) Depolarize1(q int, p float64) { d.ApplySuperop1(q, DepolarizingSuperop(p)) }

// AmplitudeDamp applies amplitude damping with parameter gamma to qubit q.
func (d *Density) AmplitudeDamp(q int, gamma float64) {
	d.ApplySuperop1(q, AmplitudeDampingSuperop(gamma))
}

// PhaseDamp applies phase damping with parameter lambda to qubit q.
func (d *Density) PhaseDamp(q int, lambda float64) {
	d.ApplySuperop1(q, PhaseDampingSuperop(lambda))
}

// Depolarize2 applies the two-qubit depolarizing channel
// rho -> (1-p) rho + p (I/4) ⊗ Tr_{q1 q2} rho to qubits q1 and q2.
func (d *Density) Depolarize2(q1, q2 int, p float64) {
	d.check(q1, q2)
	d.block2(q1, q2, false, p)
}

// block2 visits every 4x4 block of entries whose rows and columns differ
// only in bits q1 and q2, optionally permutes it by CNOT (control q1,
// target q2) on rows and columns, then applies the two-qubit depolarizing
// channel of strength p (p = 0: none). One pass over rho.
func (d *Density) block2(q1, q2 int, cnot bool, p float64) {
	D := 1 << d.N
	m1, m2 := 1<<q1, 1<<q2
	mask := m1 | m2
	keep, mix := 1-p, p/4
	scale := func(v complex128) complex128 { return complex(keep*real(v), keep*imag(v)) }
	for r := 0; r < D; r++ {
		if r&mask != 0 {
			continue
		}
		// Rows ab = 0, 1, 2, 3 (bit 0 = q1, bit 1 = q2).
		r0 := d.Rho[r*D : r*D+D : r*D+D]
		r1 := d.Rho[(r|m1)*D : (r|m1)*D+D : (r|m1)*D+D]
		r2 := d.Rho[(r|m2)*D : (r|m2)*D+D : (r|m2)*D+D]
		r3 := d.Rho[(r|mask)*D : (r|mask)*D+D : (r|mask)*D+D]
		r1, r2, r3 = r1[:len(r0)], r2[:len(r0)], r3[:len(r0)]
		for c0 := 0; c0 < D; c0++ {
			if c0&mask != 0 {
				continue
			}
			c1, c2, c3 := c0|m1, c0|m2, c0|mask
			if c3 >= len(r0) {
				panic("sim: internal index error") // unreachable; lets the compiler drop bounds checks
			}
			if cnot {
				// CNOT q1 -> q2 swaps local states 1 and 3 (q1 set, q2 flipped)
				// on rows and on columns: new[ab][cd] = old[perm ab][perm cd].
				r1[c0], r3[c0] = r3[c0], r1[c0]
				r1[c2], r3[c2] = r3[c2], r1[c2]
				r1[c1], r3[c3] = r3[c3], r1[c1]
				r1[c3], r3[c1] = r3[c1], r1[c3]
				r0[c1], r0[c3] = r0[c3], r0[c1]
				r2[c1], r2[c3] = r2[c3], r2[c1]
			}
			if p == 0 {
				continue
			}
			tr := r0[c0] + r1[c1] + r2[c2] + r3[c3]
			add := complex(mix*real(tr), mix*imag(tr))
			r0[c0], r0[c1], r0[c2], r0[c3] = scale(r0[c0])+add, scale(r0[c1]), scale(r0[c2]), scale(r0[c3])
			r1[c0], r1[c1], r1[c2], r1[c3] = scale(r1[c0]), scale(r1[c1])+add, scale(r1[c2]), scale(r1[c3])
			r2[c0], r2[c1], r2[c2], r2[c3] = scale(r2[c0]), scale(r2[c1]), scale(r2[c2])+add, scale(r2[c3])
			r3[c0], r3[c1], r3[c2], r3[c3] = scale(r3[c0]), scale(r3[c1]), scale(r3[c2]), scale(r3[c3])+add
		}
	}
}

// DepolarizeAll applies the global depolarizing channel
// rho -> (1-p) rho + p I / 2^N.
func (d *Density) DepolarizeAll(p float64) {
	keep := complex(1-p, 0)
	tr := d.Trace()
	D := 1 << d.N
	for i := range d.Rho {
		d.Rho[i] *= keep
	}
	add := complex(p, 0) * tr / complex(float64(D), 0)
	for b := 0; b < D; b++ {
		d.Rho[b*D+b] += add
	}
}

// Diag returns the diagonal of rho (the basis-state probabilities).
func (d *Density) Diag() []float64 {
	D := 1 << d.N
	out := make([]float64, D)
	for b := range out {
		out[b] = real(d.Rho[b*D+b])
	}
	return out
}
