package device

import (
	"fmt"
	"slices"

	"fringe/qkernel/circuit"
)

// gate is the compact form of an operation inside the compiler: kind, the
// target t and, for a two-qubit gate, the other qubit c (the control of
// CNOT), else -1.
type gate struct {
	kind  circuit.Gate
	mark  uint8 // the streaming canceller's (stream.go)
	t, c  int16
	angle float64
}

func (g gate) two() bool { return g.c >= 0 }

// endpoint is one end of a front or extended-set gate while SWAP
// candidates are scored: the physical qubit at the other end, the gate's
// distance, whether it is in the extended set, and the next entry listed
// at the same qubit (-1: none).
type endpoint struct {
	other int16
	ext   bool
	d     int32
	next  int32
}

// toGates converts decomposed operations (no UCRY).
func toGates(ops []circuit.Op) []gate {
	out := make([]gate, len(ops))
	for i, op := range ops {
		g := gate{kind: op.Gate, t: int16(op.Target), c: -1, angle: op.Angle}
		if len(op.Controls) > 0 {
			g.c = int16(op.Controls[0])
		}
		out[i] = g
	}
	return out
}

// region chooses n connected physical qubits (the placement's first step):
// the seed is the qubit of highest degree in a connected part of at least
// n qubits, ties to the lower mean error of its edges, then the lower
// index; then the region grows by the outside neighbour with the most
// edges into it, ties to the lower mean error of those edges, then the
// lower index. Routing stays inside the region, so the routed program uses
// exactly n physical qubits. It returns the qubits in the order added.
func (d *Device) region(n int) ([]int, error) {
	comps := d.Components()
	big := 0
	okComp := make([]bool, d.N())
	for _, c := range comps {
		big = max(big, len(c))
		if len(c) >= n {
			for _, q := range c {
				okComp[q] = true
			}
		}
	}
	if big < n {
		return nil, fmt.Errorf("device: %s: the circuit needs %d qubits, the device's largest connected part has %d: %w", d.Name, n, big, ErrTooSmall)
	}
	meanErr := func(q int, in []bool) (links int, mean float64) {
		for _, r := range d.neighbours(q) {
			if in == nil || in[r] {
				links++
				mean += d.Edges[d.EdgeIndex(q, r)].Error
			}
		}
		if links > 0 {
			mean /= float64(links)
		}
		return links, mean
	}
	seed, bestDeg, bestErr := -1, -1, 0.0
	for q := range d.N() {
		if !okComp[q] {
			continue
		}
		deg, e := meanErr(q, nil)
		if deg > bestDeg || deg == bestDeg && e < bestErr {
			seed, bestDeg, bestErr = q, deg, e
		}
	}
	in := make([]bool, d.N())
	in[seed] = true
	out := []int{seed}
	for len(out) < n {
		pick, pl, pe := -1, -1, 0.0
		for q := range d.N() {
			if in[q] {
				continue
			}
			l, e := meanErr(q, in)
			if l == 0 {
				continue
			}
			if l > pl || l == pl && e < pe {
				pick, pl, pe = q, l, e
			}
		}
		in[pick] = true
		out = append(out, pick)
	}
	return out, nil
}

// router holds the coupling graph of a region in local indices 0..k-1.
type router struct {
	k    int
	adj  [][]int16
	dist []int32 // k*k hop distances inside the region
	opt  Options
}

func newRouter(d *Device, region []int, opt Options) *router {
	k := len(region)
	local := make(map[int]int16, k)
	for i, q := range region {
		local[q] = int16(i)
	}
	r := &router{k: k, adj: make([][]int16, k), dist: make([]int32, k*k), opt: opt}
	for i, q := range region {
		for _, nb := range d.neighbours(q) {
			if j, ok := local[nb]; ok {
				r.adj[i] = append(r.adj[i], j)
			}
		}
		slices.Sort(r.adj[i])
	}
	queue := make([]int16, 0, k)
	for s := range k {
		row := r.dist[s*k : (s+1)*k]
		for i := range row {
			row[i] = -1
		}
		row[s] = 0
		queue = append(queue[:0], int16(s))
		for len(queue) > 0 {
			q := queue[0]
			queue = queue[1:]
			for _, nb := range r.adj[q] {
				if row[nb] < 0 {
					row[nb] = row[q] + 1
					queue = append(queue, nb)
				}
			}
		}
	}
	return r
}

