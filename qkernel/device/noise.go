package device

import (
	"context"
	"fmt"
	"math"

	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// Noisy returns the program with the device's calibrated noise on every
// operation, for sim.SimulateNoisy (on the program's local qubits, as
// Compact). The noise model:
//
//   - Schedule: every gate starts as soon as its qubits are free (ASAP)
//     and takes its duration (Device.Qubits[q].NS, Edges[e].NS; a virtual
//     rz takes 0). All measurements happen together when the last gate
//     ends.
//   - Idle relaxation: a qubit that waits between two of its gates, or
//     after its last gate until the measurement, relaxes for that time
//     (sim.ThermalRelaxationKraus with its T1 and T2). Before its first
//     gate a qubit is |0>, which relaxation leaves unchanged.
//   - Gate noise: after the gate, a depolarizing channel on its qubits
//     and thermal relaxation of each of them over the gate's duration.
//     The error rate of the description is the average gate infidelity r
//     of the whole noisy gate; the depolarizing strength is what is left
//     after the relaxation's share (sim.DepolarizingForError with the
//     trace of the relaxation superoperator, two-qubit: the product of the
//     two), p = r d/(d-1) without relaxation (Nielsen 2002,
//     quant-ph/0205035); 0 if relaxation alone exceeds r. A virtual rz has
//     no noise.
//   - Readout: each measured qubit's (p01, p10).
//
// Units: T1 and T2 in microseconds, durations in nanoseconds (t/1000 us).
func (p *Program) Noisy() (*sim.NoisyCircuit, error) {
	d := p.Device
	n := len(p.Region)
	nc := &sim.NoisyCircuit{NQubits: n, Regs: cloneLayout(p.regs), Readout: make([][2]float64, n), Final: make([]*sim.Channel, n)}
	for i, q := range p.Region {
		nc.Readout[i] = [2]float64{d.Qubits[q].ReadoutP01, d.Qubits[q].ReadoutP10}
	}
	type key struct {
		q  int
		ns float64
	}
	cache := map[key]*sim.Channel{}
	traces := map[key]float64{}
	relax := func(q int, ns float64) (*sim.Channel, float64, error) {
		if ns <= 0 {
			return nil, 4, nil
		}
		k := key{q, ns}
		if ch, ok := cache[k]; ok {
			return ch, traces[k], nil
		}
		qb := d.Qubits[p.Region[q]]
		if math.IsInf(qb.T1, 1) && math.IsInf(qb.T2, 1) {
			cache[k], traces[k] = nil, 4
			return nil, 4, nil
		}
		ks, err := sim.ThermalRelaxationKraus(ns/1000, qb.T1, qb.T2)
		if err != nil {
			return nil, 0, fmt.Errorf("device: %s qubit %d: %w", d.Name, p.Region[q], err)
		}
		ch, err := sim.NewChannel(ks)
		if err != nil {
			panic(err) // relaxation Kraus operators are trace preserving
		}
		cache[k], traces[k] = ch, ch.S.ProcessTrace()
		return ch, traces[k], nil
	}
	ready := make([]float64, n)
	started := make([]bool, n)
	nc.Ops = make([]sim.TimedOp, 0, len(p.native))
	for _, g := range p.native {
		op := circuit.Op{Gate: g.kind, Target: int(g.t), Angle: g.angle}
		if g.two() {
			op.Controls = []int{int(g.c)}
		}
		if g.kind == circuit.Measure {
			continue // measured at the end, after the final idle relaxation
		}
		qs := [2]int{int(g.t), int(g.c)}
		nq := 1
		if g.two() {
			nq = 2
		}
		start := ready[qs[0]]
		if nq == 2 {
			start = math.Max(start, ready[qs[1]])
		}
		to := sim.TimedOp{Op: op}
		for j := range nq {
			q := qs[j]
			if started[q] && start > ready[q] {
				ch, _, err := relax(q, start-ready[q])
				if err != nil {
					return nil, err
				}
				to.Before[j] = ch
			}
		}
		ns := p.gateNS(g)
		virtual := g.kind == circuit.RZ && d.VirtualRZ
		if !virtual {
			tr := 1.0 // trace of the relaxation superoperator (a product over the qubits: a tensor product)
			for j := range nq {
				ch, t, err := relax(qs[j], ns)
				if err != nil {
					return nil, err
				}
				to.After[j] = ch
				tr *= t
			}
			r := d.Qubits[p.Region[qs[0]]].Error
			dim := 2
			if nq == 2 {
				r = d.Edges[d.EdgeIndex(p.Region[qs[0]], p.Region[qs[1]])].Error
				dim = 4
			}
			to.Depolarizing, _ = sim.DepolarizingForError(r, tr, dim)
		}
		for j := range nq {
			ready[qs[j]] = start + ns
			started[qs[j]] = true
		}
		nc.Ops = append(nc.Ops, to)
	}
	end := 0.0
	for _, t := range ready {
		end = math.Max(end, t)
	}
	for q := range n {
		if started[q] && end > ready[q] {
			ch, _, err := relax(q, end-ready[q])
			if err != nil {
				return nil, err
			}
			nc.Final[q] = ch
		}
	}
	for _, g := range p.native {
		if g.kind == circuit.Measure {
			nc.Ops = append(nc.Ops, sim.TimedOp{Op: circuit.Op{Gate: circuit.Measure, Target: int(g.t)}})
		}
	}
	return nc, nil
}

// Simulate runs the program under the device's calibrated noise (Noisy) and
// returns the joint (ancilla, class) distribution in the layout of
// sim.Simulate. opt.Method Auto runs the density matrix up to
// sim.MaxDensityQubits qubits and trajectories above (opt.Rng required);
// opt.Noise must be zero.
func (p *Program) Simulate(ctx context.Context, opt sim.Options) (sim.Result, error) {
	nc, err := p.Noisy()
	if err != nil {
		return sim.Result{}, err
	}
	return sim.SimulateNoisy(ctx, nc, opt)
}
