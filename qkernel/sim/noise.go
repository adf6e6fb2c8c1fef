package sim

import (
	"fmt"
	"math"
	"math/bits"
)

// NoiseModel is a gate-level noise model. The zero value is noiseless.
//
// After every single-qubit gate (H, X, RY, RZ) on qubit q the simulators
// apply, in this order, the depolarizing channel with Depolarizing[0],
// amplitude damping and phase damping to q. After every CNOT they apply
// the two-qubit depolarizing channel with Depolarizing[1] to its two qubits,
// then amplitude and phase damping to each of them. Measurements are
// deferred to the end of the circuit; Readout then acts on the measured
// bits: Readout[0] = p01 = P(read 1 | 0), Readout[1] = p10 = P(read 0 | 1),
// independently for every measured bit.
//
// Conventions (Nielsen & Chuang, Quantum Computation and Quantum Information,
// 2010, section 8.3): the depolarizing channel of strength p replaces the
// qubit(s) by the maximally mixed state with probability p,
// rho -> (1-p) rho + p I/d (equivalently each non-identity Pauli with
// probability p/d^2); amplitude damping with gamma has Kraus operators
// [[1,0],[0,sqrt(1-gamma)]] and [[0,sqrt(gamma)],[0,0]]; phase damping with
// lambda has [[1,0],[0,sqrt(1-lambda)]] and [[0,0],[0,sqrt(lambda)]], which
// scales the off-diagonal entries by sqrt(1-lambda).
type NoiseModel struct {
	// Depolarizing holds the single-qubit (p1) and two-qubit (p2) strengths.
	Depolarizing [2]float64
	// AmplitudeDamping is gamma, PhaseDamping is lambda.
	AmplitudeDamping, PhaseDamping float64
	// Readout holds p01 = P(read 1 | 0) and p10 = P(read 0 | 1).
	Readout [2]float64
}

// Validate checks that every parameter is a probability in [0, 1]. The
// error names the key: "depolarizing", "amplitude_damping", "phase_damping"
// or "readout".
func (m NoiseModel) Validate() error {
	check := func(key string, v float64) error {
		if math.IsNaN(v) || v < 0 || v > 1 {
			return fmt.Errorf("sim: noise %s = %v outside [0,1]", key, v)
		}
		return nil
	}
	for _, c := range []struct {
		key string
		v   float64
	}{
		{"depolarizing", m.Depolarizing[0]}, {"depolarizing", m.Depolarizing[1]},
		{"amplitude_damping", m.AmplitudeDamping}, {"phase_damping", m.PhaseDamping},
		{"readout", m.Readout[0]}, {"readout", m.Readout[1]},
	} {
		if err := check(c.key, c.v); err != nil {
			return err
		}
	}
	return nil
}

// IsZero reports whether the model has no noise at all.
func (m NoiseModel) IsZero() bool { return m == NoiseModel{} }

// gateNoise reports whether the model has noise acting on the quantum state
// (anything but readout).
func (m NoiseModel) gateNoise() bool {
	return m.Depolarizing != [2]float64{} || m.AmplitudeDamping != 0 || m.PhaseDamping != 0
}

// Pauli matrices I, X, Y, Z.
var pauli = [4]Matrix{
	{{1, 0}, {0, 1}},
	{{0, 1}, {1, 0}},
	{{0, -1i}, {1i, 0}},
	{{1, 0}, {0, -1}},
}

// DepolarizingKraus returns Kraus operators of the single-qubit
// depolarizing channel rho -> (1-p) rho + p I/2:
// sqrt(1-3p/4) I, sqrt(p/4) X, sqrt(p/4) Y, sqrt(p/4) Z
// (Nielsen & Chuang 2010, section 8.3.4).
func DepolarizingKraus(p float64) []Matrix {
	ks := make([]Matrix, 4)
	for i, P := range pauli {
		w := p / 4
		if i == 0 {
			w = 1 - 3*p/4
		}
		s := complex(math.Sqrt(w), 0)
		for r := range 2 {
			for c := range 2 {
				ks[i][r][c] = s * P[r][c]
			}
		}
	}
	return ks
}

