package device

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"fringe/qkernel/circuit"
)

// Options configures Compile. The zero value gives the defaults, those of
// Li, Ding & Xie (ASPLOS 2019) where they give one.
type Options struct {
	// ExtendedSet is the size of SABRE's extended set (0: 20).
	ExtendedSet int
	// ExtendedWeight is its weight W in the heuristic (0: 0.5).
	ExtendedWeight float64
	// Decay is the increment of a qubit's decay per swap (0: 0.001).
	Decay float64
	// Refine is the number of rounds of the reverse-traversal refinement of
	// the initial mapping (0: 1; negative: none, the placement is used as
	// it is). See Compile.
	Refine int
	// RefineGates is the number of two-qubit gates, from the start of the
	// circuit, that the refinement routes forward and backward (0: 16384;
	// negative: every gate, as Li, Ding & Xie do). The initial mapping
	// shapes the routing of a circuit's start; on the circuits `fringe
	// assess` builds by default for heavy-27 (70 circuits, 0.3k to 0.5M
	// CNOTs) the native two-qubit gates after routing total 4.87M with the
	// default and 4.83M with every gate (single circuits differ by up to
	// 20% either way: SWAP counts are that sensitive to the initial
	// mapping), while routing a long circuit forward and backward in full
	// triples the routing time.
	RefineGates int
	// Trials is the number of placements a circuit of at most
	// TrialGates two-qubit gates is routed from, keeping the program with
	// the fewest native two-qubit gates (then the lower depth, then the
	// shorter duration; ties to the earlier): the placement refined by
	// Refine rounds, the unrefined placement, and the placement refined
	// by 2, 3, ... rounds. 0: 5 when Refine is 0, else 1. Larger
	// circuits are routed once. SABRE's result depends on the initial
	// mapping; a few starts are cheap for the circuits a device runs.
	Trials int
}

// TrialGates is the largest circuit (in two-qubit gates) Compile routes
// from several placements (Options.Trials).
const TrialGates = 4096

// trials returns the refinement rounds of each trial for a circuit of
// two two-qubit gates.
func (o Options) trials(two int) []int {
	n := o.Trials
	if n == 0 {
		n = 1
		if o.Refine == 0 {
			n = 5
		}
	}
	if two > TrialGates {
		n = 1
	}
	out := []int{o.refine()}
	for k := 0; len(out) < n; k++ {
		if k == 0 {
			if o.refine() != 0 {
				out = append(out, 0)
			}
			continue
		}
		if k+1 != o.refine() {
			out = append(out, k+1)
		}
	}
	return out
}

func (o Options) extendedSet() int {
	if o.ExtendedSet > 0 {
		return o.ExtendedSet
	}
	return 20
}

func (o Options) extendedWeight() float64 {
	if o.ExtendedWeight > 0 {
		return o.ExtendedWeight
	}
	return 0.5
}

func (o Options) decay() float64 {
	if o.Decay > 0 {
		return o.Decay
	}
	return 0.001
}

func (o Options) refineGates() int {
	switch {
	case o.RefineGates < 0:
		return math.MaxInt
	case o.RefineGates == 0:
		return 16384
	}
	return o.RefineGates
}

func (o Options) refine() int {
	switch {
	case o.Refine < 0:
		return 0
	case o.Refine == 0:
		return 1
	}
	return o.Refine
}

// Resources are the cost of a circuit on a device.
type Resources struct {
	// Qubits is the number of qubits the circuit uses.
	Qubits int
	// TwoQubit counts the two-qubit gates (CNOT before compilation, the
	// family's cx or cz after), Gate names them ("cx" or "cz").
	TwoQubit int
	Gate     string
	// Swaps counts the SWAPs routing inserted (each is three two-qubit
	// native gates in TwoQubit, fewer where they cancel); 0 before.
	Swaps int
	// SingleQubit counts the one-qubit gates (virtual rz included);
	// Virtual counts the virtual rz among them (frame changes of no
	// duration and no error: see Device.VirtualRZ).
	SingleQubit  int
	Virtual      int
	Measurements int
	// Depth is the number of gate layers when every gate runs as early as
	// its qubits allow (measurements excluded).
	Depth int
	// DurationNS is the length in nanoseconds of the critical path of that
	// schedule with the device's gate durations (virtual rz: 0);
	// measurements excluded. Before compilation every one-qubit gate takes
	// the median single-qubit duration and every CNOT the median
	// two-qubit duration of the device.
	DurationNS float64
}

