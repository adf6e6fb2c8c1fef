package sim

import (
	"context"
	"fmt"
	"math/rand/v2"
	"runtime"
	"time"

	"gonum.org/v1/gonum/floats"

	"fringe/qkernel/circuit"
)

// Fit is a fitted cost per operation: Fixed nanoseconds plus Entry
// nanoseconds per register entry the operation visits.
type Fit struct {
	Fixed, Entry float64
}

// at returns the cost in nanoseconds of one operation on a register of
// entries entries.
func (f Fit) at(entries int) float64 { return f.Fixed + f.Entry*float64(entries) }

// CalPoint is one measurement of Calibrate: the method, the register size,
// the variant of gates timed and the measured nanoseconds per gate.
type CalPoint struct {
	Method  Method
	Qubits  int
	Variant string
	NsGate  float64
}

// CostModel is a calibrated cost model of the simulators (Calibrate). Every
// operation visits the register once, so its time is a fixed overhead plus
// a cost per register entry, with n the qubits in the register while the
// operation runs (idle qubits are left out, see the package documentation):
//
//	state vector, one operation:     StateVector.at(2^n) + UCRYControl * k * 2^n   (k controls of a UCRY, else 0)
//	density matrix, one noisy gate:  Density.at(4^n)      (DensityDamp with amplitude or phase damping)
//	trajectories, one gate, per trajectory: Trajectory.at(2^n) + Jump * 2^n * (damping steps)
//
// where a damping step is one amplitude- or phase-damping jump on one qubit
// (a norm pass and a rescaling pass; every qubit of a gate takes one per
// damping channel of the model). A run also allocates its register (Alloc
// per entry). Sampling shots costs Sample nanoseconds per outcome
// (sim.SampleCounts does not depend on the number of shots). The per-entry
// terms are taken as constant; registers beyond the second-level cache are
// somewhat slower per entry, so estimates are good to a small factor, not
// to a percent. Times are CPU time of one thread (on Linux; the wall clock
// elsewhere), so a loaded machine does not inflate the calibration; a run
// on such a machine takes longer than estimated by the share of the CPU it
// gets.
type CostModel struct {
	StateVector, Density, DensityDamp, Trajectory Fit
	// UCRYControl is the extra cost per amplitude and control qubit of a
	// one-pass uniformly controlled rotation (ns).
	UCRYControl float64
	// Jump is the cost per amplitude of one damping step of a trajectory (ns).
	Jump float64
	// Sample is the cost per outcome of one multinomial sample (ns).
	Sample float64
	// Alloc is the cost per entry of allocating a register and touching it
	// for the first time (ns; Simulate allocates one register per run).
	Alloc float64
	// Dot is the cost of one multiply-add of a float64 inner product (ns),
	// for the closed forms that need no simulation.
	Dot float64
	// Points are the measurements the fit rests on, in a fixed order.
	Points []CalPoint
}

// calibration sizes: two register sizes per simulator, small (mostly the
// fixed overhead) and large enough to be bound by the per-entry cost but
// still a few tens of microseconds per gate.
const (
	calSVSmall, calSVLarge  = 4, 14
	calDMSmall, calDMLarge  = 2, 7
	calTRSmall, calTRLarge  = 4, 13
	calUCRYQubits           = 12
	calUCRYFew, calUCRYMany = 2, 8 // controls
	calAllocEntries         = 1 << 18
	calRepeats              = 5 // repeats of every timing; the minimum is kept
)