// AmplitudeDampingKraus returns E0 = [[1,0],[0,sqrt(1-gamma)]] and
// E1 = [[0,sqrt(gamma)],[0,0]] (Nielsen & Chuang 2010, section 8.3.5).
func AmplitudeDampingKraus(gamma float64) []Matrix {
	return []Matrix{
		{{1, 0}, {0, complex(math.Sqrt(1-gamma), 0)}},
		{{0, complex(math.Sqrt(gamma), 0)}, {0, 0}},
	}
}

// PhaseDampingKraus returns E0 = [[1,0],[0,sqrt(1-lambda)]] and
// E1 = [[0,0],[0,sqrt(lambda)]] (Nielsen & Chuang 2010, section 8.3.6).
func PhaseDampingKraus(lambda float64) []Matrix {
	return []Matrix{
		{{1, 0}, {0, complex(math.Sqrt(1-lambda), 0)}},
		{{0, 0}, {0, complex(math.Sqrt(lambda), 0)}},
	}
}

// ReadoutKraus returns Kraus operators of the channel that turns a qubit
// into the classical mixture a noisy read-out would report:
// sqrt(1-p01)|0><0|, sqrt(p01)|1><0|, sqrt(p10)|0><1|, sqrt(1-p10)|1><1|.
// Applied just before a measurement it has the same effect on the outcome
// distribution as the readout assignment error (p01, p10).
func ReadoutKraus(p01, p10 float64) []Matrix {
	return []Matrix{
		{{complex(math.Sqrt(1-p01), 0), 0}, {0, 0}},
		{{0, 0}, {complex(math.Sqrt(p01), 0), 0}},
		{{0, complex(math.Sqrt(p10), 0)}, {0, 0}},
		{{0, 0}, {0, complex(math.Sqrt(1-p10), 0)}},
	}
}

// DepolarizingSuperop returns the superoperator of
// rho -> (1-p) rho + p (I/2) Tr rho (same channel as DepolarizingKraus).
func DepolarizingSuperop(p float64) Superop {
	var s Superop
	s[0][0], s[0][3] = complex(1-p/2, 0), complex(p/2, 0)
	s[3][0], s[3][3] = complex(p/2, 0), complex(1-p/2, 0)
	s[1][1], s[2][2] = complex(1-p, 0), complex(1-p, 0)
	return s
}

// AmplitudeDampingSuperop returns the superoperator of amplitude damping:
// rho00 += gamma rho11, rho11 *= 1-gamma, off-diagonals *= sqrt(1-gamma).
func AmplitudeDampingSuperop(gamma float64) Superop {
	var s Superop
	f := complex(math.Sqrt(1-gamma), 0)
	s[0][0], s[0][3] = 1, complex(gamma, 0)
	s[3][3] = complex(1-gamma, 0)
	s[1][1], s[2][2] = f, f
	return s
}

// PhaseDampingSuperop returns the superoperator of phase damping:
// off-diagonals *= sqrt(1-lambda), populations unchanged.
func PhaseDampingSuperop(lambda float64) Superop {
	var s Superop
	f := complex(math.Sqrt(1-lambda), 0)
	s[0][0], s[3][3] = 1, 1
	s[1][1], s[2][2] = f, f
	return s
}

// identitySuperop is the identity channel.
func identitySuperop() Superop {
	var s Superop
	for i := range 4 {
		s[i][i] = 1
	}
	return s
}

// dampingSuperop is amplitude damping followed by phase damping.
func (m NoiseModel) dampingSuperop() (Superop, bool) {
	s := identitySuperop()
	on := false
	if m.AmplitudeDamping != 0 {
		s, on = s.Then(AmplitudeDampingSuperop(m.AmplitudeDamping)), true
	}
	if m.PhaseDamping != 0 {
		s, on = s.Then(PhaseDampingSuperop(m.PhaseDamping)), true
	}
	return s, on
}