// Program is a circuit compiled to a device.
type Program struct {
	Device *Device
	// Regs are the logical circuit's registers (on logical qubits).
	Regs circuit.Layout
	// Region lists the physical qubits the program uses (the placement's
	// region); routing never leaves it.
	Region []int
	// Initial and Final map each logical qubit to its physical qubit
	// before the first and after the last gate (SWAPs move them).
	Initial, Final []int
	// Before are the resources of Logical, After those of Circuit.
	Before, After Resources

	native  []gate         // the routed native gates on local qubits 0..len(Region)-1
	regs    circuit.Layout // the registers' final local qubits
	logical []gate         // the decomposed logical circuit's gates (measurements included)
	nLog    int            // its qubits
}

// Logical returns the decomposed logical circuit the program was compiled
// from (circuit.Decompose of the input: dead gates removed), on logical
// qubits. Each call builds a new circuit (the program keeps its gates in
// a compact form, which the garbage collector need not scan).
func (p *Program) Logical() *circuit.Circuit {
	return &circuit.Circuit{NQubits: p.nLog, Regs: cloneLayout(p.Regs), Ops: toOps(p.logical, nil)}
}

// Circuit returns the native, routed circuit on the device's qubits
// (NQubits = Device.N()); its Regs give the physical qubits that hold the
// registers at the end, where they are measured. Each call builds a new
// circuit (for a large program it is the largest cost after routing).
func (p *Program) Circuit() *circuit.Circuit {
	phys := make([]int16, len(p.Region))
	for i, q := range p.Region {
		phys[i] = int16(q)
	}
	return &circuit.Circuit{NQubits: p.Device.N(), Regs: remapLayout(p.regs, p.Region), Ops: toOps(p.native, phys)}
}

// Compact returns the program on local qubits 0..len(Region)-1 (local
// qubit i is physical qubit Region[i]), with the registers at their final
// places: the form the simulators run, since qubits outside the region
// never change.
func (p *Program) Compact() *circuit.Circuit {
	return &circuit.Circuit{NQubits: len(p.Region), Regs: cloneLayout(p.regs), Ops: toOps(p.native, nil)}
}