func (r *router) d(a, b int16) int32 { return r.dist[int(a)*r.k+int(b)] }

// place assigns logical qubits to the region's local qubits: logical
// qubits in order of interaction (the one with the most two-qubit gates
// first, then repeatedly the unplaced one with the most gates to those
// placed, ties to more gates in total, then the lower index), each on the
// free local qubit that minimises sum_b w(a, b) dist(p, pos(b)) over the
// placed qubits b (w: two-qubit gate counts), ties to more neighbours in
// the region, then the earlier qubit of the region. It returns l2p.
func (r *router) place(gates []gate, n int) []int16 {
	w := make([]int, n*n)
	total := make([]int, n)
	for _, g := range gates {
		if g.two() {
			w[int(g.t)*n+int(g.c)]++
			w[int(g.c)*n+int(g.t)]++
			total[g.t]++
			total[g.c]++
		}
	}
	l2p := make([]int16, n)
	for i := range l2p {
		l2p[i] = -1
	}
	used := make([]bool, r.k)
	toPlaced := make([]int, n)
	for step := range n {
		a := -1
		for q := range n {
			if l2p[q] >= 0 {
				continue
			}
			if a < 0 || toPlaced[q] > toPlaced[a] || toPlaced[q] == toPlaced[a] && total[q] > total[a] {
				a = q
			}
		}
		best, bestCost := int16(-1), 0
		for p := range int16(r.k) {
			if used[p] {
				continue
			}
			cost := 0
			if step > 0 {
				for b := range n {
					if l2p[b] >= 0 && w[a*n+b] > 0 {
						cost += w[a*n+b] * int(r.d(p, l2p[b]))
					}
				}
			}
			if best < 0 || cost < bestCost || cost == bestCost && len(r.adj[p]) > len(r.adj[best]) {
				best, bestCost = p, cost
			}
		}
		l2p[a] = best
		used[best] = true
		for b := range n {
			toPlaced[b] += w[a*n+b]
		}
	}
	return l2p
}

