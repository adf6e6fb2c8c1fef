package baselines

import (
	"fmt"
	"math"
	"math/bits"
	"slices"
	"strings"
	"sync"
)

// KNNMethod says how a KNN model searches for neighbours. Every method
// returns the same neighbours, distances and order (see KNN); only the time
// differs.
type KNNMethod int

const (
	// KNNAuto uses the k-d tree when the rule of KNN says it pays, brute
	// force otherwise. The default.
	KNNAuto KNNMethod = iota
	// KNNBrute scans every training row (with the Euclidean filter).
	KNNBrute
	// KNNTree always uses the k-d tree (under Cosine, unless a training
	// row's norm lies outside [2^-500, 2^500]: then brute force).
	KNNTree
)

var knnMethodNames = [...]string{KNNAuto: "auto", KNNBrute: "brute", KNNTree: "tree"}

// String returns the name ParseKNNMethod accepts, or "KNNMethod(n)" for a
// value outside the enumeration.
func (m KNNMethod) String() string {
	if m >= 0 && int(m) < len(knnMethodNames) {
		return knnMethodNames[m]
	}
	return fmt.Sprintf("KNNMethod(%d)", int(m))
}

// ParseKNNMethod returns the KNNMethod named s ("auto", "brute" or "tree";
// case and surrounding space are ignored). An unknown name is an error
// wrapping ErrParam.
func ParseKNNMethod(s string) (KNNMethod, error) {
	t := strings.ToLower(strings.TrimSpace(s))
	for i, name := range knnMethodNames {
		if t == name {
			return KNNMethod(i), nil
		}
	}
	return 0, fmt.Errorf("baselines: unknown neighbour search method %q (want auto, brute or tree): %w", s, ErrParam)
}

// The rule of KNNAuto (see KNN). A model is eligible for the tree when
// its training part has at least kdMinRows rows and at most kdMaxDim
// features (and, under Cosine, every training norm passes cosineNormOK).
// The tree of an eligible model is built by the first call that asks for
// the neighbours of at least kdMinQueries test rows; kdProbes training
// rows, evenly spaced, are then searched as test rows, and the tree is kept
// when their work (rows whose key is computed plus boxes bounded, both
// O(d)) stays below kdProbeShare of n per probe; the probe stops as soon
// as it exceeds that budget. Otherwise, and for calls on fewer rows
// (one-row leave-one-out folds, for example), brute force.
//
// The constants come from BenchmarkKNN and BenchmarkKNNDim (two cores,
// k = 5): one unit of tree work costs 3 to 4.5 training rows of brute force
// (whose inner products go through an assembly matrix-vector kernel), so
// the tree breaks even at a quarter to a third of the rows, and
// kdProbeShare = 0.2 keeps it where it is clearly faster (time ratio about
// 0.75 or better: on ten class clouds in 16 dimensions the probe gives 0.37
// of n at n = 2000, 0.22 at 8000, 0.16 at 32000, 0.13 at 50000, where the
// measured time ratios are 1.2, 0.77, 0.44 and 0.38). Building it over 50000 rows of 16 features costs
// about as much as 90 brute-force queries and a rejected probe at most
// about 20, which kdMinQueries amortises (at most a quarter more time on
// the smallest call that builds; under 1% on a fold of 10000 test rows).
// The dimension alone does not decide: on one Gaussian cloud the tree stops
// paying between 8 and 12 features, on ten well separated class clouds it
// still pays at 32. kdMaxDim = 32 is the largest dimension measured; above
// it the tree is not tried.
const (
	kdMinRows    = 1024
	kdMaxDim     = 32
	kdMinQueries = 512
	kdLeafSize   = 32
	kdProbes     = 32
	kdProbeShare = 0.2
)

// knnAuto holds KNNAuto's deferred choice, shared by concurrent calls.
type knnAuto struct {
	mu   sync.Mutex
	done bool    // the tree was built and probed
	tree *kdTree // the tree when kept
}

// chooseMethod sets up the search at the end of Fit (m's data in place).
func (m *KNN) chooseMethod() {
	if m.Method == KNNBrute {
		return
	}
	if m.Metric == Cosine {
		for _, v := range m.norms {
			if !cosineNormOK(v) {
				return
			}
		}
	}
	switch {
	case m.Method == KNNTree:
		m.tree = newKDTree(m.x, m.n, m.d, m.Metric, m.norms)
	case m.n >= kdMinRows && m.d <= kdMaxDim:
		m.auto = &knnAuto{}
	}
}

