package sim

import (
	"fmt"
	"math"
)

// RelaxationParams returns the amplitude-damping gamma and phase-damping
// lambda whose composition is thermal relaxation of a qubit for a time t
// with relaxation time T1 and dephasing time T2 (any one unit of time):
//
//	gamma  = 1 - exp(-t/T1)
//	lambda = 1 - exp(-2 t/T_phi),  1/T_phi = 1/T2 - 1/(2 T1)
//
// Amplitude damping (Nielsen & Chuang 2010, section 8.3.5) moves a fraction
// gamma of the |1> population to |0> and scales the coherences by
// sqrt(1-gamma) = exp(-t/(2 T1)); phase damping (section 8.3.6) scales them
// by sqrt(1-lambda) = exp(-t/T_phi). Together the populations relax as
// exp(-t/T1) and the coherences as exp(-t/T2): the standard relation
// 1/T2 = 1/(2 T1) + 1/T_phi between the relaxation time, the dephasing time
// and the pure-dephasing time (common practice; N&C section 8.3 relates
// the two damping channels to T1 and T2), which needs T2 <= 2 T1. T1 or T2
// may be +Inf (no relaxation of that kind).
//
// Errors: t < 0, T1 or T2 not positive, NaN, or T2 > 2 T1 (beyond a
// relative 1e-12, the rounding of a user's T2 = 2 T1).
func RelaxationParams(t, T1, T2 float64) (gamma, lambda float64, err error) {
	switch {
	case math.IsNaN(t) || t < 0 || math.IsInf(t, 0):
		return 0, 0, fmt.Errorf("sim: relaxation time span %v, want finite and non-negative", t)
	case math.IsNaN(T1) || T1 <= 0:
		return 0, 0, fmt.Errorf("sim: T1 = %v, want positive", T1)
	case math.IsNaN(T2) || T2 <= 0:
		return 0, 0, fmt.Errorf("sim: T2 = %v, want positive", T2)
	case T2 > 2*T1*(1+1e-12):
		return 0, 0, fmt.Errorf("sim: T2 = %v exceeds 2 T1 = %v", T2, 2*T1)
	}
	gamma = -math.Expm1(-t / T1)
	rate := 1/T2 - 1/(2*T1) // 1/T_phi
	if rate < 0 {
		rate = 0 // T2 = 2 T1 up to rounding: no pure dephasing
	}
	lambda = -math.Expm1(-2 * t * rate)
	return gamma, lambda, nil
}

// ThermalRelaxationKraus returns Kraus operators of thermal relaxation over
// a time t (see RelaxationParams): phase damping after amplitude damping,
// whose products are (the fourth, P1 A1, is zero)
//
//	K0 = [[1, 0], [0, sqrt((1-gamma)(1-lambda))]]
//	K1 = [[0, sqrt(gamma)], [0, 0]]
//	K2 = [[0, 0], [0, sqrt((1-gamma) lambda)]]
//
// so that rho11 -> exp(-t/T1) rho11 and rho01 -> exp(-t/T2) rho01.
func ThermalRelaxationKraus(t, T1, T2 float64) ([]Matrix, error) {
	g, l, err := RelaxationParams(t, T1, T2)
	if err != nil {
		return nil, err
	}
	return []Matrix{
		{{1, 0}, {0, complex(math.Sqrt((1-g)*(1-l)), 0)}},
		{{0, complex(math.Sqrt(g), 0)}, {0, 0}},
		{{0, 0}, {0, complex(math.Sqrt((1-g)*l), 0)}},
	}, nil
}

// ThermalRelaxationSuperop returns the superoperator of
// ThermalRelaxationKraus: rho00 += gamma rho11, rho11 *= 1 - gamma,
// off-diagonals *= exp(-t/T2).
func ThermalRelaxationSuperop(t, T1, T2 float64) (Superop, error) {
	ks, err := ThermalRelaxationKraus(t, T1, T2)
	if err != nil {
		return Superop{}, err
	}
	return KrausSuperop(ks), nil
}

// ProcessTrace returns the trace of a single-qubit superoperator, d^2 times
// the process (entanglement) fidelity of the channel with the identity,
// d = 2. With AverageFidelity it gives the average gate fidelity.
func (s Superop) ProcessTrace() float64 {
	return real(s[0][0] + s[1][1] + s[2][2] + s[3][3])
}

// AverageFidelity returns the average gate fidelity of a channel on d-level
// systems whose superoperator has trace tr (tr = d^2 F_e, F_e the
// entanglement fidelity with the identity):
//
//	F_avg = (d F_e + 1) / (d + 1)
//
// (Horodecki, Horodecki & Horodecki 1999; Nielsen, "A simple formula for the
// average gate fidelity of a quantum dynamical operation", Phys. Lett. A 303
// (2002) 249, quant-ph/0205035).
func AverageFidelity(tr float64, d int) float64 {
	fd := float64(d)
	return (tr/fd + 1) / (fd + 1)
}

// DepolarizingForError returns the depolarizing strength p (rho ->
// (1-p) rho + p I/d, d = 2^n on n qubits) such that the channel
// depolarizing after a noise channel of superoperator trace tr (the
// relaxation during the gate; tr = d^2 for none) has average gate
// infidelity r. The trace of the composition is (1-p) tr + p (the
// completely depolarizing channel has trace 1), and F_avg = 1 - r by
// AverageFidelity, so
//
//	p = (tr - d^2 F_e) / (tr - 1),  F_e = ((1-r)(d+1) - 1) / d.
//
// Without other noise (tr = d^2) this is p = r d/(d-1) (Nielsen 2002 for
// the depolarizing channel). A p below 0 (the other noise already exceeds
// r) is returned as 0, with ok false; p is at most 1 for r <= (d-1)/d.
func DepolarizingForError(r, tr float64, d int) (p float64, ok bool) {
	fd := float64(d)
	fe := ((1-r)*(fd+1) - 1) / fd
	p = (tr - fd*fd*fe) / (tr - 1)
	if p < 0 {
		return 0, false
	}
	return min(p, 1), true
}
