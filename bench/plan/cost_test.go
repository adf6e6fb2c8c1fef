package plan_test

import (
	"slices"
	"strings"
	"testing"
	"time"

	"fringe/bench/internal/benchtest"
	"fringe/qkernel/sim"
)

// fixedCost is a cost model with round numbers instead of a calibration,
// so that every estimate below can be derived by hand: 2 ns per
// multiply-add, simulators at a few ns per entry.
func fixedCost() *sim.CostModel {
	return &sim.CostModel{
		StateVector: sim.Fit{Fixed: 50, Entry: 1}, Density: sim.Fit{Fixed: 100, Entry: 2}, DensityDamp: sim.Fit{Fixed: 100, Entry: 3},
		Trajectory: sim.Fit{Fixed: 60, Entry: 1.5}, UCRYControl: 0.5, Jump: 1, Sample: 10, Alloc: 0.25, Dot: 2,
	}
}

// TestEstimateSums checks the estimate of an untuned plan against sums
// written out here: k-NN is one distance of d terms per test and training
// row (Dot * n_test * n_train * d), nearest centroid the class means and
// one distance per test row and class (Dot * (n_train + n_test * C) * d),
// the interference model the sum of qkernel's EstimateCost over its
// tasks; SVMs are not estimated and stay out of the total.
func TestEstimateSums(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "cost"
seed = 3
datasets = ["iris"]
pipelines = ["std", "std+lift"]
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "noisy"
train_subset = 4
noise = { depolarizing = [0.001, 0.01] }
[[model]]
kind = "knn"
[[model]]
kind = "centroid"
[[model]]
kind = "svm"
`)
	cm := fixedCost()
	e, err := p.Estimate(cm, nil)
	if err != nil {
		t.Fatal(err)
	}
	if e.Tasks != len(p.Tasks) || e.Fits != len(p.Tasks) || len(p.Tasks) != 2*4*3 {
		t.Fatalf("%d tasks, %d fits; the plan has %d", e.Tasks, e.Fits, len(p.Tasks))
	}
	want := make([]time.Duration, 4)
	var longest time.Duration
	var qubits int
	for _, task := range p.Tasks {
		d := p.Datasets[task.Dataset]
		nTrain, nTest := len(d.Splits[task.Split].Train), len(d.Splits[task.Split].Test)
		width := 4 + task.Pipeline // iris has 4 features; lift adds one
		var c time.Duration
		switch task.Model {
		case 0:
			est, err := p.Spec.Models[0].Interference.EstimateCost(cm, nTrain, width, 3, nTest)
			if err != nil {
				t.Fatal(err)
			}
			c = est.Total
			qubits = max(qubits, est.Qubits)
		case 1:
			c = time.Duration(2 * float64(nTest*nTrain*width))
		case 2:
			c = time.Duration(2 * float64((nTrain+nTest*3)*width))
		case 3:
			continue
		}
		want[task.Model] += c
		longest = max(longest, c)
	}
	var total time.Duration
	for mi, m := range e.Models {
		if m.Model != mi || m.Tasks != 6 || m.Fits != 6 {
			t.Errorf("model %d: %+v", mi, m)
		}
		if mi == 3 {
			if m.Estimated || m.Why == "" || m.CPU != 0 {
				t.Errorf("svm: estimated %v (%q), %v", m.Estimated, m.Why, m.CPU)
			}
			continue
		}
		// Durations are whole nanoseconds of float sums: allow one per task.
		if diff := m.CPU - want[mi]; !m.Estimated || diff < -6 || diff > 6 {
			t.Errorf("model %s: estimate %v, want %v", m.Name, m.CPU, want[mi])
		}
		total += m.CPU
	}
	if e.CPU != total || e.Longest < longest-1 || e.Longest > longest+1 {
		t.Errorf("total %v longest %v; want %v and %v", e.CPU, e.Longest, total, longest)
	}
	if !slices.Equal(e.NotEstimated, []string{"svm-rbf-C1"}) {
		t.Errorf("not estimated: %v", e.NotEstimated)
	}
	m := e.Models[0]
	// train_subset 4 of 3 classes: ancilla 1 + index 2 + data 3 (lift: 5
	// features padded to 8) + class 2 = 8 qubits, derived by hand from the
	// register sizes of DESIGN.md.
	if !m.Circuit || m.Qubits != 8 || m.Qubits != qubits || m.CNOT == 0 || m.SingleQubit == 0 || m.Simulator != "density matrix" {
		t.Errorf("interference model: %+v", m)
	}
	if e.Models[1].Circuit || e.Models[1].Simulator != "" {
		t.Errorf("knn has a circuit: %+v", e.Models[1])
	}
	if len(e.Cells) != 8 || e.Cells[0].Tasks != 3 || e.Cells[7].Dataset != 0 || e.Cells[7].Pipeline != 1 || e.Cells[7].Model != 3 {
		t.Errorf("cells: %+v", e.Cells)
	}
	if e.Wall(1) != e.CPU || e.Wall(1000) != e.Longest {
		t.Errorf("wall with 1 worker %v (CPU %v), with 1000 %v (longest %v)", e.Wall(1), e.CPU, e.Wall(1000), e.Longest)
	}

	// A subset of the tasks.
	sub, err := p.Estimate(cm, []int{0, 3})
	if err != nil {
		t.Fatal(err)
	}
	if sub.Tasks != 2 || len(sub.Models) != 2 || sub.Models[0].Tasks != 1 || sub.Models[1].Model != 1 {
		t.Errorf("estimate of tasks 0 and 3: %+v", sub)
	}
	if _, err := p.Estimate(nil, nil); err == nil {
		t.Error("no cost model: no error")
	}
	if _, err := p.Estimate(cm, []int{len(p.Tasks)}); err == nil {
		t.Error("task outside the plan: no error")
	}
}

// TestEstimateTuned checks a tuned k-NN: every grid point on each of the
// tune.folds inner folds (inner parts of n - n/k and n/k rows) plus one
// refit; the fit count is Plan.Fits's.
func TestEstimateTuned(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "tuned"
seed = 3
datasets = ["iris"]
pipelines = ["std"]
[cv]
folds = 3
[tune]
folds = 3
[[model]]
kind = "knn"
k = [1, 3]
`)
	e, err := p.Estimate(fixedCost(), nil)
	if err != nil {
		t.Fatal(err)
	}
	var want time.Duration
	fits := 0
	for _, task := range p.Tasks {
		sp := p.Datasets[0].Splits[task.Split]
		n, m := len(sp.Train), len(sp.Test)
		in := n / 3
		// 2 points x 3 inner folds, then the refit on n rows, 4 features.
		want += time.Duration(2*3*2*float64(in*(n-in)*4)) + time.Duration(2*float64(m*n*4))
		fits += 1 + 2*3
	}
	if e.Fits != fits || e.Fits != p.FitsOf([]int{0, 1, 2}) {
		t.Errorf("%d fits, want %d", e.Fits, fits)
	}
	if diff := e.CPU - want; diff < -10 || diff > 10 {
		t.Errorf("estimate %v, want %v", e.CPU, want)
	}
}

