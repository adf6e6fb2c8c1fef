package baselines

import (
	"sync"

	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
)

// DefaultCacheMiB is the kernel-row cache bound of one two-class task when
// SVM.CacheMiB is 0: 200 MiB, the default cache_size of LIBSVM and of
// scikit-learn's SVC.
const DefaultCacheMiB = 200

// cacheRow is one cached kernel row. buf holds the entries of positions
// 0..len(buf)−1 and has capacity n.
type cacheRow struct {
	pos        int
	buf        []float64
	prev, next *cacheRow
}

// kernelCache serves rows of the Gram matrix K[p][q] = k(x_p, x_q) of one
// two-class task, in position order.
//
// Positions: the points start in the order given and may be permuted by
// swap (the solver's shrinking moves the active variables to the front);
// perm maps a position to the point's index in the order given. A row is
// requested with a length L and holds the entries of positions 0..L−1; a
// cached row that is shorter is extended, so after shrinking only the
// active part of a row is computed (as in LIBSVM).
//
// Memory: the rows held never exceed budget float64 values, least
// recently used rows being dropped first; the diagonal, the points and the
// bookkeeping are kept outside the bound. Every row has room for n entries
// whatever its length, so the memory of an evicted row always serves the
// next one and a fit makes no garbage (LIBSVM shortens stored rows to the
// active set instead; on 50,000 rows of BenchmarkSVMFit's blobs, full rows
// cost 3% more kernel evaluations and lowered the peak resident set from
// 299 MB to 231 MB, measured). The bound is raised to two full rows when
// smaller, so that the two most recent rows are always valid together.
// When the whole Gram matrix fits (n² ≤ budget) nothing is ever evicted.
// Rows of up to cacheBlock values come from blocks recycled across fits
// (cacheBlocks).
//
// Rows come either from the cache's own copy of the points (gonum's
// assembly Dgemv over the requested positions, then the kernel's
// transform) or, for a cache made by newKernelCacheFrom, from the full
// rows of a parent cache over a superset of the points (entries gathered,
// no kernel evaluation): a grid search reuses one parent over its
// training set for every inner fold and every C.
type kernelCache struct {
	k    kernel
	n, d int
	pts  blas64.General // own points in position order (none with a parent)
	sq   []float64      // ||x||² in position order (RBF, own points only)
	diag []float64      // K[p][p] in position order
	perm []int          // position → index in the order the points were given

	parent *kernelCache // rows come from the parent's rows when not nil
	pidx   []int        // position → parent position

	rows       []*cacheRow // by position; nil when not held
	budget     int         // bound on held, in float64 values
	held       int         // n per held row, in float64 values
	full       bool        // the whole matrix fits: nothing is evicted
	head, tail *cacheRow   // most and least recently used
	evals      int64       // kernel evaluations spent on rows (own points only)

	// Memory of the points and rows: blocks of cacheBlock
	// values from cacheBlocks, handed back by release.
	blocks []*[]float64
	free   []float64 // unused rest of the last block
}

// cacheBlock is the size, in float64 values (256 KiB), of the blocks a
// kernelCache carves its points and rows from (rows longer than a block
// are allocated on their own); the blocks are
// recycled through cacheBlocks across fits, so that training many small
// problems does not allocate (and the garbage collector does not sweep) a
// new Gram matrix every time.
const cacheBlock = 1 << 15

var cacheBlocks = sync.Pool{New: func() any {
	b := make([]float64, cacheBlock)
	return &b
}}

// cacheFloats converts a bound in MiB (0 meaning DefaultCacheMiB) to
// float64 values.
func cacheFloats(mib float64) int {
	if mib == 0 {
		mib = DefaultCacheMiB
	}
	return int(mib * (1 << 20) / 8)
}

// alloc returns m values (not cleared) from the cache's blocks, or a new
// slice when m exceeds a block.
func (c *kernelCache) alloc(m int) []float64 {
	if m > cacheBlock {
		return make([]float64, m)
	}
	if len(c.free) < m {
		b := cacheBlocks.Get().(*[]float64)
		c.blocks = append(c.blocks, b)
		c.free = *b
	}
	r := c.free[:m:m]
	c.free = c.free[m:]
	return r
}

// release hands the cache's blocks back for reuse. The cache and every row
// it served must not be used afterwards. It does not release a parent.
func (c *kernelCache) release() {
	for _, b := range c.blocks {
		cacheBlocks.Put(b)
	}
	c.blocks, c.free, c.rows, c.head, c.tail = nil, nil, nil, nil, nil
}

// newKernelCache builds a cache over pts (n ≥ 1 rows of equal length ≥ 1)
// whose rows take at most budget float64 values; budget ≤ 0 means
// DefaultCacheMiB.
func newKernelCache(k kernel, pts [][]float64, budget int) *kernelCache {
	n, d := len(pts), len(pts[0])
	c := newCacheShell(k, n, budget)
	c.d = d
	c.pts = blas64.General{Rows: n, Cols: d, Stride: d, Data: c.alloc(n * d)}
	for i, p := range pts {
		copy(c.pts.Data[i*d:(i+1)*d], p)
	}
	if k.kind == KernelRBF {
		c.sq = make([]float64, n)
		for i, p := range pts {
			c.sq[i] = floats.Dot(p, p)
		}
	}
	for i, p := range pts {
		c.diag[i] = k.eval(p, p)
	}
	return c
}