// Calibrate times a few gates of each simulator at two small register
// sizes (state vector 4 and 14 qubits, density matrix 2 and 7,
// trajectories 4 and 13, a uniformly controlled rotation on 12 qubits with
// 2 and 8 controls, a damping step, a multinomial sample, the allocation of
// a 1 MiB register, inner products) and fits the model of CostModel:
// with times t1 and t2 per gate at entries N1 < N2, Entry = (t2 - t1) /
// (N2 - N1) and Fixed = t1 - Entry N1, each clamped at zero. Every timing
// is the minimum of calRepeats runs of a fixed gate sequence, so the
// structure (sizes, gates, points) is the same on every call while the
// numbers are this machine's. It takes a few milliseconds and returns
// ctx.Err() when cancelled.
func Calibrate(ctx context.Context) (*CostModel, error) {
	runtime.LockOSThread() // threadCPU times this thread
	defer runtime.UnlockOSThread()
	cm := &CostModel{}
	rng := rand.New(rand.NewPCG(1, 2))
	depol := NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}}
	damp := NoiseModel{Depolarizing: [2]float64{1e-3, 1e-2}, AmplitudeDamping: 1e-3, PhaseDamping: 1e-3}
	point := func(m Method, n int, variant string, ns float64) float64 {
		cm.Points = append(cm.Points, CalPoint{Method: m, Qubits: n, Variant: variant, NsGate: ns})
		return ns
	}

	// State vector: the six gates of calCircuit.
	sv := func(n int) (float64, error) {
		s, _ := NewState(n)
		ops := calCircuit(n, rng).Ops
		ns, err := timeOps(ctx, len(ops), func() {
			for _, op := range ops {
				s.ApplyOp(op)
			}
		})
		return point(StateVector, n, "ry+cx", ns), err
	}
	t1, err := sv(calSVSmall)
	if err != nil {
		return nil, err
	}
	t2, err := sv(calSVLarge)
	if err != nil {
		return nil, err
	}
	cm.StateVector = fit2(1<<calSVSmall, t1, 1<<calSVLarge, t2)

	// One-pass UCRY with few and many controls.
	ucry := func(k int) (float64, error) {
		s, _ := NewState(calUCRYQubits)
		ctrl := make([]int, k)
		angles := make([]float64, 1<<k)
		for i := range ctrl {
			ctrl[i] = i + 1
		}
		for i := range angles {
			angles[i] = rng.Float64()
		}
		ns, err := timeOps(ctx, 4, func() {
			for range 4 {
				s.ApplyUCRY(0, ctrl, angles)
			}
		})
		return point(StateVector, calUCRYQubits, fmt.Sprintf("ucry controls=%d", k), ns), err
	}
	u1, err := ucry(calUCRYFew)
	if err != nil {
		return nil, err
	}
	u2, err := ucry(calUCRYMany)
	if err != nil {
		return nil, err
	}
	cm.UCRYControl = max(0, (u2-u1)/(calUCRYMany-calUCRYFew)/float64(int(1)<<calUCRYQubits))

	// Density matrix: the same gates with noise.
	dm := func(n int, m NoiseModel, variant string) (float64, error) {
		c := calCircuit(n, rng)
		d, _ := NewDensity(n)
		all := make([]int, n)
		for q := range all {
			all[q] = q
		}
		lp := planLazyFrom(c.Ops, n, all, true)
		var runErr error
		ns, err := timeOps(ctx, len(c.Ops), func() {
			if e := applyDensity(ctx, d, d.Rho, lp, m); e != nil {
				runErr = e
			}
		})
		if err == nil {
			err = runErr
		}
		return point(DensityMatrix, n, variant, ns), err
	}
	d1, err := dm(calDMSmall, depol, "depolarizing")
	if err != nil {
		return nil, err
	}
	d2, err := dm(calDMLarge, depol, "depolarizing")
	if err != nil {
		return nil, err
	}
	cm.Density = fit2(1<<(2*calDMSmall), d1, 1<<(2*calDMLarge), d2)
	e1, err := dm(calDMSmall, damp, "damping")
	if err != nil {
		return nil, err
	}
	e2, err := dm(calDMLarge, damp, "damping")
	if err != nil {
		return nil, err
	}
	cm.DensityDamp = fit2(1<<(2*calDMSmall), e1, 1<<(2*calDMLarge), e2)

	// Trajectories: gates with depolarizing jumps (the jumps are rare, so
	// this is the gate and the draws), then damping steps alone.
	tr := func(n int) (float64, error) {
		s, _ := NewState(n)
		ops := calCircuit(n, rng).Ops
		ns, err := timeOps(ctx, len(ops), func() {
			for _, op := range ops {
				s.ApplyOp(op)
				if op.Gate == circuit.CNOT {
					s.noisy2(op.Controls[0], op.Target, depol, rng)
				} else {
					s.noisy1(op.Target, depol, rng)
				}
			}
		})
		return point(Trajectories, n, "ry+cx depolarizing", ns), err
	}
	r1, err := tr(calTRSmall)
	if err != nil {
		return nil, err
	}
	r2, err := tr(calTRLarge)
	if err != nil {
		return nil, err
	}
	cm.Trajectory = fit2(1<<calTRSmall, r1, 1<<calTRLarge, r2)
	{
		s, _ := NewState(calTRLarge)
		for q := range calTRLarge {
			s.Apply1(q, Matrix{{0.8, -0.6}, {0.6, 0.8}})
		}
		m := NoiseModel{AmplitudeDamping: 1e-3}
		ns, err := timeOps(ctx, 4, func() {
			for q := range 4 {
				s.damp(q*calTRLarge/4, m, rng)
			}
		})
		if err != nil {
			return nil, err
		}
		cm.Jump = point(Trajectories, calTRLarge, "damping step", ns) / float64(int(1)<<calTRLarge)
	}

	// Sampling: one multinomial sample over 16 outcomes.
	p := make([]float64, 16)
	for i := range p {
		p[i] = rng.Float64()
	}
	ns, err := timeOps(ctx, 16, func() { SampleCounts(p, 1000, rng) })
	if err != nil {
		return nil, err
	}
	cm.Sample = point(Auto, 4, "sample per outcome", ns)

	// Allocation and first touch of a 1 MiB register (one entry per 4 KiB
	// page written, as the first gate does).
	var sink []complex128
	ns, err = timeOps(ctx, calAllocEntries, func() {
		sink = make([]complex128, calAllocEntries)
		for i := 0; i < len(sink); i += 256 {
			sink[i] = 1
		}
	})
	if err != nil {
		return nil, err
	}
	cm.Alloc = point(Auto, 16, "allocate per entry", ns)

	// Inner products of 1024 terms (the closed forms).
	x := make([]float64, 1024)
	for i := range x {
		x[i] = rng.Float64()
	}
	var acc float64
	ns, err = timeOps(ctx, 16*len(x), func() {
		for range 16 {
			acc += floats.Dot(x, x)
		}
	})
	if err != nil {
		return nil, err
	}
	runtime.KeepAlive(acc)
	cm.Dot = point(Auto, 10, "multiply-add", ns)
	return cm, nil
}