// Compile compiles a circuit of package circuit (as built by
// circuit.Compile) to the device:
//
//  1. Decompose it (circuit.Decompose, read as DecomposeElementary:
//     Gray-code expansion, dead gates removed).
//  2. Place: choose a connected region of as many physical qubits as the
//     circuit has (Device.region) and map the logical qubits onto it,
//     the most interacting ones first, each where its two-qubit gates to
//     the placed ones are shortest (router.place).
//  3. Refine the initial mapping by the reverse-traversal technique of
//     Li, Ding & Xie (ASPLOS 2019): route the circuit's two-qubit gates
//     forward, then backward from the resulting mapping, and start from
//     the mapping the backward pass ends with; Options.Refine rounds.
//  4. Route with SABRE inside the region (router.route), inserting SWAPs.
//  5. Translate to the native family, CNOT by cx (reversed with
//     Hadamards on a directed edge) or cz between RY(-pi/2) and RY(pi/2),
//     SWAP by three CNOTs, and merge every run of one-qubit gates on a
//     qubit into one unitary re-synthesised natively (synth).
//  6. Cancel pairs of two-qubit gates by the rules of circuit.Simplify
//     (cancelPairs); when pairs cancel, merge the runs that meet again;
//     to a fixed point, which circuit.Simplify leaves unchanged (tested).
//
// Routing is deterministic. The routed program acts on the region's
// qubits as the logical circuit does on the logical qubits, with logical
// qubit q at physical qubit Final[q] at the end, up to a global phase.
// Errors: an invalid circuit, a circuit with more qubits than the largest
// connected part of the device (wrapping ErrTooSmall).
func Compile(c *circuit.Circuit, d *Device, opt Options) (*Program, error) {
	if err := c.Validate(); err != nil {
		return nil, err
	}
	elems := c.DecomposeElementary()
	n := c.NQubits
	region, err := d.region(n)
	if err != nil {
		return nil, err
	}
	r := newRouter(d, region, opt)
	// Measurements are terminal (circuit.Validate admits no gate after one),
	// so they are taken out of routing and written at the end, on the
	// qubits' final places: a SWAP may then pass through a qubit whose
	// measurement was due earlier.
	logGates := make([]gate, len(elems))
	for i, e := range elems {
		logGates[i] = gate{kind: e.Gate, t: int16(e.Target), c: int16(e.Control), angle: e.Angle}
	}
	elems = nil
	regs := cloneLayout(c.Regs)
	var measured []int16
	gates := make([]gate, 0, len(logGates))
	for _, g := range logGates {
		if g.kind == circuit.Measure {
			measured = append(measured, g.t)
			continue
		}
		gates = append(gates, g)
	}
	two := 0
	for _, g := range gates {
		if g.two() {
			two++
		}
	}
	logRes := make(chan Resources, 1)
	go func() { logRes <- d.logicalResources(logGates, n) }()
	place := r.place(gates, n)
	var best *Program
	for _, rounds := range opt.trials(two) {
		p := compileRounds(d, r, region, gates, measured, regs, place, rounds, two, opt)
		if best == nil || better(p.After, best.After) {
			best = p
		}
	}
	best.logical, best.nLog = logGates, n
	best.Before = <-logRes
	return best, nil
}

// better reports whether the routed resources a beat b: fewer two-qubit
// gates, then a lower depth, then a shorter duration.
func better(a, b Resources) bool {
	switch {
	case a.TwoQubit != b.TwoQubit:
		return a.TwoQubit < b.TwoQubit
	case a.Depth != b.Depth:
		return a.Depth < b.Depth
	}
	return a.DurationNS < b.DurationNS
}

// compileRounds refines the placement by the given rounds of reverse
// traversal, routes, translates and cancels: one trial of Compile.
func compileRounds(d *Device, r *router, region []int, gates []gate, measured []int16, regs circuit.Layout, place []int16, rounds, two int, opt Options) *Program {
	n := len(place)
	l2p := slices.Clone(place)
	if rounds > 0 {
		fwd := gates
		if limit := opt.refineGates(); limit < len(gates) {
			k := 0
			for i, g := range gates {
				if g.two() {
					if k++; k > limit {
						fwd = gates[:i]
						break
					}
				}
			}
		}
		bwd := slices.Clone(fwd)
		slices.Reverse(bwd)
		for range rounds {
			_, m, _ := r.route(fwd, l2p, false)
			_, l2p, _ = r.route(bwd, m, false)
		}
	}
	// Route, writing SWAP as three CNOTs (the first and last in a native
	// orientation), and cancel CNOT pairs on this routed form, where they
	// are found before the translation's one-qubit gates can stand between
	// them (CNOT pairs of a reversed orientation would otherwise meet only
	// after their Hadamards merged away); translate and merge the
	// one-qubit runs as routing goes (routeAndTranslate); then cancel the
	// native pairs that are left, repeating while pairs cancel.
	native := func(a, b int16) bool { return d.Native(region[a], region[b]) }
	// Every two-qubit gate ends at most two runs of at most five gates;
	// about three per two-qubit gate is typical of the rz-sx-x-cx family;
	// routing adds two-qubit gates (the merger grows by chunks beyond).
	m := newMerger(d.Family, n, 7*two+5*n)
	m.sched = newSchedule(d, region)
	out, final, swaps := routeAndTranslate(r, gates, l2p, measured, m, native)
	// Native pairs the routed form did not cancel meet only where a
	// one-qubit run between them merged into the identity: the routed
	// form's two-qubit gates, with a run between two of them on a qubit
	// wherever the routed form had a one-qubit gate there (and more: the
	// Hadamards of reversed CNOTs and the RY(±pi/2) around cz) unless it
	// vanished; the other rules of cancelPairs are those the routed form
	// was cancelled by. So cancelPairs runs only when a run vanished
	// (TestNoPairsLeft checks the result).
	cancelled := false
	if m.emptied {
		for cancelPairs(out, n) {
			out = remerge(out, d.Family, n)
			cancelled = true
		}
	}
	p := &Program{Device: d, Regs: regs, Region: slices.Clone(region), native: out,
		Initial: make([]int, n), Final: make([]int, n), regs: remap(regs, final)}
	for q := range n {
		p.Initial[q] = region[l2p[q]]
		p.Final[q] = region[final[q]]
	}
	if cancelled {
		p.After = p.nativeResources()
	} else {
		p.After = m.sched.result() // counted as the merger wrote
	}
	p.After.Swaps = swaps
	return p
}