// treeFor returns the tree a call on rows test rows searches, or nil for
// brute force, building and probing KNNAuto's tree on first need.
func (m *KNN) treeFor(rows int) *kdTree {
	if m.tree != nil || m.auto == nil {
		return m.tree
	}
	a := m.auto
	a.mu.Lock()
	defer a.mu.Unlock()
	if a.done || rows < kdMinQueries {
		return a.tree
	}
	t := newKDTree(m.x, m.n, m.d, m.Metric, m.norms)
	s := &knnScratch{heap: make(knnHeap, 0, m.k), stack: make([]kdEntry, 0, 64), unit: make([]float64, m.d)}
	work, budget := 0, kdProbeShare*kdProbes*float64(m.n)
	keep := true
	for p := range kdProbes {
		i := p * m.n / kdProbes
		var tnorm float64
		if m.norms != nil {
			tnorm = m.norms[i]
		}
		work += t.search(s, m.x[i*m.d:(i+1)*m.d], tnorm, m.k)
		if float64(work) >= budget {
			keep = false
			break
		}
	}
	if keep {
		a.tree = t
	}
	a.done = true
	return a.tree
}

// MethodUsed returns the search of the fitted model: KNNTree when a tree
// is in use (Method KNNTree, or KNNAuto after a call on at least
// kdMinQueries rows kept it), KNNBrute otherwise, KNNAuto before Fit.
// Under Cosine a tree still searches by brute force for a test row whose
// norm is outside [2^-500, 2^500].
func (m *KNN) MethodUsed() KNNMethod {
	switch {
	case !m.fitted:
		return KNNAuto
	case m.tree != nil:
		return KNNTree
	case m.auto != nil:
		if m.treeFor(0) != nil {
			return KNNTree
		}
	}
	return KNNBrute
}

// kdTree is a k-d tree over the training rows (Friedman, Bentley & Finkel,
// "An algorithm for finding best matches in logarithmic expected time",
// ACM Trans. Math. Software 3(3):209-226, 1977): each node holds a range of
// rows and their tight bounding box; an inner node splits its rows at the
// median of the coordinate of largest spread (the paper's choice), the rows
// ordered by (coordinate, training index). A search visits the nearer child
// first and skips a node whose box lies farther than the current k-th
// neighbour (the paper's "bounds-overlap-ball" test).
//
// The boxes live in the space the metric is measured in: the rows
// themselves for Euclidean and Manhattan, the rows scaled to unit length for
// Cosine (see cosineLowerBound). The distances of the rows a search visits
// are those of brute force: the same functions on the same rows.
type kdTree struct {
	d      int
	metric Metric
	perm   []int     // tree position -> training row
	pts    []float64 // training rows in tree order (row-major), as given
	norms  []float64 // Cosine: Euclidean norms of pts' rows
	lo, hi []float64 // node boxes, d values per node
	nodes  []kdNode
	// eps1, eps2: the rounding allowances of cosineLowerBound.
	eps1, eps2, gam float64
}

type kdNode struct {
	start, end  int32 // tree positions [start, end)
	left, right int32 // children; -1 for a leaf
}

// newKDTree builds the tree over the n rows of x (row-major, d columns).
// norms are the rows' Euclidean norms, used (and required) by Cosine.
func newKDTree(x []float64, n, d int, metric Metric, norms []float64) *kdTree {
	space := x
	if metric == Cosine {
		space = make([]float64, n*d)
		for i := range n {
			for j := range d {
				space[i*d+j] = x[i*d+j] / norms[i]
			}
		}
	}
	t := &kdTree{d: d, metric: metric, perm: make([]int, n)}
	for i := range t.perm {
		t.perm[i] = i
	}
	// Median splits leave at least kdLeafSize/2 rows in a leaf, so there
	// are at most 2n/kdLeafSize + 1 leaves and twice as many nodes.
	maxNodes := 4*n/kdLeafSize + 2
	t.nodes = make([]kdNode, 0, maxNodes)
	t.lo = make([]float64, 0, maxNodes*d)
	t.hi = make([]float64, 0, maxNodes*d)
	t.build(space, 0, n)
	t.pts = make([]float64, n*d)
	for p, i := range t.perm {
		copy(t.pts[p*d:(p+1)*d], x[i*d:(i+1)*d])
	}
	if metric == Cosine {
		t.norms = make([]float64, n)
		for p, i := range t.perm {
			t.norms[p] = norms[i]
		}
		g := float64(d+2) * 0x1p-53
		t.gam = g / (1 - g)
		t.eps1 = 4*t.gam + math.Sqrt(float64(d))*0x1p-1070
		t.eps2 = 8*t.gam + 0x1p-60
	}
	return t
}

