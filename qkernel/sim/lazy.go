package sim

import (
	"context"

	"fringe/qkernel/circuit"
)

// Idle qubits.
//
// A simulation starts in |0...0>, and a qubit that no operation has touched
// yet is still |0> (the noise models act only on the qubits of a gate), so
// the state is the state of the touched qubits tensored with |0...0> on the
// idle ones. The runners therefore keep only the touched qubits, in a
// compact register whose bit order is the circuit's qubit order restricted
// to them, and insert a qubit (in |0>) when the first operation reaches it.
// A classifier circuit touches its class register only after the data
// register is loaded, so that part of the circuit runs on a density matrix
// 4^q times smaller (2^q for a state vector), q the class qubits.
//
// The kernels compute every entry from the same inputs with the same
// arithmetic whatever the positions of the bits, and the entries that
// involve an idle qubit are exact zeros, which never change a sum; so a
// lazy run gives the eager run's result to the last bit (up to the sign of
// exact zeros). Before the outcome distribution is read, the remaining
// idle qubits are inserted and the register has the circuit's own layout.

// lazyPlan is the schedule of a lazy run: the operations with their qubits
// renumbered to compact bits, and before each the bits to insert.
type lazyPlan struct {
	n    int          // qubits of the circuit
	ops  []circuit.Op // renumbered operations (Controls freshly allocated)
	grow [][]int      // grow[i]: compact bits to insert, in order, before ops[i]
	tail []int        // bits to insert after the last operation
	size []int        // size[i]: compact qubits while ops[i] runs
	work []int        // work[i]: entries of the register while ops[i] runs (4^size or 2^size)
	// active holds the qubits touched by the operations (and those active
	// at the start), ascending: the compact register after the last
	// operation, before the tail.
	active []int
}

// knownGate reports whether the lazy planner knows every qubit the gate
// acts on (Target and Controls). Any other gate kind activates every qubit,
// so that a gate added later runs on the full register whatever fields it
// uses.
func knownGate(g circuit.Gate) bool {
	switch g {
	case circuit.H, circuit.X, circuit.RY, circuit.RZ, circuit.CNOT, circuit.Measure, circuit.UCRY:
		return true
	}
	return false
}

// planLazy schedules ops on n qubits, starting with every qubit idle.
// density selects the work measure (4^k entries for a density matrix, 2^k
// for a state vector).
func planLazy(ops []circuit.Op, n int, density bool) *lazyPlan {
	return planLazyFrom(ops, n, nil, density)
}

// planLazyFrom is planLazy starting with the qubits of active already
// touched (ascending).
func planLazyFrom(ops []circuit.Op, n int, active []int, density bool) *lazyPlan {
	p := &lazyPlan{n: n, ops: make([]circuit.Op, len(ops)), grow: make([][]int, len(ops)),
		size: make([]int, len(ops)), work: make([]int, len(ops))}
	on := make([]bool, n)
	for _, q := range active {
		on[q] = true
	}
	// rank returns the compact bit of the active qubit q.
	rank := func(q int) int {
		r := 0
		for j := 0; j < q; j++ {
			if on[j] {
				r++
			}
		}
		return r
	}
	k := len(active)
	insert := func(q int) int {
		on[q] = true
		k++
		return rank(q)
	}
	for i, op := range ops {
		var qs []int
		if knownGate(op.Gate) {
			qs = op.Qubits()
		} else {
			for q := range n {
				qs = append(qs, q)
			}
		}
		for _, q := range qs {
			if q >= 0 && q < n && !on[q] {
				p.grow[i] = append(p.grow[i], insert(q))
			}
		}
		m := op
		if knownGate(op.Gate) {
			m.Target = rank(op.Target)
			if op.Controls != nil {
				m.Controls = make([]int, len(op.Controls))
				for j, c := range op.Controls {
					m.Controls[j] = rank(c)
				}
			}
		}
		p.ops[i] = m
		p.size[i] = k
		p.work[i] = 1 << k
		if density {
			p.work[i] = 1 << (2 * k)
		}
	}
	for q := range n {
		if on[q] {
			p.active = append(p.active, q)
		}
	}
	for q := range n {
		if !on[q] {
			p.tail = append(p.tail, insert(q))
		}
	}
	return p
}

// growDensity inserts an idle qubit (in |0>) at bit b of the k-qubit
// density matrix held in rho[:4^k]; rho must have room for 4^(k+1) entries
// and zeros beyond 4^k. Entry r<<k | c moves to r'<<(k+1) | c' with a zero
// bit inserted at b in r and c; the map increases, so walking down from
// the top never overwrites an entry not yet moved.
func growDensity(rho []complex128, k, b int) {
	for i := 1<<(2*k) - 1; i >= 0; i-- {
		r, c := i>>k, i&(1<<k-1)
		j := insertZero(r, b)<<(k+1) | insertZero(c, b)
		v := rho[i]
		rho[i] = 0
		rho[j] = v
	}
}

// growState inserts an idle qubit at bit b of the k-qubit state held in
// amp[:2^k] (room and zeros as in growDensity).
func growState(amp []complex128, k, b int) {
	for i := 1<<k - 1; i >= 0; i-- {
		v := amp[i]
		amp[i] = 0
		amp[insertZero(i, b)] = v
	}
}

// tickWork is the work (register entries visited) between two checks of
// the context: about 10^5 entries, tens of microseconds.
const tickWork = 1 << 17

// ticker checks a context after every tickWork units of work, so that a
// long simulation stops promptly when it is cancelled while a short one
// pays almost nothing for the check.
type ticker struct {
	ctx  context.Context
	work int
}

// add counts w units of work and returns ctx.Err() when the budget is
// spent (nil otherwise).
func (t *ticker) add(w int) error {
	t.work += w
	if t.work < tickWork {
		return nil
	}
	t.work = 0
	return t.ctx.Err()
}