// route maps the logical gates onto the region with SWAP insertion by the
// SABRE heuristic of Li, Ding & Xie, "Tackling the qubit mapping problem
// for NISQ-era quantum devices", ASPLOS 2019 (arXiv:1809.02573, identifier recalled from memory). The
// two-qubit gates form a dependency graph (each follows the previous
// two-qubit gate on each of its qubits; one-qubit gates follow their qubit,
// see below); the front layer F holds the gates whose predecessors have
// run. Every front gate on coupled qubits runs; when none can, one SWAP on
// an edge touching a front gate's qubit is inserted, the one minimising
//
//	H = max(decay(q1), decay(q2)) * ( sum_{g in F} D(g)/|F| + W sum_{g in E} D(g)/|E| )
//
// with D(g) the hop distance of g's qubits after the swap and E the
// extended set: the first ExtendedSet two-qubit gates reached from F's
// successors breadth first. decay(q) grows by Decay for every swap on q
// and resets to 1 when a gate runs and after every 5 swaps. Ties go to the
// first candidate in a fixed order (front gates in order, their two qubits,
// neighbours ascending), so routing is deterministic. If 4k swaps pass
// without a gate running (k the region size), the first front gate is
// brought together along a shortest path (a release valve against
// livelock). It returns the routed gates on local qubits (when emit), the
// final mapping and the number of SWAPs.
//
// With a sink (emit true), the routed gates go to sink in order instead
// of the returned slice (which is then nil).
func (r *router) route(all []gate, l2p []int16, emit bool, sink ...func(gate)) ([]gate, []int16, int) {
	n := len(l2p)
	l2p = slices.Clone(l2p)
	// Only two-qubit gates enter the dependency graph. The one-qubit gates
	// of each logical qubit wait in order and are written, on the qubit's
	// place at that time, just before the qubit's next two-qubit gate (or
	// at the end): on each qubit the order is kept, and a one-qubit gate
	// commutes with everything on other qubits.
	var ones [][]gate   // per logical qubit, its one-qubit gates in order
	var upto [][2]int32 // per two-qubit gate: one-qubit gates due on (t, c) before it
	nTwo := 0
	if emit {
		per := make([]int, n)
		for _, g := range all {
			if g.two() {
				nTwo++
			} else {
				per[g.t]++
			}
		}
		ones = make([][]gate, n)
		for q := range ones {
			ones[q] = make([]gate, 0, per[q])
		}
		upto = make([][2]int32, 0, nTwo)
	} else {
		for _, g := range all {
			if g.two() {
				nTwo++
			}
		}
	}
	gates := make([]gate, 0, nTwo)
	for _, g := range all {
		switch {
		case g.two():
			gates = append(gates, g)
			if emit {
				upto = append(upto, [2]int32{int32(len(ones[g.t])), int32(len(ones[g.c]))})
			}
		case emit:
			ones[g.t] = append(ones[g.t], g)
		}
	}
	done := make([]int32, n) // one-qubit gates written per logical qubit
	var out []gate
	put := func(g gate) { out = append(out, g) }
	if len(sink) > 0 {
		put = sink[0]
	}
	writeOnes := func(q int16, until int32) {
		for _, g := range ones[q][done[q]:until] {
			g.t = l2p[q]
			put(g)
		}
		done[q] = until
	}
	p2l := make([]int16, r.k)
	for i := range p2l {
		p2l[i] = -1
	}
	for q, p := range l2p {
		p2l[p] = int16(q)
	}
	N := len(gates)
	succ := make([][2]int32, N)
	indeg := make([]uint8, N)
	last := make([]int32, n)
	for i := range last {
		last[i] = -1
	}
	link := func(j, i int32) {
		if succ[j][0] < 0 {
			succ[j][0] = i
		} else {
			succ[j][1] = i
		}
		indeg[i]++
	}
	for i, g := range gates {
		succ[i] = [2]int32{-1, -1}
		p1 := last[g.t]
		if p1 >= 0 {
			link(p1, int32(i))
		}
		last[g.t] = int32(i)
		if g.two() {
			if p2 := last[g.c]; p2 >= 0 && p2 != p1 {
				link(p2, int32(i))
			}
			last[g.c] = int32(i)
		}
	}
	if emit && len(sink) == 0 {
		out = make([]gate, 0, len(all)+len(all)/2)
	}
	front := make([]int32, 0, 16)
	next := make([]int32, 0, 16)
	for i := range N {
		if indeg[i] == 0 {
			front = append(front, int32(i))
		}
	}
	E := r.opt.extendedSet()
	W := r.opt.extendedWeight()
	delta := r.opt.decay()
	decay := make([]float64, r.k)
	resetDecay := func() {
		for i := range decay {
			decay[i] = 1
		}
	}
	resetDecay()
	seen := make([]uint32, N) // stamps for the extended set search
	stamp := uint32(0)
	cand := make([][2]int16, 0, 32)
	candSeen := make([]uint32, r.k*r.k)
	candStamp := uint32(0)
	ends := make([]endpoint, 0, 64)
	head := make([]int32, r.k) // per physical qubit: its first entry in ends, -1 none
	for i := range head {
		head[i] = -1
	}
	touched := make([]int16, 0, 64)
	ext := make([]int32, 0, E)
	queue := make([]int32, 0, 64)
	swaps, stuck, sinceReset := 0, 0, 0
	first := true
	extended := func(ext []int32) []int32 {
		stamp++
		queue = queue[:0]
		for _, gi := range front {
			seen[gi] = stamp
		}
		for _, gi := range front {
			for _, s := range succ[gi] {
				if s >= 0 && seen[s] != stamp {
					seen[s] = stamp
					queue = append(queue, s)
				}
			}
		}
		for h := 0; h < len(queue) && len(ext) < E; h++ {
			gi := queue[h]
			ext = append(ext, gi)
			for _, s := range succ[gi] {
				if s >= 0 && seen[s] != stamp {
					seen[s] = stamp
					queue = append(queue, s)
				}
			}
		}
		return ext
	}

	doSwap := func(p, q int16) {
		a, b := p2l[p], p2l[q]
		p2l[p], p2l[q] = b, a
		if a >= 0 {
			l2p[a] = q
		}
		if b >= 0 {
			l2p[b] = p
		}
		if emit {
			put(gate{kind: circuit.SWAP, t: q, c: p})
		}
		swaps++
	}
	for len(front) > 0 {
		// Run everything that can run.
		ran := false
		for progress := true; progress; {
			progress = false
			next = next[:0]
			for _, gi := range front {
				g := gates[gi]
				if r.d(l2p[g.t], l2p[g.c]) != 1 {
					next = append(next, gi)
					continue
				}
				if emit {
					writeOnes(g.t, upto[gi][0])
					writeOnes(g.c, upto[gi][1])
					pg := g
					pg.t, pg.c = l2p[g.t], l2p[g.c]
					put(pg)
				}
				progress, ran = true, true
				for _, s := range succ[gi] {
					if s >= 0 {
						indeg[s]--
						if indeg[s] == 0 {
							next = append(next, s)
						}
					}
				}
			}
			front, next = next, front
		}
		if len(front) == 0 {
			break
		}
		if ran {
			resetDecay()
			stuck, sinceReset = 0, 0
		}
		if stuck >= 4*r.k {
			// Release valve: walk the first front gate's target towards its control.
			g := gates[front[0]]
			for r.d(l2p[g.t], l2p[g.c]) > 1 {
				p := l2p[g.t]
				for _, nb := range r.adj[p] {
					if r.d(nb, l2p[g.c]) == r.d(p, l2p[g.c])-1 {
						doSwap(p, nb)
						break
					}
				}
			}
			stuck = 0
			continue
		}
		// Extended set: two-qubit gates reached breadth first from F; it
		// changes only when a gate runs.
		if ran || first {
			first = false
			ext = extended(ext[:0])
		}
		// Candidate swaps.
		candStamp++
		cand = cand[:0]
		for _, gi := range front {
			g := gates[gi]
			for _, p := range [2]int16{l2p[g.t], l2p[g.c]} {
				for _, nb := range r.adj[p] {
					a, b := min(p, nb), max(p, nb)
					if candSeen[int(a)*r.k+int(b)] != candStamp {
						candSeen[int(a)*r.k+int(b)] = candStamp
						cand = append(cand, [2]int16{a, b})
					}
				}
			}
		}
		// Score every candidate by the change it makes: a swap (p, q)
		// moves only the gates with a qubit on p or q, so the sums of
		// distances are the current ones plus the changes of those gates
		// (the same integers as summing every gate again, hence the same
		// choice). Each front and extended-set gate is listed at both of
		// its physical qubits (head, ends: linked lists in flat arrays).
		ends = ends[:0]
		var sf0, se0 int32
		list := func(gi int32, ext bool) int32 {
			g := gates[gi]
			a, b := l2p[g.t], l2p[g.c]
			d := r.d(a, b)
			if head[a] < 0 {
				touched = append(touched, a)
			}
			ends = append(ends, endpoint{other: b, d: d, ext: ext, next: head[a]})
			head[a] = int32(len(ends) - 1)
			if head[b] < 0 {
				touched = append(touched, b)
			}
			ends = append(ends, endpoint{other: a, d: d, ext: ext, next: head[b]})
			head[b] = int32(len(ends) - 1)
			return d
		}
		for _, gi := range front {
			sf0 += list(gi, false)
		}
		for _, gi := range ext {
			se0 += list(gi, true)
		}
		best, bestH := 0, 0.0
		for ci, c := range cand {
			p, q := c[0], c[1]
			sf, se := sf0, se0
			for _, pq := range [2][2]int16{{p, q}, {q, p}} {
				for e := head[pq[0]]; e >= 0; e = ends[e].next {
					en := &ends[e]
					if en.other == pq[1] {
						continue // the gate on (p, q) keeps its distance
					}
					if delta := r.d(pq[1], en.other) - en.d; en.ext {
						se += delta
					} else {
						sf += delta
					}
				}
			}
			h := float64(sf) / float64(len(front))
			if len(ext) > 0 {
				h += W * float64(se) / float64(len(ext))
			}
			h *= max(decay[p], decay[q])
			if ci == 0 || h < bestH {
				best, bestH = ci, h
			}
		}
		for _, x := range touched {
			head[x] = -1
		}
		touched = touched[:0]
		p, q := cand[best][0], cand[best][1]
		doSwap(p, q)
		decay[p] += delta
		decay[q] += delta
		stuck++
		if sinceReset++; sinceReset == 5 {
			resetDecay()
			sinceReset = 0
		}
	}
	if emit {
		for q := range n {
			writeOnes(int16(q), int32(len(ones[q])))
		}
	}
	return out, l2p, swaps
}
