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
	r, real4 := realSuperop(&s)
	pc := real4 && phaseCovariant(&r)
	// Rows come in pairs (row, row | 1<<q); within the two rows the columns
	// come in runs of cm with column bit q clear followed by cm with it set.
	for row := 0; row < D; row++ {
		if row&cm != 0 {
			continue
		}
		row0 := d.Rho[row*D : row*D+D : row*D+D]
		row1 := d.Rho[(row|cm)*D : (row|cm)*D+D : (row|cm)*D+D]
		switch {
		case pc:
			superPCRows(row0, row1, cm, &r)
		case real4:
			superRealRows(row0, row1, cm, &r)
		default:
			superComplexRows(row0, row1, cm, &s)
		}
	}
}

// phaseCovariant reports whether the real superoperator s maps populations
// to populations and scales each coherence (only the entries [0][0],
// [0][3], [3][0], [3][3], [1][1] and [2][2] are non-zero), as depolarizing,
// amplitude and phase damping and their products do.
func phaseCovariant(s *[4][4]float64) bool {
	for i := range 4 {
		for j := range 4 {
			pop := (i == 0 || i == 3) && (j == 0 || j == 3)
			if !pop && i != j && s[i][j] != 0 { // exact: a structural zero
				return false
			}
		}
	}
	return true
}

// superPCRows is superRealRows for a phase-covariant s: it skips the
// products with the structural zeros, which changes no non-zero result
// (x + 0*y = x exactly), so it agrees with superRealRows to the last bit
// up to the sign of exact zeros.
func superPCRows(row0, row1 []complex128, cm int, s *[4][4]float64) {
	row1 = row1[:len(row0)]
	a, b, e, f, g, h := s[0][0], s[0][3], s[1][1], s[2][2], s[3][0], s[3][3]
	if cm >= 4 {
		for blk := 0; blk < len(row0); blk += 2 * cm {
			lo0 := row0[blk : blk+cm : blk+cm]
			hi0 := row0[blk+cm : blk+2*cm : blk+2*cm]
			lo1 := row1[blk : blk+cm : blk+cm]
			hi1 := row1[blk+cm : blk+2*cm : blk+2*cm]
			hi0, lo1, hi1 = hi0[:len(lo0)], lo1[:len(lo0)], hi1[:len(lo0)]
			for j, v0 := range lo0 {
				v1, v2, v3 := hi0[j], lo1[j], hi1[j]
				lo0[j] = complex(a*real(v0)+b*real(v3), a*imag(v0)+b*imag(v3))
				hi0[j] = complex(e*real(v1), e*imag(v1))
				lo1[j] = complex(f*real(v2), f*imag(v2))
				hi1[j] = complex(g*real(v0)+h*real(v3), g*imag(v0)+h*imag(v3))
			}
		}
		return
	}
	for c := 0; c+cm < len(row0); c = (c | cm + 1) &^ cm {
		v0, v1, v2, v3 := row0[c], row0[c+cm], row1[c], row1[c+cm]
		row0[c] = complex(a*real(v0)+b*real(v3), a*imag(v0)+b*imag(v3))
		row0[c+cm] = complex(e*real(v1), e*imag(v1))
		row1[c] = complex(f*real(v2), f*imag(v2))
		row1[c+cm] = complex(g*real(v0)+h*real(v3), g*imag(v0)+h*imag(v3))
	}
}

// realSuperop returns the real parts of s and whether s is real.
func realSuperop(s *Superop) ([4][4]float64, bool) {
	var r [4][4]float64
	real4 := true
	for i := range 4 {
		for j := range 4 {
			if imag(s[i][j]) != 0 { // exact: selects the real kernel
				real4 = false
			}
			r[i][j] = real(s[i][j])
		}
	}
	return r, real4
}

