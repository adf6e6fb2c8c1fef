package sim

import (
	"context"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
)

// TestTrajectoriesConverge compares the trajectory average with the exact
// density-matrix distribution under every channel: at a fixed seed each
// entry must lie within 4 standard errors (plus 1e-12 for entries with no
// spread), the usual size of a stochastic tolerance.
func TestTrajectoriesConverge(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 32))
	// A short circuit (4 qubits, 6 CNOT, 9 single-qubit gates), so that the
	// channels do not saturate to the uniform distribution.
	c := randomInstance(rng, 2, 2, 2, false).compile(t)
	clean, _ := Outcomes(c, Options{})
	m := NoiseModel{Depolarizing: [2]float64{0.03, 0.06}, AmplitudeDamping: 0.04, PhaseDamping: 0.05, Readout: [2]float64{0.02, 0.04}}
	// One channel at a time, strong enough that a wrong channel shows (a
	// depolarizing strength off by 4/3 moves P by about 7 standard errors),
	// then all together.
	for _, nm := range []NoiseModel{
		{Depolarizing: [2]float64{0.1, 0}},
		{Depolarizing: [2]float64{0, 0.1}},
		{AmplitudeDamping: 0.1},
		{PhaseDamping: 0.15},
		m,
	} {
		exact, err := Simulate(context.Background(), c, Options{Noise: nm, Method: DensityMatrix})
		if err != nil {
			t.Fatal(err)
		}
		traj, err := Simulate(context.Background(), c, Options{Noise: nm, Method: Trajectories, Trajectories: 3000, Rng: rand.New(rand.NewPCG(33, 34))})
		if err != nil {
			t.Fatal(err)
		}
		if traj.Method != Trajectories || len(traj.StdErr) != len(traj.P) {
			t.Fatalf("result %+v", traj)
		}
		moved := 0.0
		for i := range exact.P {
			if d := math.Abs(traj.P[i] - exact.P[i]); d > 4*traj.StdErr[i]+1e-12 {
				t.Errorf("%+v: P[%d]: trajectories %.6f ± %.6f, density matrix %.6f", nm, i, traj.P[i], traj.StdErr[i], exact.P[i])
			}
			moved += math.Abs(exact.P[i] - clean[i])
		}
		if moved < 0.01 {
			t.Errorf("%+v: noise moved the distribution by only %v: the test would not see a wrong channel", nm, moved)
		}
	}
	traj, _ := Simulate(context.Background(), c, Options{Noise: m, Method: Trajectories, Trajectories: 300, Rng: rand.New(rand.NewPCG(33, 34))})
	// Same seed, same result.
	again, _ := Simulate(context.Background(), c, Options{Noise: m, Method: Trajectories, Trajectories: 300, Rng: rand.New(rand.NewPCG(33, 34))})
	for i := range again.P {
		if again.P[i] != traj.P[i] { // exact: identical seeded runs
			t.Fatalf("trajectories not reproducible at P[%d]: %v vs %v", i, again.P[i], traj.P[i])
		}
	}
	// Without gate noise a single trajectory is exact.
	nn, err := Simulate(context.Background(), c, Options{Method: Trajectories})
	if err != nil {
		t.Fatal(err)
	}
	for i := range nn.P {
		if !scalar.EqualWithinAbsOrRel(nn.P[i], clean[i], 1e-12, 1e-12) || nn.StdErr[i] != 0 {
			t.Errorf("noiseless trajectories P[%d] = %v ± %v, want %v", i, nn.P[i], nn.StdErr[i], clean[i])
		}
	}
}

// smallCircuit returns a valid circuit on n qubits with a few gates.
func smallCircuit(n int) *circuit.Circuit {
	return &circuit.Circuit{NQubits: n, Regs: circuit.Layout{Ancilla: 0, Class: []int{n - 1}}, Ops: []circuit.Op{
		{Gate: circuit.H, Target: 0},
		{Gate: circuit.CNOT, Controls: []int{0}, Target: n - 1},
		{Gate: circuit.RY, Target: 1, Angle: 0.4},
		{Gate: circuit.Measure, Target: 0},
	}}
}