// remerge rebuilds gates after cancelPairs: the one-qubit runs on each
// side of a dropped two-qubit gate merge into one run, re-synthesised;
// every other run is copied as it is.
func remerge(gs []gate, fam Family, n int) []gate {
	out := make([]gate, 0, len(gs)+len(gs)/8)
	runs := make([][]gate, n)
	merged := make([]bool, n)
	flush := func(q int16) {
		switch {
		case len(runs[q]) == 0:
		case merged[q]:
			u := ident2
			for _, g := range runs[q] {
				u = mul2(gateMat2(g.kind, g.angle), u)
			}
			out = synth(out, fam, u, q)
		default:
			out = append(out, runs[q]...)
		}
		runs[q], merged[q] = runs[q][:0], false
	}
	for _, g := range gs {
		switch {
		case g.kind == dropped:
			merged[g.t], merged[g.c] = true, true
		case g.two():
			flush(g.t)
			flush(g.c)
			out = append(out, g)
		case g.kind == circuit.Measure:
			flush(g.t)
			out = append(out, g)
		default:
			runs[g.t] = append(runs[g.t], g)
		}
	}
	for q := range runs {
		flush(int16(q))
	}
	return out
}

// dropped marks a gate removed by cancelPairs.
const dropped circuit.Gate = 255