// timeOps runs f calRepeats times after one warm-up run and returns the
// shortest CPU time (threadCPU) divided by ops, in nanoseconds; it returns
// ctx.Err() when cancelled.
func timeOps(ctx context.Context, ops int, f func()) (float64, error) {
	f()
	best := time.Duration(1 << 62)
	for range calRepeats {
		if err := ctx.Err(); err != nil {
			return 0, err
		}
		t := threadCPU()
		f()
		best = min(best, threadCPU()-t)
	}
	return float64(best.Nanoseconds()) / float64(ops), nil
}

// fit2 fits Fixed + Entry N through two points, both clamped at zero.
func fit2(n1 int, t1 float64, n2 int, t2 float64) Fit {
	e := max(0, (t2-t1)/float64(n2-n1))
	return Fit{Fixed: max(0, t1-e*float64(n1)), Entry: e}
}

// calCircuit returns the six gates Calibrate times on n >= 2 qubits: RY
// on qubits in the upper half and CNOTs from lower to upper qubits, the
// pattern of a decomposed classifier circuit (rotations on the data and
// class registers, controls on the ancilla and index registers).
func calCircuit(n int, rng *rand.Rand) *circuit.Circuit {
	c := &circuit.Circuit{NQubits: n, Regs: circuit.Layout{Ancilla: 0}}
	for _, q := range []int{n / 2, (3 * n) / 4, n - 1} {
		c.Ops = append(c.Ops, circuit.Op{Gate: circuit.RY, Target: q, Angle: rng.Float64() * 6.28})
	}
	for _, p := range [][2]int{{0, n / 2}, {n / 4, (3 * n) / 4}, {n / 2, n - 1}} {
		if p[0] != p[1] {
			c.Ops = append(c.Ops, circuit.Op{Gate: circuit.CNOT, Controls: []int{p[0]}, Target: p[1]})
		}
	}
	return c
}

