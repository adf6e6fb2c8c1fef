package sim

import (
	"fmt"
	"math"

	"fringe/qkernel/circuit"
)

// deviceGateMatrix returns the matrices of the device-native single-qubit
// gates that GateMatrix also accepts:
//
//	SX    = (1/2) [[1+i, 1-i], [1-i, 1+i]]   (= exp(i pi/4) RX(pi/2); SX^2 = X)
//	RX(t) = [[cos t/2, -i sin t/2], [-i sin t/2, cos t/2]]
//
// (Nielsen & Chuang 2010, eq. (4.4) for RX; SX is the principal square
// root of X, common practice). It panics on another gate.
func deviceGateMatrix(g circuit.Gate, angle float64) Matrix {
	switch g {
	case circuit.SX:
		return Matrix{{(1 + 1i) / 2, (1 - 1i) / 2}, {(1 - 1i) / 2, (1 + 1i) / 2}}
	case circuit.RX:
		c, s := math.Cos(angle/2), math.Sin(angle/2)
		return Matrix{{complex(c, 0), complex(0, -s)}, {complex(0, -s), complex(c, 0)}}
	}
	panic(fmt.Sprintf("sim: %s is not a device single-qubit gate", g))
}

// ApplyCZ multiplies the amplitudes with qubits a and b both 1 by -1. It
// panics on out-of-range or equal qubits.
func (s *State) ApplyCZ(a, b int) {
	if a < 0 || a >= s.N || b < 0 || b >= s.N || a == b {
		panic(fmt.Sprintf("sim: cz %d, %d on %d qubits", a, b, s.N))
	}
	applyCZ(s.Amp, a, b)
}

func applyCZ(amp []complex128, a, b int) {
	lo, hi := min(a, b), max(a, b)
	m := 1<<a | 1<<b
	n := len(amp) >> 2
	for k := 0; k < n; k++ {
		i := insertZero(insertZero(k, lo), hi) | m
		amp[i] = -amp[i]
	}
}

// ApplySWAP exchanges qubits a and b (swaps the amplitudes of |a=1, b=0>
// and |a=0, b=1>). It panics on out-of-range or equal qubits.
func (s *State) ApplySWAP(a, b int) {
	if a < 0 || a >= s.N || b < 0 || b >= s.N || a == b {
		panic(fmt.Sprintf("sim: swap %d, %d on %d qubits", a, b, s.N))
	}
	applySWAP(s.Amp, a, b)
}

func applySWAP(amp []complex128, a, b int) {
	lo, hi := min(a, b), max(a, b)
	am, bm := 1<<a, 1<<b
	n := len(amp) >> 2
	for k := 0; k < n; k++ {
		i := insertZero(insertZero(k, lo), hi)
		amp[i|am], amp[i|bm] = amp[i|bm], amp[i|am]
	}
}

// ApplyCZ applies CZ on qubits a and b to rows and columns: the entry
// <r|rho|c> changes sign when exactly one of r and c has both bits set.
func (d *Density) ApplyCZ(a, b int) {
	d.check(a, b)
	applyCZ(d.Rho, d.N+a, d.N+b)
	applyCZ(d.Rho, a, b)
}

// ApplySWAP applies SWAP on qubits a and b to rows and columns.
func (d *Density) ApplySWAP(a, b int) {
	d.check(a, b)
	applySWAP(d.Rho, d.N+a, d.N+b)
	applySWAP(d.Rho, a, b)
}
