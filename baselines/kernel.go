package baselines

import (
	"fmt"

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
	// KernelPoly is (gamma <x, x'> + c)^degree with the offset c (SVM.Coef0,
	// spec key offset). With c < 0 it need not be positive semidefinite;
	// the solver copes (see SVM).
	KernelPoly
	// KernelInterference is (1 + <x, x'>)/2, the kernel of the interference
	// classifier (Schuld, Fingerhuth & Petruccione, EPL 119, 60002, 2017).
	// On unit vectors it equals 1 - ||x - x'||^2/4. On inputs that are not
	// L2-normalised it is still (1 + <x, x'>)/2: a constant plus half the
	// linear kernel, hence always positive semidefinite. Gamma, degree and
	// the offset do not enter it.
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

// scaleGamma returns the "inverse-variance" rule 1 / (d * Var(X)) (called
// "scale" in scikit-learn's SVC), where Var is the
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
