package qkernel

import (
	"fmt"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// MemoryBytes returns an estimate of the peak memory, in bytes, of Fit on
// nTrain rows of d features in nClass classes followed by a prediction of
// nTest rows with details, so that a planner can refuse a run before it
// starts. It counts
//
//   - the fitted model: the unit-length copy of the training rows
//     (8·nTrain·d), labels, weights and class lists (32 per row) and the
//     class centres (8·nClass·d);
//   - the details of the test rows: a Detail and nClass probabilities each
//     (64 + 8·nClass bytes per row);
//   - when a row's circuit is simulated gate by gate (ModeCircuit, or
//     ModeNoisy with gate noise, an explicit Method or a Device), the
//     simulator's memory for the circuit of q = 1 + index + data + class
//     qubits (circuit.RegisterSizes of min(nTrain, TrainSubset) vectors).
//     Every row's circuit is decomposed into one- and two-qubit gates,
//     about 2^a operations for the a = 1 + index + data qubits that load
//     the data register, held with the lazy runner's schedule: 1024·2^a
//     bytes (measured: TestMemoryBytes). With the density-matrix method
//     (Method DensityMatrix, or Auto at most sim.MaxDensityQubits qubits)
//     every row runs through sim.Shared, whose largest matrix is the
//     row's state on those a qubits (the class register is still idle,
//     see sim's lazy runs), with the scratch of the partial trace, a
//     quarter of it (20·4^a bytes in all), beside the prefix state on the
//     1 + index qubits and the 2^(1+class) observables on them
//     (16·(1 + 2^(1+class))·4^(1+index) bytes); with TrainSubset, whose
//     rows have training sets of their own, the prepared parts a call
//     keeps (shareBudget, 256 MiB) on top. Otherwise (state vectors, also
//     for trajectories, which run one after the other on one vector) one
//     vector of 2^q values (16·2^q bytes). A device's compiled circuit
//     runs whole: a density matrix of 4^q values (with the trace's
//     scratch, 20·4^q bytes) with the density-matrix method;
//
// doubled, because the Go runtime with its default GOGC = 100 lets the
// heap grow to twice the memory still in use before it collects. The
// exact and shot modes are linear in the rows; the gate-level modes grow
// with 4^q or 2^q, which is what makes them large. It also returns the
// qubit count q (0 when nothing is simulated gate by gate). It returns an
// error wrapping ErrOption for negative sizes.
func (c *Classifier) MemoryBytes(nTrain, nTest, d, nClass int) (bytes int64, qubits int, err error) {
	if nTrain < 0 || nTest < 0 || d < 0 || nClass < 0 {
		return 0, 0, fmt.Errorf("qkernel: memory estimate for %d training rows, %d test rows, %d features, %d classes: %w", nTrain, nTest, d, nClass, ErrOption)
	}
	n, dd, k := int64(nTrain), int64(d), int64(nClass)
	b := 8*n*dd + 32*n + 8*k*dd + int64(nTest)*(64+8*k)
	gate := c.Mode == ModeCircuit || c.Mode == ModeNoisy && (!c.Noise.IsZero() || c.Method != sim.Auto || c.Device != nil)
	if gate && nTrain > 0 {
		m := nTrain
		if c.TrainSubset > 0 {
			m = min(m, c.TrainSubset)
		}
		ni, nd, nc := circuit.RegisterSizes(m, max(d, 1), max(nClass, 1))
		qubits = 1 + ni + nd + nc
		density := c.Mode == ModeNoisy && (c.Method == sim.DensityMatrix || c.Method == sim.Auto && qubits <= sim.MaxDensityQubits)
		a := 1 + ni + nd
		b += 1024 << min(a, 50)
		switch {
		case density && c.Device == nil:
			b += 20<<min(2*a, 56) + 16*(1+1<<min(1+nc, 20))<<min(2*(1+ni), 36)
			if c.TrainSubset > 0 {
				b += shareBudget
			}
		case density:
			b += 20 << min(2*qubits, 56) // a device's circuit runs whole
		default:
			b += 16 << min(qubits, 56)
		}
	}
	return 2 * b, qubits, nil
}