// TestMethodLimits checks the automatic choice and that exceeding a limit
// is an error naming the limit and the alternative.
func TestMethodLimits(t *testing.T) {
	noisy := NoiseModel{Depolarizing: [2]float64{0.01, 0.01}}
	rng := rand.New(rand.NewPCG(35, 36))
	for _, tc := range []struct {
		n    int
		opt  Options
		want []string // substrings of the error; nil means success
		m    Method
	}{
		{5, Options{}, nil, StateVector},
		{5, Options{Noise: noisy}, nil, DensityMatrix},
		{MaxDensityQubits + 1, Options{Noise: noisy, Trajectories: 2, Rng: rng}, nil, Trajectories},
		{MaxDensityQubits + 1, Options{Noise: noisy, Method: DensityMatrix}, []string{"density-matrix limit of 12", "trajectories"}, 0},
		{MaxDensityQubits + 1, Options{Noise: noisy}, []string{"needs Options.Rng"}, 0},
		{5, Options{Noise: noisy, Method: StateVector}, []string{"noiseless", "density-matrix or trajectories"}, 0},
		{MaxStateQubits + 1, Options{}, []string{"state-vector limit of 26"}, 0},
		{MaxStateQubits + 1, Options{Noise: noisy, Rng: rng}, []string{"limit of 26"}, 0},
		{5, Options{Method: Method(9)}, []string{"unknown method"}, 0},
		{5, Options{Noise: NoiseModel{PhaseDamping: -1}}, []string{"phase_damping"}, 0},
	} {
		res, err := Simulate(context.Background(), smallCircuit(tc.n), tc.opt)
		if tc.want == nil {
			if err != nil || res.Method != tc.m {
				t.Errorf("n=%d %+v: method %s, err %v; want %s", tc.n, tc.opt.Method, res.Method, err, tc.m)
			}
			continue
		}
		for _, w := range tc.want {
			if err == nil || !strings.Contains(err.Error(), w) {
				t.Errorf("n=%d method %s: error %v, want one containing %q", tc.n, tc.opt.Method, err, w)
			}
		}
	}
	if _, err := Outcomes(&circuit.Circuit{NQubits: 2, Ops: []circuit.Op{{Gate: circuit.H, Target: 5}}}, Options{}); err == nil {
		t.Error("invalid circuit: no error")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := Simulate(ctx, smallCircuit(4), Options{}); err == nil {
		t.Error("cancelled context: no error")
	}
	for _, s := range []string{"auto", "state-vector", "density-matrix", "trajectories"} {
		m, err := ParseMethod(s)
		if err != nil || m.String() != s {
			t.Errorf("ParseMethod(%q) = %v, %v", s, m, err)
		}
	}
	if _, err := ParseMethod("exactish"); err == nil {
		t.Error("ParseMethod(exactish): no error")
	}
}

// TestJumpsUnravelChannels checks each stochastic jump rule against its
// channel: the average of |psi'><psi'| over many jumps from one random
// 2-qubit state must match the density-matrix channel within 4 standard
// errors per entry (fixed seed). Strengths are large so that a wrong rule
// (e.g. depolarizing without the identity among the Paulis) shows.
func TestJumpsUnravelChannels(t *testing.T) {
	rng := rand.New(rand.NewPCG(37, 38))
	psi := randomAmps(rng, 2)
	for _, tc := range []struct {
		name  string
		m     NoiseModel
		two   bool
		exact func(d *Density)
	}{
		{"depolarizing1", NoiseModel{Depolarizing: [2]float64{1, 0}}, false, func(d *Density) { d.Depolarize1(1, 1) }},
		{"depolarizing2", NoiseModel{Depolarizing: [2]float64{0, 1}}, true, func(d *Density) { d.Depolarize2(0, 1, 1) }},
		{"amplitude damping", NoiseModel{AmplitudeDamping: 0.6}, false, func(d *Density) { d.AmplitudeDamp(1, 0.6) }},
		{"phase damping", NoiseModel{PhaseDamping: 0.7}, false, func(d *Density) { d.PhaseDamp(1, 0.7) }},
	} {
		const T = 4000
		var sum, sum2 [16]complex128
		s := &State{N: 2, Amp: make([]complex128, 4)}
		for range T {
			copy(s.Amp, psi)
			if tc.two {
				s.noisy2(0, 1, tc.m, rng)
			} else {
				s.noisy1(1, tc.m, rng)
			}
			for r := range 4 {
				for c := range 4 {
					v := s.Amp[r] * cmplx.Conj(s.Amp[c])
					sum[r*4+c] += v
					sum2[r*4+c] += complex(real(v)*real(v), imag(v)*imag(v))
				}
			}
		}
		d := &Density{N: 2, Rho: make([]complex128, 16)}
		for r := range 4 {
			for c := range 4 {
				d.Rho[r*4+c] = psi[r] * cmplx.Conj(psi[c])
			}
		}
		tc.exact(d)
		for i := range 16 {
			mean := sum[i] / T
			se := func(m, m2 float64) float64 { return math.Sqrt(math.Max(m2/T-m*m, 0) / T) }
			seR, seI := se(real(mean), real(sum2[i])), se(imag(mean), imag(sum2[i]))
			if math.Abs(real(mean)-real(d.Rho[i])) > 4*seR+1e-12 || math.Abs(imag(mean)-imag(d.Rho[i])) > 4*seI+1e-12 {
				t.Errorf("%s: rho[%d] jumps %.4f (se %.4f, %.4f), channel %.4f", tc.name, i, mean, seR, seI, d.Rho[i])
			}
		}
	}
}