// layerCircuit returns RY with random angles on every qubit, then CNOTs
// (q, q+1) down the line: one layer of the workload of
// ../shared/perf/numpy_dm.py, used by Calibrate and the benchmarks.
func layerCircuit(n int, rng *rand.Rand) *circuit.Circuit {
	c := &circuit.Circuit{NQubits: n, Regs: circuit.Layout{Ancilla: 0}}
	for q := range n {
		c.Ops = append(c.Ops, circuit.Op{Gate: circuit.RY, Target: q, Angle: rng.Float64() * 6.28})
	}
	for q := 0; q+1 < n; q++ {
		c.Ops = append(c.Ops, circuit.Op{Gate: circuit.CNOT, Controls: []int{q}, Target: q + 1})
	}
	return c
}

// Work is a simulation to estimate without a circuit: Gates operations on
// a register of Qubits qubits throughout.
type Work struct {
	// Method is StateVector, DensityMatrix or Trajectories (Auto is
	// resolved as Simulate does, from Noise and Qubits).
	Method Method
	Qubits int
	// Gates counts elementary gates for noisy runs (after Decompose) and
	// operations for the state vector.
	Gates int
	// Controls is the total number of controls of the uniformly controlled
	// rotations (state vector only).
	Controls int
	// Trajectories (Trajectories only; 0 means DefaultTrajectories).
	Trajectories int
	Noise        NoiseModel
	// Outcomes sampled once with shots (0: no sampling).
	Outcomes int
}

// Estimate returns the estimated duration of w under the model. It assumes
// every gate runs on the whole register; EstimateCircuit follows a
// circuit's idle qubits and is more accurate.
func (cm *CostModel) Estimate(w Work) time.Duration {
	m := resolve(w.Method, w.Qubits, w.Noise)
	ns := cm.opCost(m, w.Qubits, w.Noise) * float64(w.Gates)
	switch m {
	case StateVector:
		ns += cm.UCRYControl * float64(w.Controls) * float64(int(1)<<w.Qubits)
	case Trajectories:
		T := w.Trajectories
		if T == 0 {
			T = DefaultTrajectories
		}
		if !w.Noise.gateNoise() {
			T = 1
		}
		// A gate touches 1.5 qubits on average (common for these circuits:
		// about as many CNOTs as single-qubit gates), each with one step
		// per damping channel.
		ns = (ns + cm.Jump*float64(int(1)<<w.Qubits)*1.5*float64(w.Gates)*dampSteps(w.Noise)) * float64(T)
	}
	entries := 1 << w.Qubits
	if m == DensityMatrix {
		entries = 1 << (2 * w.Qubits)
	}
	ns += cm.Alloc*float64(entries) + cm.Sample*float64(w.Outcomes)
	return time.Duration(ns)
}

// resolve applies the automatic method choice.
func resolve(m Method, n int, noise NoiseModel) Method {
	if m != Auto {
		return m
	}
	switch {
	case !noise.gateNoise():
		return StateVector
	case n <= MaxDensityQubits:
		return DensityMatrix
	}
	return Trajectories
}