// build appends the node of tree positions [start, end) and its subtree and
// returns its index.
func (t *kdTree) build(space []float64, start, end int) int32 {
	d := t.d
	id := int32(len(t.nodes))
	t.nodes = append(t.nodes, kdNode{start: int32(start), end: int32(end), left: -1, right: -1})
	first := space[t.perm[start]*d : (t.perm[start]+1)*d]
	t.lo = append(t.lo, first...)
	t.hi = append(t.hi, first...)
	lo := t.lo[len(t.lo)-d:]
	hi := t.hi[len(t.hi)-d:]
	for _, i := range t.perm[start+1 : end] {
		for j, v := range space[i*d : (i+1)*d] {
			lo[j] = min(lo[j], v)
			hi[j] = max(hi[j], v)
		}
	}
	if end-start <= kdLeafSize {
		return id
	}
	dim, spread := 0, hi[0]-lo[0]
	for j := 1; j < d; j++ {
		if s := hi[j] - lo[j]; s > spread {
			dim, spread = j, s
		}
	}
	if !(spread > 0) {
		return id // all rows equal: one leaf
	}
	mid := (start + end) / 2
	kdSelect(t.perm[start:end], mid-start, func(a, b int) bool {
		va, vb := space[a*d+dim], space[b*d+dim]
		return va < vb || (va == vb && a < b)
	})
	left := t.build(space, start, mid)
	right := t.build(space, mid, end)
	t.nodes[id].left, t.nodes[id].right = left, right
	return id
}

// kdEntry is a node waiting on the search stack with the lower bound of
// its rows' keys.
type kdEntry struct {
	node int32
	lb   float64
}

// search fills s.heap with the k smallest (key, training index) pairs over
// all training rows, the set brute force finds, and returns its work: the
// number of rows whose key it computed plus the number of boxes it bounded. t is the test row; for Cosine, tnorm is its
// norm and s.unit receives t / tnorm.
//
// Exactness. Keys are computed as brute force computes them (same function,
// same operands), and a row displaces the heap's root when its pair is
// smaller, whatever the visiting order, so the heap ends with the k
// smallest pairs provided no node holding one of them is skipped. A node is
// skipped only when the heap is full and the node's lower bound exceeds the
// root's key (strictly: a row at an equal key may still win on its index),
// and the lower bounds are bounds of the computed keys, not just of the
// exact distances (see boxLowerSq and cosineLowerBound).
func (t *kdTree) search(s *knnScratch, q []float64, tnorm float64, k int) int {
	d := t.d
	h := s.heap[:0]
	qs := q // the query in the tree's space
	if t.metric == Cosine {
		qs = s.unit[:d]
		for j, v := range q {
			qs[j] = v / tnorm
		}
	}
	stack := append(s.stack[:0], kdEntry{0, math.Inf(-1)})
	visited := 0
	for len(stack) > 0 {
		e := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		full := len(h) == k
		if full && e.lb > h[0].key {
			continue
		}
		nd := t.nodes[e.node]
		if nd.left < 0 {
			for p := int(nd.start); p < int(nd.end); p++ {
				xi := t.pts[p*d : (p+1)*d : (p+1)*d]
				bound := math.Inf(1)
				if len(h) == k {
					bound = h[0].key
				}
				var key float64
				switch t.metric {
				case Euclidean:
					key = sqDistBounded(xi, q, bound)
				case Manhattan:
					key = l1DistBounded(xi, q, bound)
				case Cosine:
					key = min(max(1-rowDot(xi, q)/(t.norms[p]*tnorm), 0), 2)
				}
				visited++
				nb := neighbour{key, t.perm[p]}
				if len(h) < k {
					h = append(h, nb)
					knnSiftUp(h, len(h)-1)
				} else if h[0].after(nb) {
					h[0] = nb
					knnSiftDown(h, 0)
				}
			}
			continue
		}
		bound := math.Inf(1)
		if full {
			bound = h[0].key
		}
		ll := t.lowerBound(nd.left, qs, bound)
		lr := t.lowerBound(nd.right, qs, bound)
		visited += 2
		// Push the farther child first so that the nearer is searched first.
		if ll <= lr {
			stack = append(stack, kdEntry{nd.right, lr}, kdEntry{nd.left, ll})
		} else {
			stack = append(stack, kdEntry{nd.left, ll}, kdEntry{nd.right, lr})
		}
	}
	s.heap, s.stack = h, stack
	return visited
}

