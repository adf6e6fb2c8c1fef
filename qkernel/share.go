package qkernel

import (
	"context"
	"encoding/binary"
	"slices"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// Shared state preparation.
//
// The circuits of test rows with the same training set (the same subset,
// hence the same labels and weights) differ only in the operations that
// load the data register: the first operations (the ancilla's Hadamard and
// the index register) and the last ones (the class register, the final
// Hadamard) are the same. A gate-level noisy run with the density matrix
// therefore simulates every row through sim.Shared: the prefix forwards
// once, the suffix backwards once as observables on its own qubits, and
// per row only the middle. A Predict call keeps the prepared parts of each
// training set it meets (up to shareBudget bytes), so rows with the same
// training set prepare them once. Every row takes this path, shared or
// not, so a row's result does not depend on the other rows of the call;
// it agrees with a forward simulation of the whole circuit to rounding
// (within 1e-12, tested), not to the last bit.

// shareBudget bounds the memory of the prepared parts one Predict call keeps.
const shareBudget = 256 << 20

// shareCache holds the prepared parts of one Predict call, by training set.
type shareCache struct {
	held  map[string]*sim.Shared
	total int    // memory held (bytes)
	key   []byte // scratch for the key
}

// newShareCache returns the cache of a Predict call, or nil when the plan
// does not simulate with the density matrix in ModeNoisy.
func (c *Classifier) newShareCache(p *plan) *shareCache {
	if c.noShare || !p.gate || p.method != sim.DensityMatrix || c.Mode != ModeNoisy {
		return nil
	}
	return &shareCache{held: map[string]*sim.Shared{}}
}

// keyOf encodes the labels of a training set. The labels fix the weights
// (Weights) and hence every operation outside the data register.
func (sc *shareCache) keyOf(y []int) []byte {
	sc.key = sc.key[:0]
	for _, k := range y {
		sc.key = binary.AppendUvarint(sc.key, uint64(k))
	}
	return sc.key
}

// dataOps returns the range of operations that load the data register:
// from the first to the last operation whose target is a data qubit.
func dataOps(circ *circuit.Circuit) (from, to int) {
	from, to = -1, -1
	for i, op := range circ.Ops {
		if slices.Contains(circ.Regs.Data, op.Target) {
			if from < 0 {
				from = i
			}
			to = i + 1
		}
	}
	if from < 0 {
		return 0, 0
	}
	return from, to
}

// simulate runs the row's circuit (training labels y): through the
// prepared parts of its training set when the call shares them, else on
// its own.
func (sc *shareCache) simulate(ctx context.Context, y []int, circ *circuit.Circuit, opt sim.Options) (sim.Result, error) {
	if sc == nil {
		return sim.Simulate(ctx, circ, opt)
	}
	key := sc.keyOf(y)
	sh := sc.held[string(key)]
	if sh == nil {
		from, to := dataOps(circ)
		var err error
		if sh, err = sim.NewShared(ctx, circ, from, to, opt); err != nil {
			return sim.Result{}, err
		}
		// Memory: the prefix state and 2^(1+q) observables on the ancilla
		// and index qubits (an upper bound: 16 bytes an entry).
		t := 1 + len(circ.Regs.Index)
		need := (1 + 2<<len(circ.Regs.Class)) * 16 << (2 * t)
		if sc.total+need <= shareBudget {
			sc.held[string(key)] = sh
			sc.total += need
		}
	}
	return sh.Simulate(ctx, circ)
}
