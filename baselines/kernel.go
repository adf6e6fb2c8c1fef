package baselines

import (
	"fmt"
	"sync"

	"gonum.org/v1/gonum/blas"
	"gonum.org/v1/gonum/blas/blas64"
	"gonum.org/v1/gonum/floats"
)

// KernelKind selects the kernel of an SVM. The zero value is KernelRBF.
type KernelKind int

const (
	// KernelRBF is the Gaussian kernel exp(-gamma ||x - x'||^2).
	KernelRBF KernelKind = iota
	// KernelLinear is the inner product <x, x'>.
	KernelLinear
	// KernelPoly is (gamma <x, x'> + coef0)^degree. With coef0 < 0 it need
	// not be positive semidefinite; the solver copes (see SVM).
	KernelPoly
	// KernelInterference is (1 + <x, x'>)/2, the kernel of the interference
	// classifier (Schuld, Fingerhuth & Petruccione, EPL 119, 60002, 2017).
	// On unit vectors it equals 1 - ||x - x'||^2/4. On inputs that are not
	// L2-normalised it is still (1 + <x, x'>)/2: a constant plus half the
	// linear kernel, hence always positive semidefinite. Gamma, degree and
	// coef0 do not enter it.
	KernelInterference
)

var kernelNames = [...]string{
	KernelRBF:          "rbf",
	KernelLinear:       "linear",
	KernelPoly:         "poly",
	KernelInterference: "interference",
}

// String returns the kernel's name as ParseKernel accepts it.
func (k KernelKind) String() string {
	if k < 0 || int(k) >= len(kernelNames) {
		return fmt.Sprintf("KernelKind(%d)", int(k))
	}
	return kernelNames[k]
}

// ParseKernel returns the kernel named s: "linear", "rbf", "poly" or
// "interference" (exact, lower case). Any other name is an error wrapping
// ErrParam.
func ParseKernel(s string) (KernelKind, error) {
	for k, name := range kernelNames {
		if s == name {
			return KernelKind(k), nil
		}
	}
	return 0, fmt.Errorf("baselines: unknown kernel %q (want linear, rbf, poly or interference): %w", s, ErrParam)
}

// valid reports whether k is one of the declared kinds.
func (k KernelKind) valid() bool { return k >= 0 && int(k) < len(kernelNames) }

// kernel is a kernel function with its resolved parameters.
type kernel struct {
	kind   KernelKind
	gamma  float64
	degree int
	coef0  float64
}

// eval returns k(a, b). It panics if kind is not a declared kind, which
// SVM.Fit rules out before any kernel is built.
func (k kernel) eval(a, b []float64) float64 {
	switch k.kind {
	case KernelLinear:
		return floats.Dot(a, b)
	case KernelRBF:
		return expNeg(-k.gamma * sqDist(a, b))
	case KernelPoly:
		return powi(k.gamma*floats.Dot(a, b)+k.coef0, k.degree)
	case KernelInterference:
		return (1 + floats.Dot(a, b)) / 2
	}
	panic(fmt.Sprintf("baselines: internal error: kernel kind %d", int(k.kind)))
}

// row sets dst[t] = k(x, p_t) for every row p_t of pts. sq holds ||p_t||^2
// and xsq is ||x||^2; they are used by the RBF kernel only (nil otherwise).
// The inner products <x, p_t> come from one matrix-vector product (gonum's
// assembly Dgemv, which runs over four rows at a time). The RBF distance is
// expanded as ||x||^2 + ||p_t||^2 - 2<x, p_t> (as LIBSVM does), clamped at 0
// against rounding, and the exponentials are taken over the whole row
// (expNegSlice).
func (k kernel) row(dst, x []float64, xsq float64, pts blas64.General, sq []float64) {
	dst = dst[:pts.Rows]
	if len(dst) == 0 {
		return
	}
	blas64.Gemv(blas.NoTrans, 1, pts, blas64.Vector{N: len(x), Inc: 1, Data: x}, 0, blas64.Vector{N: len(dst), Inc: 1, Data: dst})
	switch k.kind {
	case KernelLinear:
	case KernelRBF:
		sq = sq[:len(dst)]
		for t, ip := range dst {
			d2 := xsq + sq[t] - 2*ip
			if d2 < 0 {
				d2 = 0
			}
			dst[t] = -k.gamma * d2
		}
		expNegSlice(dst)
	case KernelPoly:
		for t, ip := range dst {
			dst[t] = powi(k.gamma*ip+k.coef0, k.degree)
		}
	case KernelInterference:
		for t, ip := range dst {
			dst[t] = (1 + ip) / 2
		}
	default:
		panic(fmt.Sprintf("baselines: internal error: kernel kind %d", int(k.kind)))
	}
}

// denseRows copies pts (rows of length d) into one row-major matrix.
func denseRows(pts [][]float64, d int) blas64.General {
	m := blas64.General{Rows: len(pts), Cols: d, Stride: max(d, 1), Data: make([]float64, len(pts)*d)}
	for i, p := range pts {
		copy(m.Data[i*d:(i+1)*d], p)
	}
	return m
}

// rowOf returns row i of m.
func rowOf(m blas64.General, i int) []float64 {
	return m.Data[i*m.Stride : i*m.Stride+m.Cols : i*m.Stride+m.Cols]
}

// sqDist returns ||a - b||^2.
func sqDist(a, b []float64) float64 {
	b = b[:len(a)]
	var s float64
	for i, v := range a {
		d := v - b[i]
		s += d * d
	}
	return s
}