// superRealRows applies the real superoperator s to the row pair (row0,
// row1) = rows with bit q clear and set, whose columns pair up cm = 1<<q
// apart. The arithmetic of every entry is that of superReal; short runs
// (cm < 4) are walked with one index instead of sub-slices, which costs a
// few cycles per run.
func superRealRows(row0, row1 []complex128, cm int, s *[4][4]float64) {
	row1 = row1[:len(row0)]
	if cm >= 4 {
		for b := 0; b < len(row0); b += 2 * cm {
			superReal(row0[b:b+cm:b+cm], row0[b+cm:b+2*cm:b+2*cm], row1[b:b+cm:b+cm], row1[b+cm:b+2*cm:b+2*cm], s)
		}
		return
	}
	for c := 0; c+cm < len(row0); c = (c | cm + 1) &^ cm {
		v0, v1, v2, v3 := row0[c], row0[c+cm], row1[c], row1[c+cm]
		r0, r1, r2, r3 := real(v0), real(v1), real(v2), real(v3)
		i0, i1, i2, i3 := imag(v0), imag(v1), imag(v2), imag(v3)
		row0[c] = complex(s[0][0]*r0+s[0][1]*r1+s[0][2]*r2+s[0][3]*r3, s[0][0]*i0+s[0][1]*i1+s[0][2]*i2+s[0][3]*i3)
		row0[c+cm] = complex(s[1][0]*r0+s[1][1]*r1+s[1][2]*r2+s[1][3]*r3, s[1][0]*i0+s[1][1]*i1+s[1][2]*i2+s[1][3]*i3)
		row1[c] = complex(s[2][0]*r0+s[2][1]*r1+s[2][2]*r2+s[2][3]*r3, s[2][0]*i0+s[2][1]*i1+s[2][2]*i2+s[2][3]*i3)
		row1[c+cm] = complex(s[3][0]*r0+s[3][1]*r1+s[3][2]*r2+s[3][3]*r3, s[3][0]*i0+s[3][1]*i1+s[3][2]*i2+s[3][3]*i3)
	}
}