// lowerBound returns a lower bound of the keys of the rows of node id for
// the query qs (in the tree's space); it may stop early with any value
// above bound once the bound is certainly exceeded.
func (t *kdTree) lowerBound(id int32, qs []float64, bound float64) float64 {
	d := t.d
	lo := t.lo[int(id)*d : int(id+1)*d]
	hi := t.hi[int(id)*d : int(id+1)*d]
	switch t.metric {
	case Euclidean:
		return boxLowerSq(lo, hi, qs, bound)
	case Manhattan:
		return boxLowerL1(lo, hi, qs, bound)
	}
	return t.cosineLowerBound(boxLowerSq(lo, hi, qs, math.Inf(1)))
}

// boxGap returns the distance from q to the interval [lo, hi] as a
// rounded difference: 0 inside, fl(lo - q) below, fl(q - hi) above.
//
// For every x in [lo, hi], |fl(x - q)| >= boxGap(lo, hi, q): if q < lo then
// x - q >= lo - q > 0 and rounding is monotone, so fl(x - q) >= fl(lo - q);
// if q > hi then fl(q - x) >= fl(q - hi) likewise, and |fl(x - q)| =
// fl(q - x) because round-to-nearest is symmetric.
func boxGap(lo, hi, q float64) float64 {
	switch {
	case q < lo:
		return lo - q
	case q > hi:
		return q - hi
	}
	return 0
}

// boxLowerSq returns a lower bound of the key sqDistBounded(x, q, +Inf)
// for every row x inside the box [lo, hi]: the same sum, in the same
// order and with the same four accumulators, of the squared gaps instead of
// the squared differences. Each gap is at most the absolute rounded
// difference of any row in the box (boxGap), rounded squaring and rounded
// addition are monotone in their non-negative operands, so the result is at
// most the computed key of every row in the box. Like sqDistBounded it
// returns a partial sum as soon as one exceeds bound.
func boxLowerSq(lo, hi, q []float64, bound float64) float64 {
	lo, hi = lo[:len(q)], hi[:len(q)]
	var s0, s1, s2, s3 float64
	j := 0
	for ; j+8 <= len(q); j += 8 {
		g0, g1, g2, g3 := boxGap(lo[j], hi[j], q[j]), boxGap(lo[j+1], hi[j+1], q[j+1]), boxGap(lo[j+2], hi[j+2], q[j+2]), boxGap(lo[j+3], hi[j+3], q[j+3])
		s0 += g0 * g0
		s1 += g1 * g1
		s2 += g2 * g2
		s3 += g3 * g3
		g0, g1, g2, g3 = boxGap(lo[j+4], hi[j+4], q[j+4]), boxGap(lo[j+5], hi[j+5], q[j+5]), boxGap(lo[j+6], hi[j+6], q[j+6]), boxGap(lo[j+7], hi[j+7], q[j+7])
		s0 += g0 * g0
		s1 += g1 * g1
		s2 += g2 * g2
		s3 += g3 * g3
		if (s0+s1)+(s2+s3) > bound {
			return (s0 + s1) + (s2 + s3)
		}
	}
	for ; j < len(q); j++ {
		g := boxGap(lo[j], hi[j], q[j])
		s0 += g * g
	}
	return (s0 + s1) + (s2 + s3)
}

// boxLowerL1 is boxLowerSq for l1DistBounded: the sum of the gaps in
// l1DistBounded's order.
func boxLowerL1(lo, hi, q []float64, bound float64) float64 {
	lo, hi = lo[:len(q)], hi[:len(q)]
	var s0, s1, s2, s3 float64
	j := 0
	for ; j+8 <= len(q); j += 8 {
		s0 += boxGap(lo[j], hi[j], q[j])
		s1 += boxGap(lo[j+1], hi[j+1], q[j+1])
		s2 += boxGap(lo[j+2], hi[j+2], q[j+2])
		s3 += boxGap(lo[j+3], hi[j+3], q[j+3])
		s0 += boxGap(lo[j+4], hi[j+4], q[j+4])
		s1 += boxGap(lo[j+5], hi[j+5], q[j+5])
		s2 += boxGap(lo[j+6], hi[j+6], q[j+6])
		s3 += boxGap(lo[j+7], hi[j+7], q[j+7])
		if (s0+s1)+(s2+s3) > bound {
			return (s0 + s1) + (s2 + s3)
		}
	}
	for ; j < len(q); j++ {
		s0 += boxGap(lo[j], hi[j], q[j])
	}
	return (s0 + s1) + (s2 + s3)
}

// cosineNormOK reports whether a norm lies where the rounding analysis of
// cosineLowerBound holds: in [2^-500, 2^500], so that no squared norm or
// product of two norms overflows and underflow in an inner product is
// negligible (below d 2^-74 relative to the product of the norms). Rows
// outside it are searched by brute force.
func cosineNormOK(v float64) bool { return v >= 0x1p-500 && v <= 0x1p500 }

