package baselines

import (
	"fmt"
	"math"

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
		return math.Exp(-k.gamma * sqDist(a, b))
	case KernelPoly:
		return powi(k.gamma*floats.Dot(a, b)+k.coef0, k.degree)
	case KernelInterference:
		return (1 + floats.Dot(a, b)) / 2
	}
	panic(fmt.Sprintf("baselines: internal error: kernel kind %d", int(k.kind)))
}

// row sets dst[t] = k(x, pts[t]) for every t. sq holds ||pts[t]||^2 and xsq
// is ||x||^2; they are used by the RBF kernel only (nil otherwise). The RBF
// distance is expanded as ||x||^2 + ||x'||^2 - 2<x, x'> (as LIBSVM does),
// clamped at 0 against rounding, so each evaluation costs one dot product.
func (k kernel) row(dst, x []float64, xsq float64, pts [][]float64, sq []float64) {
	dst = dst[:len(pts)]
	switch k.kind {
	case KernelLinear:
		for t, p := range pts {
			dst[t] = floats.Dot(x, p)
		}
	case KernelRBF:
		sq = sq[:len(pts)]
		for t, p := range pts {
			d2 := xsq + sq[t] - 2*floats.Dot(x, p)
			if d2 < 0 {
				d2 = 0
			}
			dst[t] = math.Exp(-k.gamma * d2)
		}
	case KernelPoly:
		for t, p := range pts {
			dst[t] = powi(k.gamma*floats.Dot(x, p)+k.coef0, k.degree)
		}
	case KernelInterference:
		for t, p := range pts {
			dst[t] = (1 + floats.Dot(x, p)) / 2
		}
	default:
		panic(fmt.Sprintf("baselines: internal error: kernel kind %d", int(k.kind)))
	}
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
	pts   [][]float64
	sq    []float64 // ||pts[t]||^2, RBF only
	diag  []float64 // K[i][i]
	rows  [][]float64
	evals int64 // kernel evaluations spent on rows

	// Least-recently-used list over held rows, used when limit < n.
	limit      int
	held       int
	prev, next []int
	head, tail int // most and least recently used; -1 when empty
}

// newKernelCache builds a cache over pts. limit is the largest number of
// rows held at once; limit <= 0 takes the budget from gramCacheFloats.
func newKernelCache(k kernel, pts [][]float64, limit int) *kernelCache {
	n := len(pts)
	if limit <= 0 {
		limit = gramCacheFloats / max(n, 1)
	}
	limit = max(limit, 2)
	c := &kernelCache{k: k, pts: pts, rows: make([][]float64, n), limit: limit, head: -1, tail: -1}
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
		buf = make([]float64, len(c.pts))
	}
	var xsq float64
	if c.sq != nil {
		xsq = c.sq[i]
	}
	c.k.row(buf, c.pts[i], xsq, c.pts, c.sq)
	c.evals += int64(len(c.pts))
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
