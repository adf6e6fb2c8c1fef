package plan

import (
	"fmt"
	"slices"
	"strings"
	"time"

	"fringe/bench/modelkit"
	"fringe/datasets"
	"fringe/qkernel"
	"fringe/qkernel/sim"
)

// Cost is the estimated cost of a group of tasks (Plan.Estimate).
type Cost struct {
	Tasks, Fits int
	// Circuit reports an interference model: Qubits, CNOT and SingleQubit
	// describe the largest of its circuits (most qubits, then most CNOTs)
	// in the published decomposition's counts (circuit.RawResources, an
	// upper bound on every row's compiled circuit).
	Circuit                   bool
	Qubits, CNOT, SingleQubit int
	// Simulator names how the test rows are computed: "closed form",
	// "closed form + shots", or the simulator of a gate-level run ("state
	// vector", "density matrix", "trajectories (T)"), on a device with
	// its name and the routed two-qubit gates ("density matrix on heavy-27
	// (149 cx routed)"); several, joined by ", ", when datasets or grid
	// points differ. "" for classical models.
	Simulator string
	// Estimated is false when no task of the group has an estimate; Why
	// then says why (NotEstimated).
	Estimated bool
	Why       string
	// CPU is the estimated time of the estimated tasks, one thread (the
	// runner runs each task on one goroutine); Longest is the longest of
	// them.
	CPU, Longest time.Duration
}

// ModelCost is the cost of one model's tasks.
type ModelCost struct {
	Model      int // index into Spec.Models
	Name, Kind string
	Cost
}

// CellCost is the cost of one (dataset, pipeline, model) cell's tasks.
type CellCost struct {
	Dataset, Pipeline, Model int // indices into Plan.Datasets, Spec.Pipelines, Spec.Models
	Cost
}

// Estimate is the estimated cost of some of a plan's tasks: in all, by
// model (in spec order) and by cell (in task order).
type Estimate struct {
	Cost
	Models []ModelCost
	Cells  []CellCost
	// NotEstimated names the models without an estimate, in spec order;
	// CPU leaves them out.
	NotEstimated []string
}

// Wall is a rough wall-clock estimate of running the estimated tasks on
// workers concurrent workers: the CPU time shared evenly, but never less
// than the longest task (tasks are not split).
func (e *Estimate) Wall(workers int) time.Duration {
	w := time.Duration(max(1, workers))
	return max(e.CPU/w, e.Longest)
}

// NotEstimated is why a model kind has no cost estimate ("" when it has
// one). Interference models are estimated by qkernel.Classifier.EstimateCost;
// k-NN (brute-force distances, an upper bound for the k-d tree) and
// nearest centroid by their multiply-adds at the calibrated cost of one
// (sim.CostModel.Dot).
func NotEstimated(kind string) string {
	switch kind {
	case "interference", "knn", "centroid":
		return ""
	case "svm", "logreg":
		return "iterative solver: its iterations depend on the data"
	case "counts":
		return "reads measured counts"
	case "command":
		return "an external program"
	}
	return "no cost model"
}