// dampSteps is the number of damping channels of the model (0, 1 or 2).
func dampSteps(m NoiseModel) float64 {
	s := 0.0
	if m.AmplitudeDamping != 0 {
		s++
	}
	if m.PhaseDamping != 0 {
		s++
	}
	return s
}

// opCost is the cost in ns of one operation on n qubits (no controls, no
// jumps).
func (cm *CostModel) opCost(m Method, n int, noise NoiseModel) float64 {
	switch m {
	case DensityMatrix:
		if dampSteps(noise) > 0 {
			return cm.DensityDamp.at(1 << (2 * n))
		}
		return cm.Density.at(1 << (2 * n))
	case Trajectories:
		return cm.Trajectory.at(1 << n)
	}
	return cm.StateVector.at(1 << n)
}

// EstimateCircuit returns the estimated duration of Simulate(c, opt): the
// operations as the chosen simulator runs them (decomposed under gate
// noise), each at the register size it runs on (idle qubits left out). It
// returns Simulate's errors for an invalid circuit, noise model or qubit
// count.
func (cm *CostModel) EstimateCircuit(c *circuit.Circuit, opt Options) (time.Duration, error) {
	if err := c.Validate(); err != nil {
		return 0, err
	}
	if err := opt.Noise.Validate(); err != nil {
		return 0, err
	}
	m, err := chooseMethod(c.NQubits, opt)
	if err != nil {
		return 0, err
	}
	ops := elementary(c, c.Ops, opt.Noise.gateNoise())
	ns := cm.opsCost(m, planLazy(ops, c.NQubits, m == DensityMatrix), opt.Noise)
	if m == Trajectories && opt.Noise.gateNoise() {
		T := opt.Trajectories
		if T == 0 {
			T = DefaultTrajectories
		}
		ns *= float64(T)
	}
	entries := 1 << c.NQubits
	if m == DensityMatrix {
		entries = 1 << (2 * c.NQubits)
	}
	ns += cm.Alloc * float64(entries)
	return time.Duration(ns), nil
}

// opsCost sums the cost of the scheduled operations of lp (one trajectory).
func (cm *CostModel) opsCost(m Method, lp *lazyPlan, noise NoiseModel) float64 {
	ns := 0.0
	for i, op := range lp.ops {
		if op.Gate == circuit.Measure {
			continue
		}
		k := lp.size[i]
		ns += cm.opCost(m, k, noise)
		switch m {
		case StateVector:
			if op.Gate == circuit.UCRY {
				ns += cm.UCRYControl * float64(len(op.Controls)) * float64(int(1)<<k)
			}
		case Trajectories:
			if noise.gateNoise() {
				ns += cm.Jump * float64(int(1)<<k) * float64(len(op.Qubits())) * dampSteps(noise)
			}
		}
	}
	return ns
}

