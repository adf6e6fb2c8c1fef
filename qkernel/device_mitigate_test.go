package qkernel

import (
	"context"
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"

	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// readoutDevice is an invented line of 16 qubits whose only noise is a
// readout error that differs from qubit to qubit (p01 = 0.01 (i+1),
// p10 = 0.2 - 0.01 i on qubit i), so that mitigation with the wrong
// qubits' matrices cannot pass for the right ones.
func readoutDevice(t testing.TB) *device.Device {
	t.Helper()
	var p01, p10, edges []string
	for i := range 16 {
		p01 = append(p01, fmt.Sprintf("%.2f", 0.01*float64(i+1)))
		p10 = append(p10, fmt.Sprintf("%.2f", 0.2-0.01*float64(i)))
		if i > 0 {
			edges = append(edges, fmt.Sprintf("[%d, %d]", i-1, i))
		}
	}
	text := `name = "readout-line"
qubits = 16
gates = "rz-sx-x-cx"
edges = [` + strings.Join(edges, ", ") + `]
[qubit]
t1_us = inf
t2_us = inf
readout_p01 = [` + strings.Join(p01, ", ") + `]
readout_p10 = [` + strings.Join(p10, ", ") + `]
gate_error = 0
gate_ns = 30
[pair]
gate_error = 0
gate_ns = 300
`
	dev, err := device.Parse([]byte(text), "readout-line.toml")
	if err != nil {
		t.Fatal(err)
	}
	return dev
}

// TestDeviceMitigationExact: on a device whose only noise is readout,
// mitigation with each row's physical qubits' matrices recovers the
// noiseless (exact-mode) probabilities: the tensor-product inverse undoes
// the readout channel exactly, and the result is already a distribution,
// which the simplex projection leaves alone (1e-10: rounding over the
// routed program's gates, as TestDeviceNoiseless). The raw decision is
// kept in Detail.Raw and is visibly off (readout errors of 1 to 20%).
func TestDeviceMitigationExact(t *testing.T) {
	dev := readoutDevice(t)
	f := firstFold(t, "iris", 10)
	_, de := fitPredict(t, &Classifier{TrainSubset: 8, Seed: 5, Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	c := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 5, Balance: true, Mitigate: Mitigation{Readout: true}}
	_, dm := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	off := 0.0
	for i := range de {
		if dm[i].Raw == nil {
			t.Fatalf("row %d: no raw decision under mitigation", i)
		}
		if !scalar.EqualWithinAbs(dm[i].PAcc, de[i].PAcc, 1e-10) {
			t.Errorf("row %d: mitigated p_acc %v, noiseless %v", i, dm[i].PAcc, de[i].PAcc)
		}
		for k := range de[i].Probs {
			if !scalar.EqualWithinAbs(dm[i].Probs[k], de[i].Probs[k], 1e-10) {
				t.Errorf("row %d class %d: mitigated %v, noiseless %v", i, k, dm[i].Probs[k], de[i].Probs[k])
			}
		}
		off = math.Max(off, math.Abs(dm[i].Raw.PAcc-de[i].PAcc))
	}
	if off < 1e-3 {
		t.Errorf("raw p_acc within %v of the noiseless one: the readout errors did not act", off)
	}

	// Identity matrices per physical qubit: mitigation changes nothing.
	id := make([]Confusion, dev.N())
	for i := range id {
		id[i] = ReadoutConfusion(0, 0)
	}
	ci := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 5, Balance: true, Mitigate: Mitigation{Readout: true, Physical: id}}
	_, di := fitPredict(t, ci, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range di {
		if !scalar.EqualWithinAbs(di[i].PAcc, di[i].Raw.PAcc, 1e-12) {
			t.Errorf("row %d: identity mitigation moved p_acc from %v to %v", i, di[i].Raw.PAcc, di[i].PAcc)
		}
	}
}

// TestDeviceMitigationShots: with finite shots on the readout-only
// device, the mitigated class probabilities agree with the noiseless ones
// within the shot error: 6 standard errors of a proportion estimated from
// N_acc shots, sqrt(1/(4 N_acc)), times 3 for the variance that inverting
// three bits' confusion adds (1/(1 - p01 - p10) <= 1.3 per bit here).
func TestDeviceMitigationShots(t *testing.T) {
	dev := readoutDevice(t)
	f := firstFold(t, "iris", 10)
	_, de := fitPredict(t, &Classifier{TrainSubset: 8, Seed: 3, Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	c := &Classifier{Mode: ModeNoisy, Device: dev, TrainSubset: 8, Seed: 3, Balance: true, Shots: 200000, Mitigate: Mitigation{Readout: true}}
	_, dm := fitPredict(t, c, f.Xtr, f.ytr, f.nClass, f.Xte)
	for i := range de {
		tol := 6 * 3 * math.Sqrt(0.25/float64(dm[i].Shots))
		for k := range de[i].Probs {
			if d := math.Abs(dm[i].Probs[k] - de[i].Probs[k]); d > tol {
				t.Errorf("row %d class %d: mitigated %v, noiseless %v (|d| %.3g > %.3g)", i, k, dm[i].Probs[k], de[i].Probs[k], d, tol)
			}
		}
	}
}

// TestPredictCountsDevice: counts of every row's routed program under the
// readout-only device (its exact distribution times 10^8, rounded), read
// back with Mitigation.Device, give the noiseless probabilities: each
// row's circuit is compiled again to find the physical qubits of its
// bits. 1e-6: the rounding of the counts (5e-9 relative) amplified by the
// inverse of three confusion matrices.
func TestPredictCountsDevice(t *testing.T) {
	dev := readoutDevice(t)
	f := firstFold(t, "iris", 10)
	_, de := fitPredict(t, &Classifier{TrainSubset: 8, Seed: 7, Balance: true}, f.Xtr, f.ytr, f.nClass, f.Xte)
	c := &Classifier{TrainSubset: 8, Seed: 7, Balance: true, Mitigate: Mitigation{Readout: true, Device: dev}}
	if err := c.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	r, _ := f.Xte.Dims()
	counts := make([][]int, r)
	for i := range r {
		circ, _, err := c.RowCircuit(f.Xte.RawRowView(i), i)
		if err != nil {
			t.Fatal(err)
		}
		prog, err := device.Compile(circ, dev, device.Options{})
		if err != nil {
			t.Fatal(err)
		}
		res, err := prog.Simulate(context.Background(), sim.Options{})
		if err != nil {
			t.Fatal(err)
		}
		for _, p := range res.P {
			counts[i] = append(counts[i], int(math.Round(p*1e8)))
		}
	}
	_, det, err := c.PredictCounts(f.Xte, counts)
	if err != nil {
		t.Fatal(err)
	}
	for i := range det {
		if det[i].Raw == nil {
			t.Fatalf("row %d: no raw decision", i)
		}
		for k := range de[i].Probs {
			if !scalar.EqualWithinAbs(det[i].Probs[k], de[i].Probs[k], 1e-6) {
				t.Errorf("row %d class %d: mitigated counts %v, noiseless %v (raw %v)", i, k, det[i].Probs[k], de[i].Probs[k], det[i].Raw.Probs[k])
			}
		}
	}
	// Without a device or matrices the counts cannot be mitigated.
	bare := &Classifier{TrainSubset: 8, Seed: 7, Balance: true}
	if err := bare.Fit(f.Xtr, f.ytr, f.nClass); err != nil {
		t.Fatal(err)
	}
	bare.Mitigate = Mitigation{Readout: true}
	var oe *OptionError
	if _, _, err := bare.PredictCounts(f.Xte, counts); !errors.As(err, &oe) || oe.Key != "mitigate" {
		t.Errorf("counts mitigation without matrices or device: %v, want an option error on mitigate", err)
	}
}

// TestDeviceMitigationValidate: the mitigation options that contradict
// each other or the device are refused with the key "mitigate".
func TestDeviceMitigationValidate(t *testing.T) {
	dev := readoutDevice(t)
	other, _ := device.Load("line-16")
	id := ReadoutConfusion(0, 0)
	for _, tc := range []struct {
		name string
		c    Classifier
	}{
		{"physical without device", Classifier{Mode: ModeNoisy, Noise: sim.NoiseModel{Readout: [2]float64{0.1, 0.1}}, Mitigate: Mitigation{Readout: true, Physical: []Confusion{id}}}},
		{"physical wrong length", Classifier{Mode: ModeNoisy, Device: dev, Mitigate: Mitigation{Readout: true, Physical: []Confusion{id, id}}}},
		{"per bit and per qubit", Classifier{Mode: ModeNoisy, Device: dev, Mitigate: Mitigation{Readout: true, Confusion: []Confusion{id}, Physical: make([]Confusion, 16)}}},
		{"two devices", Classifier{Mode: ModeNoisy, Device: dev, Mitigate: Mitigation{Readout: true, Device: other}}},
		{"device without readout", Classifier{Mitigate: Mitigation{Device: dev}}},
		{"bad physical matrix", Classifier{Mode: ModeNoisy, Device: dev, Mitigate: Mitigation{Readout: true, Physical: append(make([]Confusion, 15), ReadoutConfusion(0.6, 0.6))}}},
	} {
		err := tc.c.Validate()
		var oe *OptionError
		if !errors.As(err, &oe) || oe.Key != "mitigate" || !errors.Is(err, ErrOption) {
			t.Errorf("%s: %v, want an option error on mitigate", tc.name, err)
		}
	}
	ok := Classifier{Mode: ModeNoisy, Device: dev, Mitigate: Mitigation{Readout: true, Device: dev}}
	if err := ok.Validate(); err != nil {
		t.Errorf("the classifier's own device as the mitigation device: %v", err)
	}
}