// cancelPairs removes pairs of two-qubit gates that cancel, by the rules
// of circuit.Simplify for the native gates: two cx with the same control
// and target when every gate between them on the target is a cx onto it
// and every gate on the control a cx from it (they commute), and two cz on
// the same qubits when every gate between them on either is a cz (cz
// gates are diagonal and commute). It looks back at most window gates on
// each qubit (so the pass stays linear; a twin further back is kept).
// Removed gates get kind dropped. It reports whether any pair cancelled.
// One-qubit gates and measurements never cancel here and stop every
// search, so each qubit's list of live gates keeps one mark (-1) for a
// run of them instead of their indices.
func cancelPairs(gs []gate, n int) bool {
	const window = 64
	per := make([]int, n)
	for _, g := range gs {
		if g.two() {
			per[g.t] += 2
			per[g.c] += 2
		}
	}
	top := make([][]int32, n) // per qubit: live two-qubit gate indices, -1 for a run of others
	for q := range top {
		top[q] = make([]int32, 0, per[q]+2)
	}
	changed := false
	remove := func(q int16, i int32) {
		s := top[q]
		for k := len(s) - 1; k >= 0; k-- {
			if s[k] == i {
				top[q] = append(s[:k], s[k+1:]...)
				return
			}
		}
		panic("device: cancelPairs lost a gate") // broken internal invariant
	}
	// between reports whether every live gate after i on q satisfies ok,
	// looking back at most window gates.
	between := func(q int16, i int32, ok func(g gate) bool) bool {
		s := top[q]
		for k := len(s) - 1; k >= 0 && s[k] != i; k-- {
			if len(s)-k > window || s[k] < 0 || !ok(gs[s[k]]) {
				return false
			}
		}
		return true
	}
	for i := range gs {
		g := gs[i]
		if g.kind == dropped {
			continue
		}
		if !g.two() {
			if s := top[g.t]; len(s) == 0 || s[len(s)-1] >= 0 {
				top[g.t] = append(s, -1)
			}
			continue
		}
		match := int32(-1)
		var onT, onC func(gate) bool
		if g.kind == circuit.CNOT {
			onT = func(o gate) bool { return o.kind == circuit.CNOT && o.t == g.t }
			onC = func(o gate) bool { return o.kind == circuit.CNOT && o.c == g.c }
		} else {
			onT = func(o gate) bool { return o.kind == circuit.CZ }
			onC = onT
		}
		s := top[g.t]
		for k := len(s) - 1; k >= 0 && len(s)-k <= window; k-- {
			if s[k] < 0 {
				break
			}
			o := gs[s[k]]
			if !onT(o) {
				break
			}
			same := o.kind == g.kind && o.t == g.t && o.c == g.c
			if g.kind == circuit.CZ && o.t == g.c && o.c == g.t {
				same = true
			}
			if same {
				// The nearest twin: it cancels unless the other qubit is blocked.
				if between(g.c, s[k], onC) {
					match = s[k]
				}
				break
			}
		}
		if match >= 0 {
			gs[match].kind, gs[i].kind = dropped, dropped
			remove(g.t, match)
			remove(g.c, match)
			changed = true
			continue
		}
		top[g.t] = append(top[g.t], int32(i))
		top[g.c] = append(top[g.c], int32(i))
	}
	return changed
}

// toOps converts compact gates to operations, with qubits mapped through
// to (nil: unchanged); the controls share one backing array.
func toOps(gs []gate, to []int16) []circuit.Op {
	two := 0
	for _, g := range gs {
		if g.two() {
			two++
		}
	}
	q := func(x int16) int {
		if to != nil {
			return int(to[x])
		}
		return int(x)
	}
	ctl := make([]int, two)
	ops := make([]circuit.Op, len(gs))
	k := 0
	for i, g := range gs {
		op := circuit.Op{Gate: g.kind, Target: q(g.t), Angle: g.angle}
		if g.two() {
			ctl[k] = q(g.c)
			op.Controls = ctl[k : k+1 : k+1]
			k++
		}
		ops[i] = op
	}
	return ops
}

func cloneLayout(l circuit.Layout) circuit.Layout {
	return circuit.Layout{Ancilla: l.Ancilla, Index: slices.Clone(l.Index), Data: slices.Clone(l.Data), Class: slices.Clone(l.Class)}
}

// remap returns the layout with every qubit q replaced by to[q].
func remap(l circuit.Layout, to []int16) circuit.Layout {
	m := func(qs []int) []int {
		if len(qs) == 0 {
			return nil
		}
		out := make([]int, len(qs))
		for i, q := range qs {
			out[i] = int(to[q])
		}
		return out
	}
	return circuit.Layout{Ancilla: int(to[l.Ancilla]), Index: m(l.Index), Data: m(l.Data), Class: m(l.Class)}
}

func remapLayout(l circuit.Layout, to []int) circuit.Layout {
	t := make([]int16, len(to))
	for i, q := range to {
		t[i] = int16(q)
	}
	return remap(l, t)
}