// powi returns x^n for n >= 1 by repeated squaring.
func powi(x float64, n int) float64 {
	r := 1.0
	for ; n > 0; n >>= 1 {
		if n&1 == 1 {
			r *= x
		}
		x *= x
	}
	return r
}

// scaleGamma returns the "scale" rule 1 / (d * Var(X)), where Var is the
// population variance over all entries of the n×d matrix whose rows are
// pts (scikit-learn's X.var()). A zero variance gives 1.
func scaleGamma(pts [][]float64) float64 {
	var n int
	var mean float64
	for _, p := range pts {
		for _, v := range p {
			mean += v
			n++
		}
	}
	if n == 0 {
		return 1
	}
	mean /= float64(n)
	var ss float64
	for _, p := range pts {
		for _, v := range p {
			d := v - mean
			ss += d * d
		}
	}
	v := ss / float64(n)
	if v == 0 {
		return 1
	}
	return 1 / (float64(len(pts[0])) * v)
}

// gramCacheFloats bounds the memory of one kernel cache: 4096² float64
// values, 128 MiB. A problem of at most 4096 points may hold every row of
// its Gram matrix (rows are computed on first use, so only rows the solver
// touches take memory); a larger problem keeps the most recently used
// gramCacheFloats/n rows and recomputes evicted rows on demand.
const gramCacheFloats = 4096 * 4096

// kernelCache serves rows of the Gram matrix K[i][t] = k(pts[i], pts[t]).
// Rows are computed on first request. When not all rows fit (see
// gramCacheFloats) the least recently used row is evicted; a row slice
// stays valid until limit other rows have been requested after it, so the
// two most recent rows are always valid together (limit >= 2).
type kernelCache struct {
	k     kernel
	pts   blas64.General // the points, one per row
	sq    []float64      // ||pts[t]||^2, RBF only
	diag  []float64      // K[i][i]
	rows  [][]float64
	evals int64 // kernel evaluations spent on rows

	// Least-recently-used list over held rows, used when limit < n.
	limit      int
	held       int
	prev, next []int
	head, tail int // most and least recently used; -1 when empty

	// Memory of the points and rows: blocks of cacheBlock values from
	// cacheBlocks, handed back by release.
	blocks []*[]float64
	free   []float64 // unused rest of the last block
}

// cacheBlock is the size, in float64 values (256 KiB), of the blocks a
// kernelCache carves its rows from; the blocks are recycled through
// cacheBlocks across fits, so that training does not allocate (and the
// garbage collector does not sweep) a new Gram matrix every time.
const cacheBlock = 1 << 15

var cacheBlocks = sync.Pool{New: func() any {
	b := make([]float64, cacheBlock)
	return &b
}}

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
// it served must not be used afterwards.
func (c *kernelCache) release() {
	for _, b := range c.blocks {
		cacheBlocks.Put(b)
	}
	c.blocks, c.free, c.rows = nil, nil, nil
}

// newKernelCache builds a cache over pts. limit is the largest number of
// rows held at once; limit <= 0 takes the budget from gramCacheFloats.
func newKernelCache(k kernel, pts [][]float64, limit int) *kernelCache {
	n := len(pts)
	if limit <= 0 {
		limit = gramCacheFloats / max(n, 1)
	}
	limit = max(limit, 2)
	c := &kernelCache{k: k, rows: make([][]float64, n), limit: limit, head: -1, tail: -1}
	d := len(pts[0])
	c.pts = blas64.General{Rows: n, Cols: d, Stride: max(d, 1), Data: c.alloc(n * d)}
	for i, p := range pts {
		copy(c.pts.Data[i*d:(i+1)*d], p)
	}
	if k.kind == KernelRBF {
		c.sq = make([]float64, n)
		for i, p := range pts {
			c.sq[i] = floats.Dot(p, p)
		}
	}
	c.diag = make([]float64, n)
	for i, p := range pts {
		c.diag[i] = k.eval(p, p)
	}
	if limit < n {
		c.prev = make([]int, n)
		c.next = make([]int, n)
	}
	return c
}

// row returns row i of the Gram matrix. The caller must not modify it.
func (c *kernelCache) row(i int) []float64 {
	lru := c.prev != nil
	if r := c.rows[i]; r != nil {
		if lru {
			c.unlink(i)
			c.pushFront(i)
		}
		return r
	}
	var buf []float64
	if lru && c.held == c.limit {
		v := c.tail
		buf = c.rows[v]
		c.rows[v] = nil
		c.unlink(v)
		c.held--
	} else {
		buf = c.alloc(c.pts.Rows)
	}
	var xsq float64
	if c.sq != nil {
		xsq = c.sq[i]
	}
	c.k.row(buf, rowOf(c.pts, i), xsq, c.pts, c.sq)
	c.evals += int64(c.pts.Rows)
	c.rows[i] = buf
	if lru {
		c.pushFront(i)
		c.held++
	}
	return buf
}

func (c *kernelCache) unlink(i int) {
	p, n := c.prev[i], c.next[i]
	if p >= 0 {
		c.next[p] = n
	} else {
		c.head = n
	}
	if n >= 0 {
		c.prev[n] = p
	} else {
		c.tail = p
	}
}

func (c *kernelCache) pushFront(i int) {
	c.prev[i] = -1
	c.next[i] = c.head
	if c.head >= 0 {
		c.prev[c.head] = i
	} else {
		c.tail = i
	}
	c.head = i
}