// Estimate returns the estimated cost of the tasks (indices into Tasks;
// nil: every task) under the cost model cm (sim.Calibrate). A task's
// estimate is the fits it runs: its model on the training part (or, for
// a learning-curve task, its subsample) predicting the test part, and for
// a tuned model every grid point on every inner fold (inner parts of
// n(k-1)/k and n/k rows, tune.folds = k) plus the refit, taken as the
// dearest point's (the choice is not known before the run). Features are
// the pipeline's output width (an upper bound after pca). The estimate
// knows no data: it rests on the sizes alone, like the checks of New.
func (p *Plan) Estimate(cm *sim.CostModel, tasks []int) (*Estimate, error) {
	if cm == nil {
		return nil, fmt.Errorf("plan: estimate: no cost model")
	}
	if tasks == nil {
		tasks = make([]int, len(p.Tasks))
		for i := range tasks {
			tasks[i] = i
		}
	}
	e := &Estimate{}
	models := make([]ModelCost, len(p.Spec.Models))
	for mi, m := range p.Spec.Models {
		models[mi] = ModelCost{Model: mi, Name: m.Name, Kind: m.Kind}
	}
	cellAt := map[[3]int]int{}
	memo := map[costKey]fitCost{}
	for _, ti := range tasks {
		if ti < 0 || ti >= len(p.Tasks) {
			return nil, fmt.Errorf("plan: estimate: task %d outside the plan's %d", ti, len(p.Tasks))
		}
		t := p.Tasks[ti]
		fc, err := p.taskCost(cm, t, memo)
		if err != nil {
			return nil, fmt.Errorf("plan: estimate %s: %w", p.Key(t), err)
		}
		k := [3]int{t.Dataset, t.Pipeline, t.Model}
		ci, ok := cellAt[k]
		if !ok {
			ci = len(e.Cells)
			cellAt[k] = ci
			e.Cells = append(e.Cells, CellCost{Dataset: t.Dataset, Pipeline: t.Pipeline, Model: t.Model})
		}
		fits := p.Fits(t)
		why := NotEstimated(p.Spec.Models[t.Model].Kind)
		for _, c := range []*Cost{&e.Cost, &models[t.Model].Cost, &e.Cells[ci].Cost} {
			c.add(fc, fits, why)
		}
	}
	for _, m := range models {
		if m.Tasks == 0 {
			continue
		}
		e.Models = append(e.Models, m)
		if !m.Estimated {
			e.NotEstimated = append(e.NotEstimated, m.Name)
		}
	}
	if !e.Estimated {
		e.Why = "no model has an estimate"
	} else {
		e.Why = ""
	}
	return e, nil
}

// fitCost is the estimate of one task.
type fitCost struct {
	estimated bool
	time      time.Duration
	circuit   *qkernel.CostEstimate // largest circuit of the task's fits (interference only)
	simulator []string
}

func (c *Cost) add(f fitCost, fits int, why string) {
	c.Tasks++
	c.Fits += fits
	if f.estimated {
		c.Estimated = true
		c.Why = ""
		c.CPU += f.time
		c.Longest = max(c.Longest, f.time)
	} else if !c.Estimated {
		c.Why = why
	}
	if f.circuit != nil {
		c.Circuit = true
		r := f.circuit.Resources
		if f.circuit.Qubits > c.Qubits || f.circuit.Qubits == c.Qubits && r.CNOT > c.CNOT {
			c.Qubits, c.CNOT, c.SingleQubit = f.circuit.Qubits, r.CNOT, r.SingleQubit
		}
	}
	for _, s := range f.simulator {
		names := strings.Split(c.Simulator, ", ")
		if c.Simulator == "" {
			names = nil
		}
		if !slices.Contains(names, s) {
			c.Simulator = strings.Join(append(names, s), ", ")
		}
	}
}

// costKey identifies one fit's estimate: model, grid point and sizes.
type costKey struct {
	model, point                     int
	nTrain, nFeatures, nClass, nTest int
}