// median returns the median of xs (the mean of the middle two for an even
// count); 0 for none.
func median(xs []float64) float64 {
	if len(xs) == 0 {
		return 0
	}
	s := slices.Clone(xs)
	slices.Sort(s)
	h := len(s) / 2
	if len(s)%2 == 1 {
		return s[h]
	}
	return (s[h-1] + s[h]) / 2
}

// oneNS returns the duration of a one-qubit gate g on physical qubit q.
func (d *Device) oneNS(g circuit.Gate, q int) float64 {
	if g == circuit.RZ && d.VirtualRZ {
		return 0
	}
	return d.Qubits[q].NS
}

// logicalResources counts the logical circuit, with the device's median
// durations.
func (d *Device) logicalResources(gs []gate, nq int) Resources {
	ns1 := make([]float64, d.N())
	for i, q := range d.Qubits {
		ns1[i] = q.NS
	}
	ns2 := make([]float64, len(d.Edges))
	for i, e := range d.Edges {
		ns2[i] = e.NS
	}
	m1, m2 := median(ns1), median(ns2)
	return count(gs, nq, "cx", func(g gate) float64 {
		switch {
		case g.two():
			return m2
		case g.kind == circuit.RZ && d.VirtualRZ:
			return 0
		}
		return m1
	})
}

// gateNS returns the duration of a native gate on local qubits.
func (p *Program) gateNS(g gate) float64 {
	d := p.Device
	if g.two() {
		return d.Edges[d.EdgeIndex(p.Region[g.t], p.Region[g.c])].NS
	}
	return d.oneNS(g.kind, p.Region[g.t])
}

// nativeResources counts the native program (schedule).
func (p *Program) nativeResources() Resources {
	s := newSchedule(p.Device, p.Region)
	for _, g := range p.native {
		s.add(g)
	}
	return s.result()
}

// schedule computes the resources of native gates on a region as they
// come: count with the device's durations, written out for the native
// gates (table lookups instead of a function call per gate: the program
// of a large circuit has millions), so that the merger can count while it
// writes.
type schedule struct {
	k        int
	ns1, ns2 []float64 // durations: one-qubit per local qubit, two-qubit per local pair
	virtual  bool
	r        Resources
	used     []bool
	level    []int32
	ready    []float64
}

func newSchedule(d *Device, region []int) *schedule {
	k := len(region)
	s := &schedule{k: k, ns1: make([]float64, k), ns2: make([]float64, k*k), virtual: d.VirtualRZ,
		r: Resources{Gate: d.Family.TwoQubit().String()}, used: make([]bool, k), level: make([]int32, k), ready: make([]float64, k)}
	for i, q := range region {
		s.ns1[i] = d.Qubits[q].NS
		for j, q2 := range region {
			if e := d.EdgeIndex(q, q2); e >= 0 {
				s.ns2[i*k+j] = d.Edges[e].NS
			}
		}
	}
	return s
}

func (s *schedule) add(g gate) {
	t := int(g.t)
	s.used[t] = true
	switch {
	case g.kind == circuit.Measure:
		s.r.Measurements++
	case g.two():
		c := int(g.c)
		s.used[c] = true
		s.r.TwoQubit++
		top := max(s.level[t], s.level[c]) + 1
		end := max(s.ready[t], s.ready[c]) + s.ns2[t*s.k+c]
		s.level[t], s.level[c], s.ready[t], s.ready[c] = top, top, end, end
	default:
		s.r.SingleQubit++
		ns := s.ns1[t]
		if s.virtual && g.kind == circuit.RZ {
			s.r.Virtual++
			ns = 0
		}
		s.level[t]++
		s.ready[t] += ns
	}
}

func (s *schedule) result() Resources {
	r := s.r
	for q := range s.k {
		if s.used[q] {
			r.Qubits++
		}
		r.Depth = max(r.Depth, int(s.level[q]))
		r.DurationNS = max(r.DurationNS, s.ready[q])
	}
	return r
}

