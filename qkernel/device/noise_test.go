package device

import (
	"context"
	"encoding/json"
	"math"
	"math/cmplx"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// qutipFixture is testdata/ref_device_qutip.json, written by
// scripts/ref_device_qutip.py with QuTiP 4.7.1 (Debian python3-qutip),
// numpy 1.24.2 and scipy 1.10.1 (versions recorded in the file and checked
// below); the calls are named in the script's docstring.
type qutipFixture struct {
	QuTiP      string `json:"qutip"`
	Numpy      string `json:"numpy"`
	Scipy      string `json:"scipy"`
	Relaxation []struct {
		T     float64                   `json:"t_us"`
		T1    any                       `json:"t1_us"` // a number or "inf"
		T2    float64                   `json:"t2_us"`
		Input map[string][][][2]float64 `json:"input"`
		Rho   map[string][][][2]float64 `json:"rho"`
	} `json:"relaxation"`
	Depolarizing []struct {
		R, NS, T1, T2 float64
		Qubits        int     `json:"qubits"`
		P             float64 `json:"p"`
	} `json:"depolarizing"`
	Circuit struct {
		DeviceTOML string `json:"device_toml"`
		Gates      []struct {
			Gate   string  `json:"gate"`
			Target int     `json:"target"`
			Other  int     `json:"other"`
			Angle  float64 `json:"angle"`
		} `json:"gates"`
		Ancilla      int       `json:"ancilla"`
		Class        []int     `json:"class"`
		Depolarizing []float64 `json:"depolarizing"`
		DurationNS   float64   `json:"duration_ns"`
		Joint        []float64 `json:"joint"`
	} `json:"circuit"`
}

func (f *qutipFixture) UnmarshalJSON(b []byte) error {
	type plain qutipFixture
	var p plain
	if err := json.Unmarshal(b, &p); err != nil {
		return err
	}
	// The depolarizing cases use the script's key names.
	var raw struct {
		Depolarizing []struct {
			R      float64 `json:"r"`
			NS     float64 `json:"gate_ns"`
			T1     float64 `json:"t1_us"`
			T2     float64 `json:"t2_us"`
			Qubits int     `json:"qubits"`
			P      float64 `json:"p"`
		} `json:"depolarizing"`
	}
	if err := json.Unmarshal(b, &raw); err != nil {
		return err
	}
	*f = qutipFixture(p)
	for i, d := range raw.Depolarizing {
		f.Depolarizing[i].R, f.Depolarizing[i].NS, f.Depolarizing[i].T1, f.Depolarizing[i].T2 = d.R, d.NS, d.T1, d.T2
	}
	return nil
}

func loadQuTiP(t *testing.T) *qutipFixture {
	t.Helper()
	b, err := os.ReadFile(filepath.Join("testdata", "ref_device_qutip.json"))
	if err != nil {
		t.Fatal(err)
	}
	var f qutipFixture
	if err := json.Unmarshal(b, &f); err != nil {
		t.Fatal(err)
	}
	if f.QuTiP != "4.7.1" || f.Numpy != "1.24.2" || f.Scipy != "1.10.1" {
		t.Fatalf("fixture made with qutip %s, numpy %s, scipy %s; the comments name 4.7.1, 1.24.2, 1.10.1", f.QuTiP, f.Numpy, f.Scipy)
	}
	return &f
}

// TestRelaxationQuTiP compares sim.ThermalRelaxationSuperop with the exact
// solution of the Lindblad equation in QuTiP 4.7.1
// (qutip.liouvillian, Qobj.expm; see the script) on five input states.
// 1e-12: both are exact up to rounding and QuTiP's matrix exponential
// (scipy's Pade approximation, ~1e-15 here).
func TestRelaxationQuTiP(t *testing.T) {
	f := loadQuTiP(t)
	if len(f.Relaxation) < 5 {
		t.Fatalf("%d relaxation cases", len(f.Relaxation))
	}
	for _, c := range f.Relaxation {
		T1 := math.Inf(1)
		if v, ok := c.T1.(float64); ok {
			T1 = v
		}
		s, err := sim.ThermalRelaxationSuperop(c.T, T1, c.T2)
		if err != nil {
			t.Fatal(err)
		}
		for name, in := range c.Input {
			v := [4]complex128{}
			for r := range 2 {
				for col := range 2 {
					v[2*r+col] = complex(in[r][col][0], in[r][col][1])
				}
			}
			want := c.Rho[name]
			for i := range 4 {
				var got complex128
				for j := range 4 {
					got += s[i][j] * v[j]
				}
				w := complex(want[i/2][i%2][0], want[i/2][i%2][1])
				if cmplx.Abs(got-w) > 1e-12 {
					t.Errorf("t=%v T1=%v T2=%v %s: rho[%d] = %v, QuTiP %v", c.T, T1, c.T2, name, i, got, w)
				}
			}
		}
	}
}

// TestDepolarizingQuTiP compares sim.DepolarizingForError (with the trace
// of the relaxation superoperator during the gate) with the strength that
// scipy's brentq finds on qutip.average_gate_fidelity of the composed
// channel (QuTiP 4.7.1). 1e-11: brentq's tolerance (xtol 1e-16, rtol
// 1e-15) and the fidelity's rounding near 1 (~1e-15 relative, divided by
// d/(d+1) ~ 1 and the slope of F in p, (d-1)/d).
func TestDepolarizingQuTiP(t *testing.T) {
	f := loadQuTiP(t)
	for _, c := range f.Depolarizing {
		s, err := sim.ThermalRelaxationSuperop(c.NS/1000, c.T1, c.T2)
		if err != nil {
			t.Fatal(err)
		}
		tr := s.ProcessTrace()
		d := 2
		if c.Qubits == 2 {
			tr, d = tr*tr, 4
		}
		p, _ := sim.DepolarizingForError(c.R, tr, d)
		if !scalar.EqualWithinAbs(p, c.P, 1e-11) {
			t.Errorf("%+v: p = %v, QuTiP/brentq %v", c, p, c.P)
		}
	}
}

var gateByName = map[string]circuit.Gate{"sx": circuit.SX, "x": circuit.X, "rz": circuit.RZ, "cx": circuit.CNOT, "cz": circuit.CZ, "rx": circuit.RX, "ry": circuit.RY}

// fixtureProgram builds the fixture's native circuit as a Program on its
// invented 4-qubit line device (no routing: every gate is on an edge).
func fixtureProgram(t *testing.T, f *qutipFixture) *Program {
	t.Helper()
	dev, err := Parse([]byte(f.Circuit.DeviceTOML), "ref-line-4.toml")
	if err != nil {
		t.Fatal(err)
	}
	p := &Program{Device: dev, Region: []int{0, 1, 2, 3},
		regs: circuit.Layout{Ancilla: f.Circuit.Ancilla, Class: f.Circuit.Class}}
	for _, g := range f.Circuit.Gates {
		p.native = append(p.native, gate{kind: gateByName[g.Gate], t: int16(g.Target), c: int16(g.Other), angle: g.Angle})
	}
	for _, q := range append([]int{f.Circuit.Ancilla}, f.Circuit.Class...) {
		p.native = append(p.native, gate{kind: circuit.Measure, t: int16(q), c: -1})
	}
	return p
}

// TestNoisyCircuitQuTiP runs the fixture's 4-qubit native circuit under
// the device's calibrated noise (ASAP schedule, idle relaxation, gate
// depolarizing net of relaxation, gate relaxation, per-qubit readout) and
// compares the per-gate depolarizing strengths, the duration (derived by
// hand: the critical path 35+35 (sx, sx on 0) ... as computed by the
// script's schedule) and the joint (ancilla, class) distribution with the
// independent QuTiP 4.7.1 density-matrix simulation of the script.
// Distribution 1e-10: channels of strength <= 1e-2 composed over 14 gates,
// exact up to rounding and brentq's 1e-15 on the strengths.
func TestNoisyCircuitQuTiP(t *testing.T) {
	f := loadQuTiP(t)
	p := fixtureProgram(t, f)
	nc, err := p.Noisy()
	if err != nil {
		t.Fatal(err)
	}
	k := 0
	for _, op := range nc.Ops {
		if op.Op.Gate == circuit.Measure {
			continue
		}
		if !scalar.EqualWithinAbs(op.Depolarizing, f.Circuit.Depolarizing[k], 1e-11) {
			t.Errorf("gate %d (%s): depolarizing %v, QuTiP/brentq %v", k, op.Op.Gate, op.Depolarizing, f.Circuit.Depolarizing[k])
		}
		k++
	}
	if r := p.nativeResources(); !scalar.EqualWithinAbs(r.DurationNS, f.Circuit.DurationNS, 1e-9) {
		t.Errorf("duration %v ns, script's schedule %v ns", r.DurationNS, f.Circuit.DurationNS)
	}
	res, err := p.Simulate(context.Background(), sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range f.Circuit.Joint {
		if !scalar.EqualWithinAbs(res.P[i], w, 1e-10) {
			t.Errorf("P[%d] = %v, QuTiP %v", i, res.P[i], w)
		}
	}
	// Trajectories agree within 5 standard errors.
	tr, err := p.Simulate(context.Background(), sim.Options{Method: sim.Trajectories, Trajectories: 4000, Rng: rand.New(rand.NewPCG(3, 4))})
	if err != nil {
		t.Fatal(err)
	}
	for i, w := range f.Circuit.Joint {
		if math.Abs(tr.P[i]-w) > 5*tr.StdErr[i]+1e-12 {
			t.Errorf("trajectories P[%d] = %v +- %v, QuTiP %v", i, tr.P[i], tr.StdErr[i], w)
		}
	}
}

// TestDeviceNoiseLimits: a noiseless description (errors 0, T1 = T2 =
// inf, no readout error) gives the noiseless distribution of the routed
// circuit (1e-12: rounding only), and noise lowers the fidelity of a real
// device's distribution to the noiseless one.
func TestDeviceNoiseLimits(t *testing.T) {
	clean := `name = "clean"
qubits = 4
gates = "rz-sx-x-cx"
edges = [[0, 1], [1, 2], [2, 3]]
[qubit]
t1_us = inf
t2_us = inf
readout_p01 = 0
readout_p10 = 0
gate_error = 0
gate_ns = 30
[pair]
gate_error = 0
gate_ns = 300
`
	dev, err := Parse([]byte(clean), "clean.toml")
	if err != nil {
		t.Fatal(err)
	}
	c := smallCase(t, "iris", 2) // 1 + 1 + 2 + 2 = 6 qubits: too many for 4
	if _, err := Compile(c, dev, Options{}); err == nil {
		t.Fatal("6 qubits on a 4-qubit device compiled")
	}
	c = smallCase(t, "cats", 2) // 1 + 1 + 1 + 1 = 4 qubits
	p, err := Compile(c, dev, Options{})
	if err != nil {
		t.Fatal(err)
	}
	want, _ := sim.Simulate(context.Background(), c, sim.Options{})
	got, err := p.Simulate(context.Background(), sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	for i := range want.P {
		if !scalar.EqualWithinAbs(got.P[i], want.P[i], 1e-12) {
			t.Errorf("noiseless device: P[%d] = %v, logical %v", i, got.P[i], want.P[i])
		}
	}
	line, _ := Load("line-16")
	pl, err := Compile(c, line, Options{})
	if err != nil {
		t.Fatal(err)
	}
	noisy, err := pl.Simulate(context.Background(), sim.Options{})
	if err != nil {
		t.Fatal(err)
	}
	sum, dist := 0.0, 0.0
	for i := range want.P {
		sum += noisy.P[i]
		dist += math.Abs(noisy.P[i] - want.P[i])
	}
	// 1e-12: a probability distribution; noise of order 1e-2 per gate moves it.
	if !scalar.EqualWithinAbs(sum, 1, 1e-12) || dist < 1e-3 {
		t.Errorf("line-16: sum %v, distance from noiseless %v", sum, dist)
	}
}