// newKernelCacheFrom builds a cache over the points at positions idx of
// parent, whose rows are gathered from the parent's full rows. The parent
// must not be swapped while the child is in use (a parent is never given
// to a solver).
func newKernelCacheFrom(parent *kernelCache, idx []int, budget int) *kernelCache {
	c := newCacheShell(parent.k, len(idx), budget)
	c.d = parent.d
	c.parent = parent
	c.pidx = make([]int, len(idx))
	copy(c.pidx, idx)
	for q, p := range idx {
		c.diag[q] = parent.diag[p]
	}
	return c
}

func newCacheShell(k kernel, n, budget int) *kernelCache {
	if budget <= 0 {
		budget = cacheFloats(0)
	}
	budget = max(budget, 2*n)
	c := &kernelCache{
		k: k, n: n, budget: budget,
		full: int64(n)*int64(n) <= int64(budget),
		diag: make([]float64, n),
		perm: make([]int, n),
		rows: make([]*cacheRow, n),
	}
	for i := range c.perm {
		c.perm[i] = i
	}
	return c
}

// row returns the first L entries of the row at position p (L ≤ n). The
// slice stays valid until another row is requested, except that the two
// most recently requested rows are valid together; swap may change it.
// The caller must not modify it.
func (c *kernelCache) row(p, L int) []float64 {
	r := c.rows[p]
	if r == nil {
		r = c.obtain()
		r.pos = p
		c.rows[p] = r
	} else {
		c.unlink(r)
	}
	c.pushFront(r)
	if have := len(r.buf); have < L {
		r.buf = r.buf[:L]
		c.compute(p, r.buf, have, L)
	}
	return r.buf[:L]
}

// obtain returns an unlinked row with an empty buffer of capacity n,
// counted in held, reusing the least recently used row when the bound
// would be exceeded.
func (c *kernelCache) obtain() *cacheRow {
	if c.held+c.n > c.budget && c.tail != nil {
		v := c.tail
		c.unlink(v)
		c.rows[v.pos] = nil
		v.buf = v.buf[:0]
		return v
	}
	c.held += c.n
	return &cacheRow{buf: c.alloc(c.n)[:0]}
}

// compute sets dst[q] = K[p][q] for q in [from, to).
func (c *kernelCache) compute(p int, dst []float64, from, to int) {
	if from >= to {
		return
	}
	if c.parent != nil {
		src := c.parent.row(c.pidx[p], c.parent.n)
		idx := c.pidx[from:to]
		out := dst[from:to]
		for k, q := range idx {
			out[k] = src[q]
		}
		return
	}
	d := c.d
	sub := blas64.General{Rows: to - from, Cols: d, Stride: d, Data: c.pts.Data[from*d : to*d]}
	x := c.pts.Data[p*d : (p+1)*d]
	var xsq float64
	var sq []float64
	if c.sq != nil {
		xsq, sq = c.sq[p], c.sq[from:to]
	}
	c.k.row(dst[from:to], x, xsq, sub, sq)
	c.evals += int64(to - from)
}

// swap exchanges positions a and b: the points, their diagonal entries,
// their rows, and the two entries of every held row. A held row long
// enough to contain the lower position but not the higher one is cut back
// to the entries before the lower one.
func (c *kernelCache) swap(a, b int) {
	if a == b {
		return
	}
	if a > b {
		a, b = b, a
	}
	c.perm[a], c.perm[b] = c.perm[b], c.perm[a]
	c.diag[a], c.diag[b] = c.diag[b], c.diag[a]
	if c.parent != nil {
		c.pidx[a], c.pidx[b] = c.pidx[b], c.pidx[a]
	} else {
		d := c.d
		pa, pb := c.pts.Data[a*d:(a+1)*d], c.pts.Data[b*d:(b+1)*d]
		for k := range pa {
			pa[k], pb[k] = pb[k], pa[k]
		}
		if c.sq != nil {
			c.sq[a], c.sq[b] = c.sq[b], c.sq[a]
		}
	}
	ra, rb := c.rows[a], c.rows[b]
	c.rows[a], c.rows[b] = rb, ra
	if ra != nil {
		ra.pos = b
	}
	if rb != nil {
		rb.pos = a
	}
	for r := c.head; r != nil; r = r.next {
		switch L := len(r.buf); {
		case L > b:
			r.buf[a], r.buf[b] = r.buf[b], r.buf[a]
		case L > a:
			r.buf = r.buf[:a]
		}
	}
}

func (c *kernelCache) unlink(r *cacheRow) {
	if r.prev != nil {
		r.prev.next = r.next
	} else if c.head == r {
		c.head = r.next
	}
	if r.next != nil {
		r.next.prev = r.prev
	} else if c.tail == r {
		c.tail = r.prev
	}
	r.prev, r.next = nil, nil
}

func (c *kernelCache) pushFront(r *cacheRow) {
	r.prev, r.next = nil, c.head
	if c.head != nil {
		c.head.prev = r
	} else {
		c.tail = r
	}
	c.head = r
}

// rowsHeld returns the number of rows held.
func (c *kernelCache) rowsHeld() int {
	var k int
	for r := c.head; r != nil; r = r.next {
		k++
	}
	return k
}
