package qkernel

import (
	"fmt"
	"time"

	"fringe/qkernel/circuit"
	"fringe/qkernel/device"
	"fringe/qkernel/sim"
)

// CostEstimate is what a classifier configuration costs, known before a
// run (see EstimateCost).
type CostEstimate struct {
	// Qubits and Resources describe the circuit of one test row (gate
	// counts of the published decomposition, circuit.RawResources: an
	// upper bound on the row's circuit.Resources, whose dead gates depend
	// on the data), whatever the mode; only the simulated modes run it.
	Qubits    int
	Resources circuit.Resources
	// Simulated reports whether the rows are simulated gate by gate
	// (ModeCircuit, gate-level ModeNoisy); Method is then the simulator,
	// with sim.Auto resolved as Fit resolves it; else sim.Auto.
	Simulated bool
	Method    sim.Method
	// Device names the device a ModeNoisy run compiles every row's
	// circuit to ("" for none); DeviceTwoQubit is the native two-qubit
	// gate count of the routed circuit of the sizes, SWAPs included, and
	// DeviceGate that gate's name ("cx" or "cz").
	Device, DeviceGate string
	DeviceTwoQubit     int
	// PerRow is the estimated time of one test prediction, Total that of
	// nTest predictions (Fit excluded: it costs O(n d)).
	PerRow, Total time.Duration
}

// EstimateCost returns, without data, the circuit size, the simulator and
// the estimated cost of predicting nTest rows after fitting nTrain training
// rows of nFeatures features in nClass classes, under the cost model cm
// (sim.Calibrate). The classes are taken as equally large (the split of
// TrainSubset and the qubit count depend only on the sizes). It checks the
// options (Validate) and the limits Fit checks, returning errors that wrap
// ErrOption, ErrSubset, ErrTooLarge or ErrOneClass (fewer than two classes
// or training rows).
//
// The estimate sums, per row: the closed form (a few inner products of
// nFeatures terms per class or subset row); the shot sample (one
// multinomial over 2^q + 1 outcomes); and the simulation of the row's
// circuit along its idle-qubit schedule (sim.CostModel.EstimateCircuit),
// or, for a gate-level noisy run on the density matrix, one run of the
// middle of sim.Shared per row plus its preparation once per training set:
// once in all without TrainSubset, once per row with it (an upper bound:
// rows whose subsets have the same labels share it). Compiling the row's
// circuit (O(M d)) is not counted. On a device (Classifier.Device), a row
// costs its compilation to the device, timed once here on the circuit of
// the sizes, and the simulation of the routed program under the device's
// noise (sim.CostModel.EstimateNoisy). Estimates are CPU time of one thread;
// see sim.CostModel for their accuracy.
func (c *Classifier) EstimateCost(cm *sim.CostModel, nTrain, nFeatures, nClass, nTest int) (CostEstimate, error) {
	if err := c.Validate(); err != nil {
		return CostEstimate{}, err
	}
	switch {
	case cm == nil:
		return CostEstimate{}, fmt.Errorf("qkernel: estimate: no cost model")
	case nFeatures < 1 || nTest < 0:
		return CostEstimate{}, fmt.Errorf("qkernel: estimate: %d features and %d test rows: %w", nFeatures, nTest, ErrDim)
	case nClass < 2 || nTrain < 2:
		return CostEstimate{}, fmt.Errorf("qkernel: estimate: %d training rows in %d classes: %w", nTrain, nClass, ErrOneClass)
	}
	// A fitted twin with the sizes alone.
	e := *c
	e.n, e.d, e.nClass = nTrain, nFeatures, nClass
	e.count = make([]int, nClass)
	e.present = nil
	for k := range nClass {
		e.count[k] = nTrain / nClass
		if k < nTrain%nClass {
			e.count[k]++
		}
		if e.count[k] > 0 {
			e.present = append(e.present, k)
		}
	}
	p, err := e.makePlan()
	if err != nil {
		return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
	}
	circ, err := sizeCircuit(p.m, nFeatures, nClass)
	if err != nil {
		return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
	}
	// Raw counts: the circuit of sizes alone cannot know which gates a
	// row's data leaves dead, so the published decomposition's counts are
	// the estimate (an upper bound on every row's circuit.Resources).
	est := CostEstimate{Qubits: circ.NQubits, Resources: circ.RawResources(), Simulated: p.gate}

	// The closed form of every row: C inner products (whole set) or K
	// (subset), of nFeatures terms; the subset draw and the weights are of
	// the same order.
	terms := len(e.present) * nFeatures
	if c.TrainSubset > 0 {
		terms = 2 * p.m * nFeatures
	}
	row := cm.Dot * float64(terms)
	if c.Shots > 0 {
		row += cm.Sample * float64(int(1)<<p.qClass+1)
	}
	var once float64 // per Predict call
	if p.gate {
		est.Method = p.method
		noise := c.Noise
		noise.Readout = [2]float64{}
		if c.Mode == ModeCircuit {
			noise = sim.NoiseModel{}
		}
		opt := sim.Options{Noise: noise, Method: p.method, Trajectories: c.Trajectories}
		if c.Device != nil && c.Mode == ModeNoisy {
			t0 := time.Now()
			prog, err := device.Compile(circ, c.Device, device.Options{})
			compile := time.Since(t0)
			if err != nil {
				return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
			}
			nc, err := prog.Noisy()
			if err != nil {
				return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
			}
			t, err := cm.EstimateNoisy(nc, sim.Options{Method: p.method, Trajectories: c.Trajectories})
			if err != nil {
				return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
			}
			row += float64(compile + t)
			est.Device, est.DeviceGate, est.DeviceTwoQubit = c.Device.Name, prog.After.Gate, prog.After.TwoQubit
		} else if p.method == sim.DensityMatrix && c.Mode == ModeNoisy && !c.noShare {
			from, to := dataOps(circ)
			prep, run, err := cm.EstimateShared(circ, from, to, opt)
			if err != nil {
				return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
			}
			row += float64(run)
			if c.TrainSubset > 0 {
				row += float64(prep)
			} else {
				once = float64(prep)
			}
		} else {
			if p.method == sim.Trajectories {
				opt.Rng = rowRand(0, 0) // EstimateCircuit checks that one is set
			}
			t, err := cm.EstimateCircuit(circ, opt)
			if err != nil {
				return CostEstimate{}, fmt.Errorf("qkernel: estimate: %w", err)
			}
			row += float64(t)
		}
	}
	total := once + row*float64(nTest)
	est.Total = time.Duration(total)
	if nTest > 0 {
		est.PerRow = time.Duration(total / float64(nTest))
	}
	return est, nil
}

// sizeCircuit compiles a circuit of m training vectors of d features and
// nClass classes from placeholder data: the structure of a compiled circuit
// (its registers, operations and their qubits) depends only on these sizes.
func sizeCircuit(m, d, nClass int) (*circuit.Circuit, error) {
	train := make([][]float64, m)
	y := make([]int, m)
	for i := range train {
		train[i] = make([]float64, d)
		for j := range train[i] {
			train[i][j] = 1 + float64((i+j)%3)
		}
		y[i] = i % nClass
	}
	test := make([]float64, d)
	for j := range test {
		test[j] = 1 + float64(j%2)
	}
	return circuit.Compile(test, train, y, nClass, nil)
}
