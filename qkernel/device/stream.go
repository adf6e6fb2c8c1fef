package device

import (
	"fringe/qkernel/circuit"
)

// The translation of a routed program overlaps its routing: the router
// (this goroutine) writes its gates, SWAPs as three CNOTs, into a store
// of fixed chunks and publishes the prefix written; a second goroutine
// cancels CNOT pairs as they arrive (canceller: the rules and window of
// cancelPairs applied gate by gate, which is what cancelPairs does over
// the whole list) and translates and merges (merger) every gate no later
// arrival can cancel any more.
// A CNOT can still be cancelled while the live gates after it on its
// target are CNOTs onto that target: a later twin's search reaches it.
// Once a one-qubit gate (or measurement) follows it on its target it is
// final, because those are never removed and stop every search. The
// gates before the first CNOT that is not final are published to the
// merger. Every decision is the one of the sequential passes in the same
// order, so the program is the same whatever the scheduling (the goldens
// and the equivalence tests check it).

// publishEvery is how many gates the router writes between two
// publications to the merger.
const publishEvery = 1 << 13

// gateStore is an append-only list of gates in chunks of 2^bits that
// never move, so that a reader may look at a published prefix while the
// writer appends.
type gateStore struct {
	chunks [][]gate
	n      int32
	bits   uint
}

// newGateStore returns a store whose chunks suit about n gates: 2^10 to
// 2^16 each.
func newGateStore(n int) *gateStore {
	bits := uint(10)
	for bits < 16 && 1<<bits < n {
		bits++
	}
	return &gateStore{bits: bits}
}

func (s *gateStore) at(i int32) *gate { return &s.chunks[i>>s.bits][i&(1<<s.bits-1)] }

func (s *gateStore) add(g gate) int32 {
	if int(s.n)&(1<<s.bits-1) == 0 {
		s.chunks = append(s.chunks, make([]gate, 1<<s.bits))
	}
	i := s.n
	*s.at(i) = g
	s.n++
	return i
}

// canceller is cancelPairs for CNOTs, one gate at a time, and the
// bookkeeping of which CNOTs are final.
//
// A CNOT j = (c, t) can be cancelled only by a later twin whose search
// down t's live gates reaches j (every gate between is a CNOT onto t) and
// whose check of c's live gates finds only CNOTs from c between. So j is
// final once a permanent blocker follows it on t (a mark of one-qubit
// gates, or a final gate that is not a CNOT onto t) or on c (a mark, or a
// final gate that is not a CNOT from c): marks are never removed, and
// neither are final gates. A final CNOT x = (cx, tx) is such a blocker on
// cx for the CNOTs onto cx before it, and on tx for the CNOTs from tx
// before it: finality cascades (final).
type canceller struct {
	st    *gateStore
	top   [][]int32 // per qubit: live CNOT indices, -1 for a run of other gates
	pendT [][]int32 // per qubit: CNOTs onto it, in order, maybe final or dropped since
	pendC [][]int32 // per qubit: CNOTs from it, likewise
	queue []int32   // kept CNOTs in order, from the first not known final
	head  int
	work  []int32 // final CNOTs whose blocking is still to spread
}

// the mark of a final CNOT.
const markFinal = 1

func newCanceller(st *gateStore, n int) *canceller {
	return &canceller{st: st, top: make([][]int32, n), pendT: make([][]int32, n), pendC: make([][]int32, n)}
}

// finalAll makes final every CNOT of list (indices ascending) before
// index before, dropping them from the list.
func (cc *canceller) finalAll(list *[]int32, before int32) {
	l := *list
	k := 0
	for k < len(l) && l[k] < before {
		if g := cc.st.at(l[k]); g.kind != dropped && g.mark != markFinal {
			g.mark = markFinal
			cc.work = append(cc.work, l[k])
		}
		k++
	}
	*list = append(l[:0], l[k:]...)
}

// spread makes final what the final CNOTs on the work list block.
func (cc *canceller) spread() {
	for len(cc.work) > 0 {
		x := cc.work[len(cc.work)-1]
		cc.work = cc.work[:len(cc.work)-1]
		g := cc.st.at(x)
		cc.finalAll(&cc.pendT[g.c], x) // x is no CNOT onto its control
		cc.finalAll(&cc.pendC[g.t], x) // nor a CNOT from its target
	}
}