// taskCost estimates task t (see Estimate).
func (p *Plan) taskCost(cm *sim.CostModel, t Task, memo map[costKey]fitCost) (fitCost, error) {
	mm := p.Spec.Models[t.Model]
	if NotEstimated(mm.Kind) != "" {
		return fitCost{}, nil
	}
	d := p.Datasets[t.Dataset]
	nTrain := len(p.TrainRows(t))
	nTest := len(d.Splits[t.Split].Test)
	nClass := len(d.Data.Classes)
	pipe, err := datasets.ParsePipeline(p.Spec.Pipelines[t.Pipeline])
	if err != nil {
		return fitCost{}, err
	}
	configs := mm.Configs()
	// one estimates configuration i on a training part of n rows and a
	// test part of m rows.
	one := func(i, n, m int) (fitCost, error) {
		ms := configs[i]
		width, err := pipe.CheckDims(n, d.Data.Dim())
		if err != nil {
			return fitCost{}, err
		}
		if ms.Pipeline != "" {
			own, err := datasets.ParsePipeline(ms.Pipeline)
			if err != nil {
				return fitCost{}, err
			}
			if width, err = own.CheckDims(n, width); err != nil {
				return fitCost{}, err
			}
		}
		key := costKey{t.Model, i, n, width, nClass, m}
		if fc, ok := memo[key]; ok {
			return fc, nil
		}
		fc, err := fitEstimate(cm, ms, n, width, nClass, m)
		if err != nil {
			return fitCost{}, err
		}
		memo[key] = fc
		return fc, nil
	}
	if mm.Grid == nil {
		return one(0, nTrain, nTest)
	}
	k := p.Spec.Tune.Folds
	if k < 2 {
		k = 5
	}
	inTest := nTrain / k
	inTrain := nTrain - inTest
	var total fitCost
	var refit fitCost
	for i := range configs {
		in, err := one(i, inTrain, inTest)
		if err != nil {
			return fitCost{}, err
		}
		total.merge(in, k)
		out, err := one(i, nTrain, nTest)
		if err != nil {
			return fitCost{}, err
		}
		if i == 0 || out.time > refit.time {
			refit = out
		}
		total.merge(out, 0) // the circuit and simulator of every point
	}
	total.merge(refit, 1)
	return total, nil
}

// merge adds n times f's time to c and keeps the larger circuit and every
// simulator name.
func (c *fitCost) merge(f fitCost, n int) {
	c.estimated = c.estimated || f.estimated
	c.time += time.Duration(n) * f.time
	if f.circuit != nil && (c.circuit == nil || f.circuit.Qubits > c.circuit.Qubits ||
		f.circuit.Qubits == c.circuit.Qubits && f.circuit.Resources.CNOT > c.circuit.Resources.CNOT) {
		c.circuit = f.circuit
	}
	for _, s := range f.simulator {
		if !slices.Contains(c.simulator, s) {
			c.simulator = append(c.simulator, s)
		}
	}
}

// fitEstimate estimates one fit of configuration ms on nTrain rows of
// nFeatures features in nClass classes, predicting nTest rows.
func fitEstimate(cm *sim.CostModel, ms modelkit.Spec, nTrain, nFeatures, nClass, nTest int) (fitCost, error) {
	switch ms.Kind {
	case "interference":
		est, err := ms.Costed().EstimateCost(cm, nTrain, nFeatures, nClass, nTest)
		if err != nil {
			return fitCost{}, err
		}
		return fitCost{estimated: true, time: est.Total, circuit: &est, simulator: []string{simulatorName(ms.Interference, est)}}, nil
	case "knn":
		// Brute force: one distance of nFeatures terms per test and
		// training row; the k-d tree visits at most as many.
		return fitCost{estimated: true, time: time.Duration(cm.Dot * float64(nTest) * float64(nTrain) * float64(nFeatures))}, nil
	case "centroid":
		// The class means, then one distance per test row and class.
		return fitCost{estimated: true, time: time.Duration(cm.Dot * float64(nTrain+nTest*nClass) * float64(nFeatures))}, nil
	}
	return fitCost{}, nil
}

// simulatorName names how an interference configuration computes its test
// rows (see Cost.Simulator).
func simulatorName(c *qkernel.Classifier, est qkernel.CostEstimate) string {
	if !est.Simulated {
		if c.Shots > 0 {
			return "closed form + shots"
		}
		return "closed form"
	}
	name := est.Method.String()
	switch est.Method {
	case sim.StateVector:
		name = "state vector"
	case sim.DensityMatrix:
		name = "density matrix"
	case sim.Trajectories:
		t := c.Trajectories
		if t == 0 {
			t = sim.DefaultTrajectories
		}
		name = fmt.Sprintf("trajectories (%d)", t)
	}
	if est.Device != "" {
		name = fmt.Sprintf("%s on %s (%d %s routed)", name, est.Device, est.DeviceTwoQubit, est.DeviceGate)
	}
	return name
}
