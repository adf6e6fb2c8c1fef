package assess

import (
	"bytes"
	"context"
	"encoding/csv"
	"errors"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/spec"
	"fringe/qkernel/device"
	"fringe/results"
)

// cleanLine is an invented line of 12 qubits without any noise.
const cleanLine = `name = "clean"
qubits = 12
gates = "rz-sx-x-cx"
edges = [[0, 1], [1, 2], [2, 3], [3, 4], [4, 5], [5, 6], [6, 7], [7, 8], [8, 9], [9, 10], [10, 11]]
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

func deviceAssessment(t *testing.T, dev *device.Device, workers int) *results.Assessment {
	t.Helper()
	a, err := Run(context.Background(), Options{
		Datasets:  []spec.Dataset{{Name: "iris"}},
		Pipelines: []string{"std+l2"},
		Subsets:   []int{4, 8},
		Seed:      5, Folds: 5, Repeats: 1, Workers: workers,
		Device: dev, DeviceInstances: 12,
	})
	if err != nil {
		t.Fatal(err)
	}
	return a
}

// TestAssessDeviceNoiseless: on a noiseless device the simulated
// decisions are the exact ones (accuracy = exact accuracy on the same
// instances, nothing changed), every subset size is simulated on the
// instances asked for, and the routed program has at least the logical
// two-qubit gates, a budget below the logical one (more gates) and
// fidelity 1 (no error rates).
func TestAssessDeviceNoiseless(t *testing.T) {
	dev, err := device.Parse([]byte(cleanLine), "clean.toml")
	if err != nil {
		t.Fatal(err)
	}
	a := deviceAssessment(t, dev, 2)
	if a.Device != "clean" || a.DeviceInstances != 12 {
		t.Fatalf("device %q, %d instances", a.Device, a.DeviceInstances)
	}
	sims := 0
	for _, r := range a.Resources {
		d := r.Device
		if d == nil || !d.Fits {
			t.Fatalf("%+v: no device part", r)
		}
		if d.TwoQubit < r.CNOT || d.Fidelity != 1 || !(d.Budget <= r.NoiseBudget) {
			t.Errorf("train %d: routed %d two-qubit gates (logical %d), fidelity %v, budget %v (logical %v)", r.Train, d.TwoQubit, r.CNOT, d.Fidelity, d.Budget, r.NoiseBudget)
		}
		if r.Full {
			continue
		}
		sims++
		if d.Instances != 12 || d.Accuracy != d.Exact || d.Changed != 0 { // exact: counts of the same decisions
			t.Errorf("train %d: %d instances, accuracy %v, exact %v, changed %v", r.Train, d.Instances, d.Accuracy, d.Exact, d.Changed)
		}
	}
	if sims != 2 {
		t.Errorf("%d sizes simulated, want 2", sims)
	}
}

// TestAssessDeviceOutputs: with an embedded device the report gains its
// columns and section, deterministically for any worker count; without
// one, none of them appears.
func TestAssessDeviceOutputs(t *testing.T) {
	dev, err := device.Load("line-16")
	if err != nil {
		t.Fatal(err)
	}
	render := func(a *results.Assessment) map[string]string {
		out := map[string]string{}
		for name, w := range map[string]func(*bytes.Buffer) error{
			"csv": func(b *bytes.Buffer) error { return results.WriteAssessCSV(b, a) },
			"res": func(b *bytes.Buffer) error { return results.WriteAssessResourcesCSV(b, a) },
			"md":  func(b *bytes.Buffer) error { return results.WriteAssessMarkdown(b, a) },
			"tex": func(b *bytes.Buffer) error { return results.WriteAssessTeX(b, a) },
		} {
			var b bytes.Buffer
			if err := w(&b); err != nil {
				t.Fatal(err)
			}
			out[name] = b.String()
		}
		return out
	}
	one, two := render(deviceAssessment(t, dev, 1)), render(deviceAssessment(t, dev, 2))
	for k := range one {
		if one[k] != two[k] {
			t.Errorf("%s differs between 1 and 2 workers", k)
		}
	}
	rows, err := csv.NewReader(strings.NewReader(one["csv"])).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	head := strings.Join(rows[0], ",")
	for _, c := range []string{"device", "device_two_qubit", "device_swaps", "device_duration_us", "device_fidelity", "device_accuracy_k4", "device_exact_k8", "device_changed_k8", "device_instances"} {
		if !strings.Contains(","+head+",", ","+c+",") {
			t.Errorf("assess.csv lacks column %s", c)
		}
	}
	if len(rows[1]) != len(rows[0]) {
		t.Errorf("assess.csv row has %d cells, header %d", len(rows[1]), len(rows[0]))
	}
	for k, w := range map[string]string{"md": "## On device line-16", "tex": "tab:assess-device", "res": "device_accuracy"} {
		if !strings.Contains(one[k], w) {
			t.Errorf("%s lacks %q", k, w)
		}
	}
	// Without a device: none of it.
	plain, err := Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: "iris"}}, Pipelines: []string{"std+l2"}, Subsets: []int{4, 8}, Seed: 5, Folds: 5, Repeats: 1})
	if err != nil {
		t.Fatal(err)
	}
	for k, text := range render(plain) {
		for _, w := range []string{"device_", "On device", "assess-device", "line-16"} {
			if strings.Contains(text, w) {
				t.Errorf("%s without -device holds %q", k, w)
			}
		}
	}
	// A negative instance count is refused.
	_, err = Run(context.Background(), Options{Datasets: []spec.Dataset{{Name: "iris"}}, Device: dev, DeviceInstances: -1})
	var ie *input.Error
	if !errors.As(err, &ie) || ie.Key != "device-instances" {
		t.Errorf("-1 device instances: %v", err)
	}
}