// TestEstimateLearningCurve checks that a learning-curve task is
// estimated on its subsample.
func TestEstimateLearningCurve(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "curve"
seed = 3
datasets = ["iris"]
pipelines = ["std"]
[cv]
folds = 3
train_sizes = [0.5]
[[model]]
kind = "knn"
`)
	e, err := p.Estimate(fixedCost(), nil)
	if err != nil {
		t.Fatal(err)
	}
	var want time.Duration
	for _, task := range p.Tasks {
		m := len(p.Datasets[0].Splits[task.Split].Test)
		want += time.Duration(2 * float64(m*len(p.TrainRows(task))*4))
	}
	if e.Tasks != 6 || e.CPU < want-6 || e.CPU > want+6 {
		t.Errorf("%d tasks, estimate %v; want 6 and %v", e.Tasks, e.CPU, want)
	}
}

// TestEstimateDevice checks that a model on a device is estimated as its
// tasks run it: every row's circuit compiled to the device and its routed
// program simulated on the density matrix under the device's noise (not
// the closed form of the same keys without the device), with the device
// and the routed two-qubit gates named in the simulator column.
func TestEstimateDevice(t *testing.T) {
	p := benchtest.Plan(t, "t.toml", `
name = "device-cost"
seed = 3
datasets = ["iris"]
pipelines = ["std+l2"]
[cv]
folds = 3
[[model]]
kind = "interference"
mode = "noisy"
train_subset = 8
shots = 512
device = "heavy-27"
[[model]]
kind = "interference"
mode = "shots"
train_subset = 8
shots = 512
`)
	e, err := p.Estimate(fixedCost(), nil)
	if err != nil {
		t.Fatal(err)
	}
	dev, plain := e.Models[0], e.Models[1]
	if !strings.HasPrefix(dev.Simulator, "density matrix on heavy-27 (") || !strings.HasSuffix(dev.Simulator, " cx routed)") {
		t.Errorf("device model: simulator %q", dev.Simulator)
	}
	if plain.Simulator != "closed form + shots" {
		t.Errorf("shot model: simulator %q", plain.Simulator)
	}
	if !dev.Estimated || dev.CPU <= 10*plain.CPU {
		t.Errorf("device model estimated %v (%v), the closed form with shots %v", dev.Estimated, dev.CPU, plain.CPU)
	}
}