// superComplexRows is superRealRows for a complex superoperator.
func superComplexRows(row0, row1 []complex128, cm int, sp *Superop) {
	row1 = row1[:len(row0)]
	if cm >= 4 {
		for b := 0; b < len(row0); b += 2 * cm {
			superComplex(row0[b:b+cm:b+cm], row0[b+cm:b+2*cm:b+2*cm], row1[b:b+cm:b+cm], row1[b+cm:b+2*cm:b+2*cm], sp)
		}
		return
	}
	// The entries of the superoperator as locals: a store to the rows
	// cannot change them, so they are not loaded again for every column
	// (the same arithmetic).
	s00, s01, s02, s03 := sp[0][0], sp[0][1], sp[0][2], sp[0][3]
	s10, s11, s12, s13 := sp[1][0], sp[1][1], sp[1][2], sp[1][3]
	s20, s21, s22, s23 := sp[2][0], sp[2][1], sp[2][2], sp[2][3]
	s30, s31, s32, s33 := sp[3][0], sp[3][1], sp[3][2], sp[3][3]
	for c := 0; c+cm < len(row0); c = (c | cm + 1) &^ cm {
		v0, v1, v2, v3 := row0[c], row0[c+cm], row1[c], row1[c+cm]
		row0[c] = s00*v0 + s01*v1 + s02*v2 + s03*v3
		row0[c+cm] = s10*v0 + s11*v1 + s12*v2 + s13*v3
		row1[c] = s20*v0 + s21*v1 + s22*v2 + s23*v3
		row1[c+cm] = s30*v0 + s31*v1 + s32*v2 + s33*v3
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

func superComplex(lo0, hi0, lo1, hi1 []complex128, sp *Superop) {
	hi0, lo1, hi1 = hi0[:len(lo0)], lo1[:len(lo0)], hi1[:len(lo0)]
	s00, s01, s02, s03 := sp[0][0], sp[0][1], sp[0][2], sp[0][3] // locals, as in superComplexRows
	s10, s11, s12, s13 := sp[1][0], sp[1][1], sp[1][2], sp[1][3]
	s20, s21, s22, s23 := sp[2][0], sp[2][1], sp[2][2], sp[2][3]
	s30, s31, s32, s33 := sp[3][0], sp[3][1], sp[3][2], sp[3][3]
	for j, v0 := range lo0 {
		v1, v2, v3 := hi0[j], lo1[j], hi1[j]
		lo0[j] = s00*v0 + s01*v1 + s02*v2 + s03*v3
		hi0[j] = s10*v0 + s11*v1 + s12*v2 + s13*v3
		lo1[j] = s20*v0 + s21*v1 + s22*v2 + s23*v3
		hi1[j] = s30*v0 + s31*v1 + s32*v2 + s33*v3
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
	d.block2(c, t, true, 0, nil)
}

// applyCNOTNoise is ApplyCNOT followed by Depolarize2(c, t, p) and, when
// damp is not nil, ApplySuperop1 of damp on c and then on t, in one pass
// (same result to the last bit).
func (d *Density) applyCNOTNoise(c, t int, p float64, damp *[4][4]float64) {
	d.check(c, t)
	d.block2(c, t, true, p, damp)
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
	d.block2(q1, q2, false, p, nil)
}

// block2 visits every 4x4 block of entries whose rows and columns differ
// only in bits q1 and q2, optionally permutes it by CNOT (control q1,
// target q2) on rows and columns, then applies the two-qubit depolarizing
// channel of strength p (p = 0: none) and, when damp is not nil, the
// single-qubit superoperator damp to q1 and then to q2. One pass over rho:
// the four rows of a block (rows r, r|1<<q1, r|1<<q2, r|both) are finished
// before the next four, so the damping sub-passes find them in cache. Every
// entry gets the arithmetic of the separate passes block2, ApplySuperop1(q1,
// damp), ApplySuperop1(q2, damp), in that order, so the result is the same
// to the last bit.
func (d *Density) block2(q1, q2 int, cnot bool, p float64, damp *[4][4]float64) {
	D := 1 << d.N
	m1, m2 := 1<<q1, 1<<q2
	mask := m1 | m2
	var tr []complex128 // block traces of quadSplit
	if min(m1, m2) >= 256 && p != 0 {
		tr = make([]complex128, D/4)
	}
	rows := superRealRows
	if damp != nil && phaseCovariant(damp) {
		rows = superPCRows
	}
	for r := 0; r < D; r++ {
		if r&mask != 0 {
			continue
		}
		// Rows ab = 0, 1, 2, 3 (bit 0 = q1, bit 1 = q2).
		r0 := d.Rho[r*D : r*D+D : r*D+D]
		r1 := d.Rho[(r|m1)*D : (r|m1)*D+D : (r|m1)*D+D]
		r2 := d.Rho[(r|m2)*D : (r|m2)*D+D : (r|m2)*D+D]
		r3 := d.Rho[(r|mask)*D : (r|mask)*D+D : (r|mask)*D+D]
		quad(r0, r1, r2, r3, m1, m2, cnot, p, tr)
		if damp != nil {
			rows(r0, r1, m1, damp)
			rows(r2, r3, m1, damp)
			rows(r0, r2, m2, damp)
			rows(r1, r3, m2, damp)
		}
	}
}

// quad applies CNOT (when cnot) and two-qubit depolarizing of strength p to
// the blocks of the rows r0..r3 (local states 0..3 of bits q1, q2), columns
// c0, c0|m1, c0|m2, c0|m1|m2 for every c0 with both bits clear. CNOT q1 -> q2
// swaps local states 1 and 3 on rows and on columns,
// new[ab][cd] = old[perm ab][perm cd]; the depolarizing channel then gives
// new[ab][cd] = (1-p) new[ab][cd] + (p/4) tr [ab = cd], with tr the sum of
// the four diagonal entries new[00][00] + new[11][11] + new[22][22] +
// new[33][33] of the block (in that order). The permutation is folded into
// the loads.
//
// When both bits are 8 or above, the 16 entries of a block lie 4 KiB apart
// (or a multiple), all in one set of the first-level cache, which holds
// fewer lines than that; quadSplit then works in sub-passes of at most 8
// streams with the same arithmetic.
func quad(r0, r1, r2, r3 []complex128, m1, m2 int, cnot bool, p float64, tr []complex128) {
	mask := m1 | m2
	n := len(r0)
	r1, r2, r3 = r1[:n], r2[:n], r3[:n]
	if p == 0 {
		if !cnot {
			return
		}
		for c0 := 0; c0 < n; c0 = (c0 | mask + 1) &^ mask {
			c1, c2, c3 := c0|m1, c0|m2, c0|mask
			if c3 >= n {
				panic("sim: internal index error") // unreachable; lets the compiler drop bounds checks
			}
			r1[c0], r3[c0] = r3[c0], r1[c0]
			r1[c2], r3[c2] = r3[c2], r1[c2]
			r1[c1], r3[c3] = r3[c3], r1[c1]
			r1[c3], r3[c1] = r3[c1], r1[c3]
			r0[c1], r0[c3] = r0[c3], r0[c1]
			r2[c1], r2[c3] = r2[c3], r2[c1]
		}
		return
	}
	if min(m1, m2) >= 256 {
		quadSplit(r0, r1, r2, r3, m1, m2, cnot, p, tr)
		return
	}
	keep, mix := 1-p, p/4
	// s1, s3 are the source rows of local rows 1 and 3; the source column
	// of local column 1 is c0|p1 and of local column 3 is c0|p3.
	s1, s3 := r1, r3
	p1, p3 := m1, mask
	if cnot {
		s1, s3 = r3, r1
		p1, p3 = mask, m1
	}
	for c0 := 0; c0 < n; c0 = (c0 | mask + 1) &^ mask {
		c1, c2, c3 := c0|p1, c0|m2, c0|p3
		if c0|mask >= n {
			panic("sim: internal index error") // unreachable; lets the compiler drop bounds checks
		}
		v00, v01, v02, v03 := r0[c0], r0[c1], r0[c2], r0[c3]
		v10, v11, v12, v13 := s1[c0], s1[c1], s1[c2], s1[c3]
		v20, v21, v22, v23 := r2[c0], r2[c1], r2[c2], r2[c3]
		v30, v31, v32, v33 := s3[c0], s3[c1], s3[c2], s3[c3]
		t := v00 + v11 + v22 + v33
		ar, ai := mix*real(t), mix*imag(t)
		d1, d3 := c0|m1, c0|mask // destination columns of local columns 1 and 3
		r0[c0] = complex(keep*real(v00)+ar, keep*imag(v00)+ai)
		r0[d1] = complex(keep*real(v01), keep*imag(v01))
		r0[c2] = complex(keep*real(v02), keep*imag(v02))
		r0[d3] = complex(keep*real(v03), keep*imag(v03))
		r1[c0] = complex(keep*real(v10), keep*imag(v10))
		r1[d1] = complex(keep*real(v11)+ar, keep*imag(v11)+ai)
		r1[c2] = complex(keep*real(v12), keep*imag(v12))
		r1[d3] = complex(keep*real(v13), keep*imag(v13))
		r2[c0] = complex(keep*real(v20), keep*imag(v20))
		r2[d1] = complex(keep*real(v21), keep*imag(v21))
		r2[c2] = complex(keep*real(v22)+ar, keep*imag(v22)+ai)
		r2[d3] = complex(keep*real(v23), keep*imag(v23))
		r3[c0] = complex(keep*real(v30), keep*imag(v30))
		r3[d1] = complex(keep*real(v31), keep*imag(v31))
		r3[c2] = complex(keep*real(v32), keep*imag(v32))
		r3[d3] = complex(keep*real(v33)+ar, keep*imag(v33)+ai)
	}
}

// quadSplit is quad for two high bits: a first sub-pass sums the diagonal
// entries of every block into tr (len >= n/4), then each destination row is
// written from its source row (rows 0 and 2 in place, rows 1 and 3
// together, which CNOT exchanges). The arithmetic of every entry is that of
// quad.
func quadSplit(r0, r1, r2, r3 []complex128, m1, m2 int, cnot bool, p float64, tr []complex128) {
	mask := m1 | m2
	n := len(r0)
	keep, mix := 1-p, p/4
	s1, s3 := r1, r3
	p1, p3 := m1, mask
	if cnot {
		s1, s3 = r3, r1
		p1, p3 = mask, m1
	}
	k := 0
	for c0 := 0; c0 < n; c0 = (c0 | mask + 1) &^ mask {
		tr[k] = r0[c0] + s1[c0|p1] + r2[c0|m2] + s3[c0|p3]
		k++
	}
	// row writes dst[col b] = keep * src[source col b] (+ mix tr at the
	// diagonal column diag) for every block; it reads src before writing
	// dst, so dst may be src.
	row := func(dst, src []complex128, diag int) {
		k := 0
		for c0 := 0; c0 < n; c0 = (c0 | mask + 1) &^ mask {
			t := tr[k]
			k++
			ar, ai := mix*real(t), mix*imag(t)
			v0, v1, v2, v3 := src[c0], src[c0|p1], src[c0|m2], src[c0|p3]
			w := [4]complex128{
				complex(keep*real(v0), keep*imag(v0)), complex(keep*real(v1), keep*imag(v1)),
				complex(keep*real(v2), keep*imag(v2)), complex(keep*real(v3), keep*imag(v3)),
			}
			v := [4]complex128{v0, v1, v2, v3}[diag]
			w[diag] = complex(keep*real(v)+ar, keep*imag(v)+ai)
			dst[c0], dst[c0|m1], dst[c0|m2], dst[c0|mask] = w[0], w[1], w[2], w[3]
		}
	}
	row(r0, r0, 0)
	row(r2, r2, 2)
	if !cnot {
		row(r1, r1, 1)
		row(r3, r3, 3)
		return
	}
	// CNOT: row 1 comes from row 3 and row 3 from row 1, both at once.
	k = 0
	for c0 := 0; c0 < n; c0 = (c0 | mask + 1) &^ mask {
		t := tr[k]
		k++
		ar, ai := mix*real(t), mix*imag(t)
		a0, a1, a2, a3 := r3[c0], r3[c0|mask], r3[c0|m2], r3[c0|m1] // source of row 1
		b0, b1, b2, b3 := r1[c0], r1[c0|mask], r1[c0|m2], r1[c0|m1] // source of row 3
		r1[c0] = complex(keep*real(a0), keep*imag(a0))
		r1[c0|m1] = complex(keep*real(a1)+ar, keep*imag(a1)+ai)
		r1[c0|m2] = complex(keep*real(a2), keep*imag(a2))
		r1[c0|mask] = complex(keep*real(a3), keep*imag(a3))
		r3[c0] = complex(keep*real(b0), keep*imag(b0))
		r3[c0|m1] = complex(keep*real(b1), keep*imag(b1))
		r3[c0|m2] = complex(keep*real(b2), keep*imag(b2))
		r3[c0|mask] = complex(keep*real(b3)+ar, keep*imag(b3)+ai)
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