// add decides gate i (just stored): a one-qubit gate or measurement marks
// its qubit (and makes the CNOTs before it onto and from that qubit
// final); a CNOT cancels with its nearest twin if cancelPairs would cancel
// it, else joins the stacks.
func (cc *canceller) add(i int32) {
	const window = 64
	g := *cc.st.at(i)
	if !g.two() {
		if s := cc.top[g.t]; len(s) == 0 || s[len(s)-1] >= 0 {
			cc.top[g.t] = append(s, -1)
		}
		cc.finalAll(&cc.pendT[g.t], i)
		cc.finalAll(&cc.pendC[g.t], i)
		cc.spread()
		return
	}
	if g.kind != circuit.CNOT {
		panic("device: the routed form holds CNOTs only") // broken internal invariant
	}
	between := func(q int16, j int32) bool {
		s := cc.top[q]
		for k := len(s) - 1; k >= 0 && s[k] != j; k-- {
			if len(s)-k > window || s[k] < 0 {
				return false
			}
			if o := cc.st.at(s[k]); o.kind != circuit.CNOT || o.c != g.c {
				return false
			}
		}
		return true
	}
	match := int32(-1)
	s := cc.top[g.t]
	for k := len(s) - 1; k >= 0 && len(s)-k <= window; k-- {
		if s[k] < 0 {
			break
		}
		o := cc.st.at(s[k])
		if o.kind != circuit.CNOT || o.t != g.t {
			break
		}
		if o.c == g.c {
			if between(g.c, s[k]) {
				match = s[k]
			}
			break
		}
	}
	if match >= 0 {
		if cc.st.at(match).mark == markFinal {
			panic("device: the canceller dropped a final gate") // broken internal invariant
		}
		cc.st.at(match).kind, cc.st.at(i).kind = dropped, dropped
		cc.remove(g.t, match)
		cc.remove(g.c, match)
		return
	}
	cc.top[g.t] = append(cc.top[g.t], i)
	cc.top[g.c] = append(cc.top[g.c], i)
	cc.pendT[g.t] = append(cc.pendT[g.t], i)
	cc.pendC[g.c] = append(cc.pendC[g.c], i)
	cc.queue = append(cc.queue, i)
}

func (cc *canceller) remove(q int16, i int32) {
	s := cc.top[q]
	for k := len(s) - 1; k >= 0; k-- {
		if s[k] == i {
			cc.top[q] = append(s[:k], s[k+1:]...)
			return
		}
	}
	panic("device: the canceller lost a gate") // broken internal invariant
}

// frontier returns the number of leading gates no later gate can change:
// those before the first CNOT that is neither final nor dropped.
func (cc *canceller) frontier() int32 {
	for cc.head < len(cc.queue) {
		g := cc.st.at(cc.queue[cc.head])
		if g.mark != markFinal && g.kind != dropped {
			return cc.queue[cc.head]
		}
		cc.head++
	}
	if cc.head > 1<<12 && cc.head > len(cc.queue)/2 {
		cc.queue = append(cc.queue[:0], cc.queue[cc.head:]...)
		cc.head = 0
	}
	return cc.st.n
}

// published is a prefix of the store the translator may read.
type published struct {
	chunks [][]gate
	n      int32
}

// translate consumes the published prefixes: it cancels CNOT pairs gate
// by gate (canceller) and passes every gate no later gate can cancel,
// but the dropped ones, in order to the merger (CNOT translated for its
// orientation, one-qubit gates merged, measurements written); at the end
// it returns the merged native gates.
func translate(m *merger, native func(a, b int16) bool, n int, bits uint, in <-chan published, out chan<- []gate) {
	st := &gateStore{bits: bits}
	cc := newCanceller(st, n)
	var merged int32
	step := func(upto int32) {
		for ; merged < upto; merged++ {
			g := *st.at(merged)
			switch g.kind {
			case dropped:
			case circuit.Measure:
				m.emit(g)
			case circuit.CNOT:
				g.mark = 0
				m.cnot(g.c, g.t, native(g.c, g.t))
			default:
				m.one(g.t, gateMat2(g.kind, g.angle))
			}
		}
	}
	for p := range in {
		seen := st.n
		st.chunks, st.n = p.chunks, p.n
		for i := seen; i < st.n; i++ {
			cc.add(i)
		}
		step(cc.frontier())
	}
	step(st.n) // routing is over: no gate can change any more
	out <- m.finish()
}

// routeAndTranslate routes gates from the mapping l2p (router.route,
// writing), writes each SWAP as three CNOTs (the first and last in a
// native orientation), appends the measurements of the qubits measured
// at their final places, cancels CNOT pairs and translates into the
// family's native gates with the one-qubit runs merged, translation
// running beside routing. It returns the merged native gates, the final
// mapping and the SWAPs inserted.
func routeAndTranslate(r *router, gates []gate, l2p []int16, measured []int16, m *merger, native func(a, b int16) bool) ([]gate, []int16, int) {
	st := newGateStore(2 * len(gates))
	ch := make(chan published, 8)
	res := make(chan []gate, 1)
	go translate(m, native, len(l2p), st.bits, ch, res)
	var last int32
	put := func(g gate) {
		st.add(g)
		if st.n-last >= publishEvery {
			last = st.n
			ch <- published{chunks: st.chunks, n: st.n}
		}
	}
	sink := func(g gate) {
		if g.kind != circuit.SWAP {
			put(g)
			return
		}
		a, b := g.c, g.t
		if !native(a, b) {
			a, b = b, a
		}
		put(gate{kind: circuit.CNOT, c: a, t: b})
		put(gate{kind: circuit.CNOT, c: b, t: a})
		put(gate{kind: circuit.CNOT, c: a, t: b})
	}
	_, final, swaps := r.route(gates, l2p, true, sink)
	for _, q := range measured {
		put(gate{kind: circuit.Measure, t: final[q], c: -1})
	}
	ch <- published{chunks: st.chunks, n: st.n}
	close(ch)
	return <-res, final, swaps
}