// Fidelity estimates the probability that nothing of the routed program
// fails on the device: the product over its native gates of 1 - r (r the
// gate's error rate in the description: the qubit's for a one-qubit
// gate, the edge's for a two-qubit gate; a virtual rz has none) and over
// its measured qubits of 1 - (p01 + p10)/2 (the average readout error).
// It leaves out relaxation while qubits wait (Noisy simulates it) and
// treats errors as independent (common practice for a rough success
// estimate): an estimate, not a simulation.
func (p *Program) Fidelity() float64 {
	d := p.Device
	f := 1.0
	for _, g := range p.native {
		switch {
		case g.kind == circuit.Measure:
			q := d.Qubits[p.Region[g.t]]
			f *= 1 - (q.ReadoutP01+q.ReadoutP10)/2
		case g.two():
			f *= 1 - d.Edges[d.EdgeIndex(p.Region[g.t], p.Region[g.c])].Error
		case g.kind == circuit.RZ && d.VirtualRZ:
		default:
			f *= 1 - d.Qubits[p.Region[g.t]].Error
		}
	}
	return f
}

// count computes the resources of gates on n qubits with the ASAP
// schedule of durations dur.
func count(gs []gate, n int, gateName string, dur func(gate) float64) Resources {
	r := Resources{Gate: gateName}
	used := make([]bool, n)
	level := make([]int, n)
	ready := make([]float64, n)
	for _, g := range gs {
		used[g.t] = true
		if g.two() {
			used[g.c] = true
		}
		if g.kind == circuit.Measure {
			r.Measurements++
			continue
		}
		switch {
		case g.kind == circuit.SWAP:
			r.Swaps++
		case g.two():
			r.TwoQubit++
		default:
			r.SingleQubit++
		}
		top, start := level[g.t], ready[g.t]
		if g.two() {
			top, start = max(top, level[g.c]), math.Max(start, ready[g.c])
		}
		end := start + dur(g)
		level[g.t], ready[g.t] = top+1, end
		if g.two() {
			level[g.c], ready[g.c] = top+1, end
		}
		r.Depth = max(r.Depth, top+1)
		r.DurationNS = math.Max(r.DurationNS, end)
	}
	for _, u := range used {
		if u {
			r.Qubits++
		}
	}
	return r
}

// String formats the resources on one line.
func (r Resources) String() string {
	return fmt.Sprintf("%d qubits, %d %s, %d swaps, %d single-qubit, depth %d, %.0f ns", r.Qubits, r.TwoQubit, r.Gate, r.Swaps, r.SingleQubit, r.Depth, r.DurationNS)
}

// QASM returns the native routed program as OpenQASM text (version 3 or 2;
// circuit.QASM with Physical: one register q of the device's qubits, q[i]
// being device qubit i). The header comment names the device, the
// resources before and after compilation, and where every register qubit
// starts and ends; the measurements write ancilla_out and class_out from
// the registers' final places.
func (p *Program) QASM(version int) (string, error) {
	l := p.Regs
	var start, end []string
	name := func(reg string, qs []int) {
		for i, q := range qs {
			label := fmt.Sprintf("%s[%d]", reg, i)
			start = append(start, fmt.Sprintf("%s=q[%d]", label, p.Initial[q]))
			end = append(end, fmt.Sprintf("%s=q[%d]", label, p.Final[q]))
		}
	}
	name("ancilla", []int{l.Ancilla})
	name("index", l.Index)
	name("data", l.Data)
	name("class", l.Class)
	d := p.Device
	comment := []string{
		fmt.Sprintf("interference classifier compiled for device %s (%s; native %s)", d.Name, d.Note, d.Family),
		"logical: " + p.Before.String(),
		"routed:  " + p.After.String(),
		"start: " + strings.Join(start, " "),
		"end:   " + strings.Join(end, " "),
	}
	return circuit.QASM(p.Circuit(), circuit.QASMOptions{Version: version, Physical: true, Comment: comment})
}
