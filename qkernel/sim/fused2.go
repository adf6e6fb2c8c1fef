package sim

import "fringe/qkernel/circuit"

// rowKernel applies a single-qubit superoperator to a row pair with the
// kernel ApplySuperop1 chooses for it (phase-covariant real, real or
// complex), chosen once per superoperator, so that every entry gets
// ApplySuperop1's arithmetic.
type rowKernel struct {
	s    *Superop
	r    [4][4]float64
	kind int // 0 phase-covariant real, 1 real, 2 complex
}

func newRowKernel(s *Superop) *rowKernel {
	if s == nil {
		return nil
	}
	k := &rowKernel{s: s, kind: 2}
	var real4 bool
	k.r, real4 = realSuperop(s)
	switch {
	case real4 && phaseCovariant(&k.r):
		k.kind = 0
	case real4:
		k.kind = 1
	}
	return k
}

func (k *rowKernel) rows(row0, row1 []complex128, cm int) {
	switch k.kind {
	case 0:
		superPCRows(row0, row1, cm, &k.r)
	case 1:
		superRealRows(row0, row1, cm, &k.r)
	default:
		superComplexRows(row0, row1, cm, k.s)
	}
}

// fusedGate2 applies, in one pass over rho, the single-qubit
// superoperators preT to qubit t and then preC to qubit c (nil: none),
// the two-qubit gate g (circuit.CNOT with control c and target t, or
// circuit.CZ) and the two-qubit depolarizing channel of strength p. It
// visits the blocks of four rows whose indices differ only in bits t and
// c, as block2 does; each superoperator mixes rows within a block only,
// so every entry gets exactly the arithmetic of the separate passes
// ApplySuperop1(t, preT), ApplySuperop1(c, preC) and then
// applyCNOTNoise(c, t, p, nil) for CNOT, or ApplyCZ(c, t) and
// Depolarize2(t, c, p) for CZ: the result is the same to the last bit
// (tested). The calibrated device simulation pays one pass per two-qubit
// gate instead of three.
func (d *Density) fusedGate2(t, c int, preT, preC *Superop, g circuit.Gate, p float64) {
	d.check(t, c)
	cnot := g == circuit.CNOT
	if !cnot && g != circuit.CZ {
		panic("sim: fusedGate2 of " + g.String()) // callers pass CNOT or CZ
	}
	// The bit order of block2's callers: (control, target) for CNOT,
	// (target, control) for Depolarize2 after CZ.
	b1, b2 := c, t
	if !cnot {
		b1, b2 = t, c
	}
	D := 1 << d.N
	m1, m2 := 1<<b1, 1<<b2
	mt, mc := 1<<t, 1<<c
	mask := m1 | m2
	var tr []complex128
	if min(m1, m2) >= 256 && p != 0 {
		tr = make([]complex128, D/4)
	}
	kt, kc := newRowKernel(preT), newRowKernel(preC)
	for r := 0; r < D; r++ {
		if r&mask != 0 {
			continue
		}
		rows := [4][]complex128{} // local states 0..3: bit 0 = b1, bit 1 = b2
		for ab, off := range [4]int{0, m1, m2, mask} {
			rows[ab] = d.Rho[(r|off)*D : (r|off)*D+D : (r|off)*D+D]
		}
		// The row pairs of the local states (r, r|m) for m = m1 and m2.
		if kt != nil {
			if mt == m1 {
				kt.rows(rows[0], rows[1], mt)
				kt.rows(rows[2], rows[3], mt)
			} else {
				kt.rows(rows[0], rows[2], mt)
				kt.rows(rows[1], rows[3], mt)
			}
		}
		if kc != nil {
			if mc == m1 {
				kc.rows(rows[0], rows[1], mc)
				kc.rows(rows[2], rows[3], mc)
			} else {
				kc.rows(rows[0], rows[2], mc)
				kc.rows(rows[1], rows[3], mc)
			}
		}
		if !cnot {
			// CZ: (-1) on the entries whose row or column (not both) has
			// both bits set; exact.
			r3 := rows[3]
			for c0 := 0; c0 < D; c0 = (c0 | mask + 1) &^ mask {
				c3 := c0 | mask
				rows[0][c3], rows[1][c3], rows[2][c3] = -rows[0][c3], -rows[1][c3], -rows[2][c3]
				r3[c0], r3[c0|m1], r3[c0|m2] = -r3[c0], -r3[c0|m1], -r3[c0|m2]
			}
		}
		quad(rows[0], rows[1], rows[2], rows[3], m1, m2, cnot, p, tr)
	}
}