// after1 is the channel after a single-qubit gate: depolarizing with
// Depolarizing[0], then amplitude and phase damping.
func (m NoiseModel) after1() Superop {
	s := identitySuperop()
	if p := m.Depolarizing[0]; p != 0 {
		s = s.Then(DepolarizingSuperop(p))
	}
	if damp, on := m.dampingSuperop(); on {
		s = s.Then(damp)
	}
	return s
}

// checkDist checks an outcome distribution: finite non-negative entries and
// a power-of-two length of at least 2.
func checkDist(p []float64) (nbits int, err error) {
	if len(p) < 2 || len(p)&(len(p)-1) != 0 {
		return 0, fmt.Errorf("sim: distribution of length %d, want a power of two >= 2", len(p))
	}
	for i, v := range p {
		if math.IsNaN(v) || math.IsInf(v, 0) || v < 0 {
			return 0, fmt.Errorf("sim: probability %d = %v, want finite and non-negative", i, v)
		}
	}
	return bits.TrailingZeros(uint(len(p))), nil
}

func checkProb(name string, v float64) error {
	if math.IsNaN(v) || v < 0 || v > 1 {
		return fmt.Errorf("sim: %s = %v outside [0,1]", name, v)
	}
	return nil
}

// GlobalDepolarizing is the closed-form model of a depolarizing channel of
// strength s on the whole register just before measurement:
// P'(a,k) = (1-s) P(a,k) + s / len(P). For the outcome layout of Outcomes
// (len 2^(1+q)) this is (1-s) P(a,k) + s/2^(1+q), and the acceptance
// probability becomes p_acc' = (1-s) p_acc + s/2.
func GlobalDepolarizing(p []float64, s float64) ([]float64, error) {
	if _, err := checkDist(p); err != nil {
		return nil, err
	}
	if err := checkProb("depolarizing strength", s); err != nil {
		return nil, err
	}
	out := make([]float64, len(p))
	u := s / float64(len(p))
	for i, v := range p {
		out[i] = (1-s)*v + u
	}
	return out, nil
}

// AncillaDephasing is the closed-form model of phase damping with parameter
// lambda on the ancilla just before the final Hadamard. The coherence
// between the a = 0 and a = 1 branches shrinks by f = sqrt(1-lambda), so
//
//	P'(0,k) = (1+f)/2 P(0,k) + (1-f)/2 P(1,k)
//	P'(1,k) = (1-f)/2 P(0,k) + (1+f)/2 P(1,k)
//
// (derived by hand: before the H the populations of both branches of class
// k are W_k/2 and the coherence is sum_{m in k} w_m <x~,x_m>/2). p uses the
// layout a*2^q + k of Outcomes.
func AncillaDephasing(p []float64, lambda float64) ([]float64, error) {
	if _, err := checkDist(p); err != nil {
		return nil, err
	}
	if err := checkProb("phase damping", lambda); err != nil {
		return nil, err
	}
	f := math.Sqrt(1 - lambda)
	h := len(p) / 2
	out := make([]float64, len(p))
	for k := 0; k < h; k++ {
		p0, p1 := p[k], p[h+k]
		out[k] = (1+f)/2*p0 + (1-f)/2*p1
		out[h+k] = (1-f)/2*p0 + (1+f)/2*p1
	}
	return out, nil
}

// Readout applies independent readout assignment errors to every bit of the
// outcome index: a 0 reads as 1 with probability p01 and a 1 reads as 0 with
// probability p10. len(p) must be a power of two.
func Readout(p []float64, p01, p10 float64) ([]float64, error) {
	nb, err := checkDist(p)
	if err != nil {
		return nil, err
	}
	if err := checkProb("readout p01", p01); err != nil {
		return nil, err
	}
	if err := checkProb("readout p10", p10); err != nil {
		return nil, err
	}
	out := append([]float64(nil), p...)
	for b := 0; b < nb; b++ {
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
	return out, nil
}