// cosineLowerBound turns e, boxLowerSq of a node's box in the space of unit
// rows, into a lower bound of the computed cosine keys of the node's rows.
//
// Cosine reduces to Euclidean on unit rows. For a, b != 0 let â = a/||a||,
// b̂ = b/||b||. Then ||â - b̂||^2 = ||â||^2 + ||b̂||^2 - 2<â, b̂> = 2 - 2<â, b̂>,
// so the cosine distance is 1 - <a, b>/(||a|| ||b||) = 1 - <â, b̂> =
// ||â - b̂||^2 / 2, an increasing function of the Euclidean distance between
// the unit rows: the nearest rows in one sense are the nearest in the other.
//
// Rounding. Let g = (d+2)u/(1-(d+2)u), u = 2^-53. The tree's unit rows
// u_x = fl(x / fl(||x||)) satisfy ||u_x - x̂|| <= 2g + sqrt(d) 2^-1074
// (the norm has relative error below g, each quotient u, subnormal
// quotients 2^-1075 absolute); the same holds for the query. So for every
// row x in a box B that contains u_x, ||x̂ - q̂|| >= dist(u_q, B) - eps1 with
// eps1 = 4g + sqrt(d) 2^-1070 (twice the above, with room). The computed e
// satisfies e <= (1 + g) dist(u_q, B)^2 + d 2^-1074 (each gap, square and
// sum rounds by at most u, subnormal squares by 2^-1075 absolute), so
// dist(u_q, B) >= sqrt(max(e - d 2^-1073, 0)) (1 - g). The computed key
// (1 - fl(<x, q>)/fl(||x|| ||q||), clipped to [0, 2]) is within 5g of the
// exact cosine distance (the inner product is within g ||x|| ||q|| by
// Cauchy-Schwarz, the norms and their product within 2g + 2u, the
// subtraction within 2u; clipping moves it toward [0, 2], where the exact
// value lies); eps2 = 8g + 2^-60 covers that, the underflow allowance of
// cosineNormOK and the rounding of this function's own arithmetic (a few u
// on values at most 2). Hence every row of the box has a computed key of at
// least (max(dist - eps1, 0))^2 / 2 - eps2.
func (t *kdTree) cosineLowerBound(e float64) float64 {
	dist := math.Sqrt(max(e-float64(t.d)*0x1p-1073, 0)) * (1 - t.gam)
	r := dist - t.eps1
	if r <= 0 {
		return math.Inf(-1)
	}
	return r*r/2 - t.eps2
}

// kdSelect reorders p so that p[k] is the element that would be there if p
// were sorted by less (a strict total order), with no larger element
// before it and no smaller one after: quickselect with a median-of-three
// pivot (Hoare, "Algorithm 65: Find", CACM 4(7), 1961), falling back to a
// full sort of the remaining range after 2 log2(len(p)) + 8 rounds, which
// bounds the worst case by O(n log n).
func kdSelect(p []int, k int, less func(a, b int) bool) {
	limit := 2*bits.Len(uint(len(p))) + 8
	lo, hi := 0, len(p) // the answer lies in p[lo:hi]
	for hi-lo > 8 {
		if limit == 0 {
			slices.SortFunc(p[lo:hi], func(a, b int) int {
				switch {
				case less(a, b):
					return -1
				case less(b, a):
					return 1
				}
				return 0
			})
			return
		}
		limit--
		// Median of three as pivot, moved to p[hi-1].
		m := lo + (hi-lo)/2
		if less(p[m], p[lo]) {
			p[m], p[lo] = p[lo], p[m]
		}
		if less(p[hi-1], p[lo]) {
			p[hi-1], p[lo] = p[lo], p[hi-1]
		}
		if less(p[m], p[hi-1]) {
			p[m], p[hi-1] = p[hi-1], p[m]
		}
		pivot := p[hi-1]
		// Lomuto partition of p[lo:hi-1] around pivot.
		st := lo
		for i := lo; i < hi-1; i++ {
			if less(p[i], pivot) {
				p[i], p[st] = p[st], p[i]
				st++
			}
		}
		p[st], p[hi-1] = p[hi-1], p[st]
		switch {
		case k < st:
			hi = st
		case k > st:
			lo = st + 1
		default:
			return
		}
	}
	// Insertion sort of the short remaining range.
	for i := lo + 1; i < hi; i++ {
		for j := i; j > lo && less(p[j], p[j-1]); j-- {
			p[j], p[j-1] = p[j-1], p[j]
		}
	}
}
