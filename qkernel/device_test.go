package qkernel

import (
	"errors"
	"math"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// cleanDevice is an invented line of 16 qubits without any noise: its
// calibrated simulation must reproduce the noiseless circuit.
const cleanDevice = `name = "clean-line"
qubits = 16
gates = "rz-rx-ry-cz"
edges = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 6], [6, 7], [7, 8], [8, 9], [9, 10], [10, 11], [11, 12], [12, 13], [13, 14], [14, 15]]
[qubit]
t1_us = inf
t2_us = inf
readout_p01 = 0
readout_p10 = 0
gate_error = 0
gate_ns = 30
[pair]
gate_error = 0
gate_ns = 200
`

// TestDeviceNoiseless: ModeNoisy on a noiseless device description (every
// row compiled, routed on a line and simulated under the calibrated
// model) gives the exact-mode probabilities (1e-10: the routing test's
// tolerance, rounding over about a thousand gates) and predictions.
func TestDeviceNoiseless(t *testing.T) {
	dev, err := device.Parse([]byte(cleanDevice), "clean.toml")
	if err != nil {
		t.Fatal(err)
	}
	f := firstFold(t, "iris", 10)
	exact := &Classifier{TrainSubset: 8, Seed: 5, Balance: true}
	pe, de := fitPredict(t, exact, f.Xtr, f.ytr, f.nClass, f.Xte)
	noisy := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 5, Balance: true}
	pn, dn := fitPredict(t, noisy, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range pe {
		if pe[i] != pn[i] || !scalar.EqualWithinAbs(de[i].PAcc, dn[i].PAcc, 1e-10) {
			t.Errorf("row %d: exact %d (p_acc %v), device %d (p_acc %v)", i, pe[i], de[i].PAcc, pn[i], dn[i].PAcc)
		}
		for k := range de[i].Probs {
			if !scalar.EqualWithinAbs(de[i].Probs[k], dn[i].Probs[k], 1e-10) {
				t.Errorf("row %d class %d: exact %v, device %v", i, k, de[i].Probs[k], dn[i].Probs[k])
			}
		}
	}
}

// TestDeviceNoisy: an embedded device's noise keeps every Detail a valid
// probability (accepted class probabilities sum to at most 1, p_acc in
// (0, 1)), changes p_acc on every row (gates of error ~1e-2 and readout
// errors of ~1e-2 act), is deterministic, and finite shots work on top.
func TestDeviceNoisy(t *testing.T) {
	dev, err := device.Load("line-16")
	if err != nil {
		t.Fatal(err)
	}
	f := firstFold(t, "iris", 10)
	c := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 9, Balance: true}
	_, d1 := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	_, d2 := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	_, de := fitPredict(t, &Classifier{TrainSubset: 8, Seed: 9, Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range d1 {
		sum := 0.0
		for k, v := range d1[i].Probs {
			sum += v
			if v < 0 || v > 1 || v != d2[i].Probs[k] { // exact: the same computation twice
				t.Fatalf("row %d: P(%d|acc) = %v (again %v)", i, k, v, d2[i].Probs[k])
			}
		}
		if sum > 1+1e-12 || d1[i].PAcc <= 0 || d1[i].PAcc >= 1 {
			t.Errorf("row %d: probabilities sum to %v, p_acc %v", i, sum, d1[i].PAcc)
		}
		if d := math.Abs(d1[i].PAcc - de[i].PAcc); d < 1e-4 || d > 0.3 {
			t.Errorf("row %d: p_acc %v under noise, %v exact", i, d1[i].PAcc, de[i].PAcc)
		}
	}
	shots := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 9, Shots: 500, Balance: true}
	_, ds := fitPredict(t, shots, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range ds {
		if ds[i].Shots <= 0 || ds[i].Shots > 500 {
			t.Errorf("row %d: %d accepted shots of 500", i, ds[i].Shots)
		}
	}
}

func TestDeviceValidate(t *testing.T) {
	dev, _ := device.Load("line-16")
	for _, tc := range []struct {
		name string
		c    Classifier
		key  string
		err  error
	}{
		{"exact", Classifier{Device: dev}, "device", ErrOption},
		{"shots", Classifier{Mode: ModeShots, Shots: 10, Device: dev}, "device", ErrOption},
		{"with noise", Classifier{Mode: ModeNoisy, Device: dev, Noise: sim.NoiseModel{Depolarizing: [2]float64{0.01, 0}}}, "device", ErrOption},
		{"with readout", Classifier{Mode: ModeNoisy, Device: dev, Noise: sim.NoiseModel{Readout: [2]float64{0.01, 0}}}, "device", ErrOption},
		{"with channels", Classifier{Mode: ModeNoisy, Device: dev, Channels: Channels{GlobalDepolarizing: 0.1}}, "device", ErrOption},
		{"state vector", Classifier{Mode: ModeNoisy, Device: dev, Method: sim.StateVector}, "simulator", ErrOption},
	} {
		err := tc.c.Validate()
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Key != tc.key || !errors.Is(err, tc.err) {
			t.Errorf("%s: %v, want an option error on %q", tc.name, err, tc.key)
		}
	}
	// Too many qubits for the device: 1 + 7 + 2 + 2 = 12 fit in 16, the
	// whole iris training part (135 rows: 1 + 8 + 2 + 2 = 13) too, digits'
	// 64 features with 8 rows need 1 + 3 + 6 + 4 = 14; a 4-qubit device
	// holds none of them.
	small, err := device.Parse([]byte(`name = "four"
qubits = 4
gates = "rz-sx-x-cx"
edges = [[0, 1], [1, 2], [2, 3]]
[qubit]
t1_us = 100
t2_us = 100
readout_p01 = 0
readout_p10 = 0
gate_error = 0
gate_ns = 30
[pair]
gate_error = 0
gate_ns = 300
`), "four.toml")
	if err != nil {
		t.Fatal(err)
	}
	f := firstFold(t, "iris", 10)
	c := &Classifier{Mode: ModeNoisy, Device: small, TrainSubset: 8}
	if err := c.Fit(f.Xtr, f.ytr, f.nClass); !errors.Is(err, ErrTooLarge) {
		t.Errorf("8 qubits on a 4-qubit device: %v, want ErrTooLarge", err)
	}
	// RowCircuit ignores the device (the circuit does not depend on it).
	ok := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8}
	if err := ok.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	if _, _, err := ok.RowCircuit(f.Xte.RawRowView(0), 0); err != nil {
		t.Errorf("RowCircuit with a device: %v", err)
	}
}