// EstimateShared returns the estimated durations of NewShared(ctx, c, from,
// to, opt) (prepare) and of one Shared.Simulate of a circuit like c (run).
// It returns NewShared's errors for bad input.
func (cm *CostModel) EstimateShared(c *circuit.Circuit, from, to int, opt Options) (prepare, run time.Duration, err error) {
	if err := c.Validate(); err != nil {
		return 0, 0, err
	}
	if err := opt.Noise.Validate(); err != nil {
		return 0, 0, err
	}
	if from < 0 || from > to || to > len(c.Ops) {
		return 0, 0, fmt.Errorf("sim: shared range [%d,%d) outside the %d operations", from, to, len(c.Ops))
	}
	noisy := opt.Noise.gateNoise()
	pre := planLazy(elementary(c, c.Ops[:from], noisy), c.NQubits, true)
	mid := planLazyFrom(elementary(c, c.Ops[from:to], noisy), c.NQubits, pre.active, true)
	suffix := elementary(c, c.Ops[to:], noisy)
	inS := map[int]bool{c.Regs.Ancilla: true}
	for _, q := range c.Regs.Class {
		inS[q] = true
	}
	for _, op := range suffix {
		for _, q := range op.Qubits() {
			inS[q] = true
		}
	}
	ns := len(inS)
	t := 0
	for _, q := range mid.active {
		if inS[q] {
			t++
		}
	}
	// The suffix backwards, once per outcome: a noisy CNOT's adjoint takes
	// up to four passes (damping of each qubit, depolarizing, CNOT), a
	// single-qubit gate one.
	passes := 0.0
	for _, op := range suffix {
		switch {
		case op.Gate == circuit.Measure:
		case op.Gate == circuit.CNOT && noisy:
			passes += 1 + 2*min(1, dampSteps(opt.Noise))
			if opt.Noise.Depolarizing[1] != 0 {
				passes++
			}
		default:
			passes++
		}
	}
	outcomes := float64(int(2) << len(c.Regs.Class))
	back := outcomes * passes * cm.opCost(DensityMatrix, ns, opt.Noise)
	prepare = time.Duration(cm.opsCost(DensityMatrix, pre, opt.Noise) + back)
	// A run: the middle, the partial trace (4^t 2^r reads, about a pass of
	// 4^t entries each) and the inner products.
	r := len(mid.active) - t
	tail := float64(int(1)<<(2*t)) * (float64(int(1)<<r) + outcomes) * cm.Density.Entry
	alloc := cm.Alloc * float64(int(1)<<(2*len(mid.active)))
	run = time.Duration(cm.opsCost(DensityMatrix, mid, opt.Noise) + tail + alloc)
	return prepare, run, nil
}

// EstimateNoisy returns the estimated duration of SimulateNoisy(nc, opt)
// (opt.Method Auto resolved as SimulateNoisy resolves it). On the density
// matrix, which composes one-qubit gates and channels into pending
// superoperators and holds only the qubits entangled so far, it counts one
// noisy pass (DensityDamp: a gate with its channels) per two-qubit gate
// over the qubits joined at that point, and one per qubit for the pending
// operations at the end; with trajectories, every operation and each of
// its channels on the whole state vector, per trajectory.
func (cm *CostModel) EstimateNoisy(nc *NoisyCircuit, opt Options) (time.Duration, error) {
	if err := nc.validate(); err != nil {
		return 0, err
	}
	n := nc.NQubits
	m := opt.Method
	if m == Auto {
		m = DensityMatrix
		if n > MaxDensityQubits {
			m = Trajectories
		}
	}
	ns := 0.0
	switch m {
	case DensityMatrix:
		if n > MaxDensityQubits {
			return 0, fmt.Errorf("sim: %d qubits exceed the density-matrix limit of %d qubits", n, MaxDensityQubits)
		}
		joined := make([]bool, n)
		k := 0
		for _, t := range nc.Ops {
			qs := t.Op.Qubits()
			if t.Op.Gate == circuit.Measure || len(qs) < 2 {
				continue
			}
			for _, q := range qs {
				if !joined[q] {
					joined[q] = true
					k++
				}
			}
			ns += cm.DensityDamp.at(1 << (2 * k))
		}
		ns += float64(n) * cm.DensityDamp.at(1<<(2*max(k, 1)))
		ns += cm.Alloc * float64(int(1)<<(2*n))
	case Trajectories:
		T := opt.Trajectories
		if T == 0 {
			T = DefaultTrajectories
		}
		per := 0.0
		for _, t := range nc.Ops {
			if t.Op.Gate == circuit.Measure {
				continue
			}
			channels := 0
			for j := range 2 {
				if t.Before[j] != nil {
					channels++
				}
				if t.After[j] != nil {
					channels++
				}
			}
			per += cm.Trajectory.at(1<<n) + cm.Jump*float64(int(1)<<n)*float64(channels)
		}
		ns = per*float64(T) + cm.Alloc*float64(int(1)<<n)
	default:
		return 0, fmt.Errorf("sim: a noisy circuit runs on the density matrix or trajectories, not %v", m)
	}
	return time.Duration(ns), nil
}
